// Timing of the sparse LDLᵀ solver on a Matrix Market file, and a grid stiffness to feed it.
// Usage: node .build/cli/bench-matrix.js FILE  |  node .build/cli/bench-matrix.js --grid NX NY FILE

import { execFileSync } from 'node:child_process';
import { existsSync, mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import {
  analyze,
  fillReducingOrder,
  assemblyMap,
  blockMapOffsets,
  factorize,
  matVec,
  matrixOnPattern,
  patternFromBlocks,
  readMatrixMarket,
  writeMatrixMarket,
  type CsrMatrix,
  type OrderingMethod,
} from '../src/linalg/index.js';
import { parseCase } from '../src/case/index.js';
import type { CaseModel } from '../src/case/model.js';

export interface BenchResult {
  n: number;
  ordering: OrderingMethod;
  /** Entries of L without amalgamation zeros. */
  nnzL: number;
  /** ordering + symbolic + numeric, CPU seconds (all times are the process's user + system time) */
  factor_s: number;
  ordering_s: number;
  symbolic_s: number;
  numeric_s: number;
  solve_s: number;
  /** ‖Ax − b‖∞ / ‖b‖∞ with b all ones */
  residual: number;
}

/** The sparse solver's entry points: this build's, or another build's loaded for a comparison. */
export interface SolverLib {
  fillReducingOrder: typeof fillReducingOrder;
  analyze: typeof analyze;
  factorize: typeof factorize;
}

const thisBuild: SolverLib = { fillReducingOrder, analyze, factorize };

/** CPU seconds of this process so far (user + system): less disturbed than wall time by other loads on a shared machine. */
export const cpuSeconds = (): number => {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1e6;
};

/** Factor and solve the matrix (a file or one already read) with b = 1; residual is the relative infinity norm. */
export function benchMatrix(file: string | CsrMatrix, ordering: OrderingMethod = 'auto', lib: SolverLib = thisBuild): BenchResult {
  const A = typeof file === 'string' ? readMatrixMarket(file) : file;
  const n = A.n;
  const t0 = cpuSeconds();
  const perm = lib.fillReducingOrder(A, ordering);
  const t1 = cpuSeconds();
  const sym = lib.analyze(A, { ordering: perm });
  const t2 = cpuSeconds();
  const F = lib.factorize(A, sym);
  const t3 = cpuSeconds();
  const b = new Float64Array(n).fill(1);
  const x = new Float64Array(n);
  F.solve(b, x);
  const t4 = cpuSeconds();
  const r = matVec(A, x, new Float64Array(n));
  let res = 0;
  for (let i = 0; i < n; i++) res = Math.max(res, Math.abs(r[i] - b[i]));
  return {
    n,
    ordering,
    nnzL: sym.nnzLExact,
    factor_s: t3 - t0,
    ordering_s: t1 - t0,
    symbolic_s: t2 - t1,
    numeric_s: t3 - t2,
    solve_s: t4 - t3,
    residual: n > 0 ? res : 0,
  };
}

export interface ReferenceTiming {
  n: number;
  nnzL: number;
  analyse_s: number;
  factorize_s: number;
}

/**
 * The small driver cli/bench-cholmod.c for the SuiteSparse supernodal Cholesky (CHOLMOD), built on
 * demand: the path of the program, or a sentence saying why not when the Debian packages
 * (libsuitesparse-dev, libopenblas-dev) or a C compiler are missing.
 */
export function cholmodDriver(): { exe: string } | string {
  if (!existsSync('/usr/include/suitesparse/cholmod.h')) return 'CHOLMOD headers not found (apt-get install libsuitesparse-dev libopenblas-dev)';
  const src = fileURLToPath(new URL('../../cli/bench-cholmod.c', import.meta.url));
  const exe = join(mkdtempSync(join(tmpdir(), 'rupta-bench-')), 'bench-cholmod');
  try {
    execFileSync('cc', ['-O2', '-o', exe, src, '-lcholmod', '-lsuitesparseconfig'], { stdio: 'pipe' });
  } catch (e) {
    return `the CHOLMOD driver did not build: ${String((e as { stderr?: Buffer }).stderr ?? e).split('\n')[0]}`;
  }
  return { exe };
}

/** CPU times of CHOLMOD (its default ordering) on the file, one per repetition. */
export function cholmodTimes(exe: string, file: string, repeat: number): ReferenceTiming[] {
  // one thread for BLAS, as our factorization runs on one
  const out = execFileSync(exe, [file, String(repeat)], { encoding: 'utf8', env: { ...process.env, OPENBLAS_NUM_THREADS: '1' } });
  return out.trim().split('\n').map((l) => JSON.parse(l) as ReferenceTiming);
}

/** Stiffness of a unit square, bilinear, plane stress (E = 1, ν = 0.3, thickness 1), row-major 8×8. */
function q4Stiffness(): Float64Array {
  const nu = 0.3;
  const c = 1 / (1 - nu * nu);
  const D = [c, c * nu, 0, c * nu, c, 0, 0, 0, (c * (1 - nu)) / 2];
  const xi = [-1, 1, 1, -1];
  const eta = [-1, -1, 1, 1];
  const g = 1 / Math.sqrt(3);
  const K = new Float64Array(64);
  const B = new Float64Array(24);
  for (const gx of [-g, g]) {
    for (const gy of [-g, g]) {
      B.fill(0);
      for (let a = 0; a < 4; a++) {
        // d/dx = 2 d/dξ on a unit square; detJ = 1/4
        const dx = (xi[a] * (1 + eta[a] * gy)) / 2;
        const dy = (eta[a] * (1 + xi[a] * gx)) / 2;
        B[0 * 8 + 2 * a] = dx;
        B[1 * 8 + 2 * a + 1] = dy;
        B[2 * 8 + 2 * a] = dy;
        B[2 * 8 + 2 * a + 1] = dx;
      }
      for (let p = 0; p < 8; p++) {
        for (let q = 0; q < 8; q++) {
          let s = 0;
          for (let u = 0; u < 3; u++) for (let v = 0; v < 3; v++) s += B[u * 8 + p] * D[u * 3 + v] * B[v * 8 + q];
          K[p * 8 + q] += s * 0.25;
        }
      }
    }
  }
  return K;
}

/** Plane-stress stiffness of an nx×ny grid of unit bilinear squares, left edge clamped ((nx)(ny+1)·2 dofs); clamp = false leaves it free. */
export function gridStiffnessQ4(nx: number, ny: number, clamp = true): CsrMatrix {
  const first = clamp ? 1 : 0;
  const perRow = nx + 1 - first;
  const dof = (i: number, j: number, c: number): number => (i < first ? -1 : (j * perRow + (i - first)) * 2 + c);
  const n = perRow * (ny + 1) * 2;
  const ne = nx * ny;
  const blockStart = new Int32Array(ne + 1);
  const blockDofs = new Int32Array(8 * ne);
  let b = 0;
  for (let ey = 0; ey < ny; ey++) {
    for (let ex = 0; ex < nx; ex++) {
      const nodes = [ex, ey, ex + 1, ey, ex + 1, ey + 1, ex, ey + 1];
      for (let a = 0; a < 4; a++) {
        blockDofs[8 * b + 2 * a] = dof(nodes[2 * a], nodes[2 * a + 1], 0);
        blockDofs[8 * b + 2 * a + 1] = dof(nodes[2 * a], nodes[2 * a + 1], 1);
      }
      b++;
      blockStart[b] = 8 * b;
    }
  }
  const A = matrixOnPattern(patternFromBlocks(n, blockStart, blockDofs));
  const map = assemblyMap(A, blockStart, blockDofs);
  const off = blockMapOffsets(blockStart);
  const Ke = q4Stiffness();
  for (let e = 0; e < ne; e++) {
    const o = off[e];
    for (let k = 0; k < 64; k++) {
      const t = map[o + k];
      if (t >= 0) A.values[t] += Ke[k];
    }
  }
  return A;
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const args = process.argv.slice(2);
  if (args[0] === '--grid' && args.length === 4) {
    const A = gridStiffnessQ4(Number(args[1]), Number(args[2]));
    writeMatrixMarket(A, args[3], `plane-stress bilinear grid ${args[1]}x${args[2]}, left edge clamped`);
    console.log(JSON.stringify({ file: args[3], n: A.n, nnz: A.colIdx.length }));
  } else if (args.length === 1) {
    console.log(JSON.stringify(benchMatrix(args[0])));
  } else {
    console.error('usage: bench-matrix FILE | bench-matrix --grid NX NY FILE');
    process.exit(2);
  }
}

/**
 * The square plate with an edge notch and a hole whose stiffness the factorization benches
 * (and the symbolic analysis's tests) use: cells of size h, relaxed `lloyd` times.
 */
export function plateCase(h: number, lloyd = 8, seed = 1): CaseModel {
  return parseCase(`
format: 1
title: bench plate
units: mm-N-MPa
thickness: 10
geometry:
  outline: [[0,0],[1000,0],[1000,1000],[0,1000]]
  holes: [{circle: {center: [600, 500], radius: 80}}]
  notches: [{from: [0, 500], to: [250, 500], width: 4}]
material: {E: 30000, nu: 0.2, ft: 3, GF: 0.1}
supports: [{along: [[0,0],[1000,0]], fix: y}, {at: [0,0], fix: x}]
loads: [{along: [[0,1000],[1000,1000]], direction: [0, 1]}]
control: {target: 0.05}
mesh: {size: ${h}, tipSize: ${h}, refineRadius: ${h}, lloyd: ${lloyd}, seed: ${seed}}
`, 'bench-plate.yaml');
}
