// The version of rupta, from the package.json beside the sources (src/) or the build (.build/src/).
import { existsSync, readFileSync } from 'node:fs';
import { createHash } from 'node:crypto';

function readVersion(): string {
  for (const rel of ['../package.json', '../../package.json']) {
    const url = new URL(rel, import.meta.url);
    if (!existsSync(url)) continue;
    const pkg = JSON.parse(readFileSync(url, 'utf8')) as { name?: string; version?: string };
    if (pkg.name === 'rupta' && pkg.version) return pkg.version;
  }
  return 'unknown';
}

export const VERSION = readVersion();

/** SHA-256 of a file's bytes or of a text, as hex. */
export const sha256 = (data: string | Uint8Array): string => createHash('sha256').update(data).digest('hex');
