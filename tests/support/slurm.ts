// A single-node Slurm for tests, started on this machine: munged on a socket of its own,
// slurmctld and slurmd with a minimal slurm.conf (ports of their own) in a temporary
// folder. Stopped by the process ids in their pid files.
import { execFileSync, spawnSync } from 'node:child_process';
import { chownSync, existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync, chmodSync } from 'node:fs';
import { randomBytes } from 'node:crypto';
import { hostname, tmpdir, userInfo } from 'node:os';
import { join } from 'node:path';

export const SLURM_BINARIES = ['munged', 'munge', 'unmunge', 'slurmctld', 'slurmd', 'sbatch', 'squeue', 'sinfo', 'scancel'];

function which(b: string): boolean {
  return spawnSync('sh', ['-c', `command -v ${b}`], { stdio: 'ignore' }).status === 0
    || existsSync(`/usr/sbin/${b}`) || existsSync(`/usr/bin/${b}`);
}

/** Why a real Slurm cannot be started here, or null when it can. */
export function slurmUnavailable(): string | null {
  const missing = SLURM_BINARIES.filter((b) => !which(b));
  if (missing.length) return `Slurm test skipped: ${missing.join(', ')} not installed (Debian packages slurm-wlm and munge; .ci/run installs them)`;
  if (userInfo().uid !== 0) return 'Slurm test skipped: starting slurmd and munged needs root';
  return null;
}

const bin = (b: string) => (existsSync(`/usr/sbin/${b}`) ? `/usr/sbin/${b}` : existsSync(`/usr/bin/${b}`) ? `/usr/bin/${b}` : b);

function mungeWorks(sock: string): boolean {
  const r = spawnSync('sh', ['-c', `munge -S '${sock}' -n | unmunge -S '${sock}'`], { encoding: 'utf8', timeout: 10_000 });
  return r.status === 0 && /STATUS:\s+Success/.test(r.stdout);
}

function pidOf(file: string): number | null {
  try { const n = Number(readFileSync(file, 'utf8').trim()); return n > 0 ? n : null; } catch { return null; }
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

export interface TestSlurm { dir: string; conf: string; env: NodeJS.ProcessEnv; stop: () => Promise<void> }

export async function startSlurm(): Promise<TestSlurm> {
  const dir = mkdtempSync(join(tmpdir(), 'rupta-slurm-'));
  chmodSync(dir, 0o755);
  // a munged of our own on its own socket, so that test runs side by side never share one
  const key = '/etc/munge/munge.key';
  const uid = Number(execFileSync('id', ['-u', 'munge'], { encoding: 'utf8' }).trim()), gid = Number(execFileSync('id', ['-g', 'munge'], { encoding: 'utf8' }).trim());
  if (!existsSync(key)) { mkdirSync('/etc/munge', { recursive: true }); writeFileSync(key, randomBytes(1024), { mode: 0o400 }); chownSync(key, uid, gid); }
  const md = join(dir, 'munge'), sock = join(md, 'munge.sock');
  mkdirSync(md); chownSync(md, uid, gid); chmodSync(md, 0o755);
  execFileSync('runuser', ['-u', 'munge', '--', bin('munged'), `--socket=${sock}`, `--pid-file=${join(md, 'munged.pid')}`,
    `--log-file=${join(md, 'munged.log')}`, `--seed-file=${join(md, 'munged.seed')}`, `--key-file=${key}`], { stdio: 'ignore' });
  for (let i = 0; i < 50 && !mungeWorks(sock); i++) await sleep(100);
  const mungePid = pidOf(join(md, 'munged.pid'));
  // ports of this run only: another test run on the machine gets its own
  const port = 20000 + 2 * (process.pid % 10000);
  const host = hostname().split('.')[0]!;
  for (const d of ['state', 'spool']) mkdirSync(join(dir, d));
  const conf = join(dir, 'slurm.conf');
  writeFileSync(conf, [
    'ClusterName=ruptatest',
    `SlurmctldHost=${host}`,
    'SlurmUser=root', 'SlurmdUser=root',
    `SlurmctldPort=${port}`, `SlurmdPort=${port + 1}`, `AuthInfo=socket=${sock}`,
    `StateSaveLocation=${join(dir, 'state')}`, `SlurmdSpoolDir=${join(dir, 'spool')}`,
    `SlurmctldPidFile=${join(dir, 'slurmctld.pid')}`, `SlurmdPidFile=${join(dir, 'slurmd.pid')}`,
    `SlurmctldLogFile=${join(dir, 'slurmctld.log')}`, `SlurmdLogFile=${join(dir, 'slurmd.log')}`,
    'ProctrackType=proctrack/linuxproc', 'TaskPlugin=task/none', 'JobAcctGatherType=jobacct_gather/none',
    'AccountingStorageType=accounting_storage/none', 'SelectType=select/cons_tres', 'SelectTypeParameters=CR_Core',
    'ReturnToService=2', 'MpiDefault=none', 'SchedulerType=sched/backfill',
    `NodeName=${host} CPUs=2 RealMemory=8000 State=UNKNOWN`,
    `PartitionName=test Nodes=${host} Default=YES MaxTime=INFINITE State=UP`,
    '',
  ].join('\n'));
  const env = { ...process.env, SLURM_CONF: conf };
  execFileSync(bin('slurmctld'), ['-f', conf], { env, stdio: 'ignore' });
  execFileSync(bin('slurmd'), ['-f', conf], { env, stdio: 'ignore' });
  let idle = false;
  for (let i = 0; i < 150 && !idle; i++) {
    await sleep(200);
    const r = spawnSync('sinfo', ['-h', '-o', '%t'], { env, encoding: 'utf8' });
    idle = r.status === 0 && /idle/.test(r.stdout);
  }
  const stop = async () => {
    for (const f of ['slurmd.pid', 'slurmctld.pid']) {
      const pid = pidOf(join(dir, f));
      if (pid) try { process.kill(pid, 'SIGTERM'); } catch { /* gone already */ }
    }
    if (mungePid) try { process.kill(mungePid, 'SIGTERM'); } catch { /* gone already */ }
    await sleep(500);
    rmSync(dir, { recursive: true, force: true });
  };
  if (!idle) {
    const log = existsSync(join(dir, 'slurmctld.log')) ? readFileSync(join(dir, 'slurmctld.log'), 'utf8').split('\n').slice(-5).join(' | ') : '';
    await stop();
    throw new Error(`the test Slurm node did not become idle within 30 s (${log})`);
  }
  return { dir, conf, env, stop };
}
