// Dotted keys into case data (material.ft, mesh.seed, geometry.notches.0.to): read and write.

function parts(key: string): string[] { return key.split('.').filter((p) => p !== ''); }

export function getPath(data: unknown, key: string): unknown {
  let v: unknown = data;
  for (const p of parts(key)) {
    if (v === null || typeof v !== 'object') return undefined;
    v = (v as Record<string, unknown>)[p];
  }
  return v;
}

/** Sets a dotted key, making maps on the way (list items by index). */
export function setPath(data: Record<string, unknown>, key: string, value: unknown): void {
  const ps = parts(key);
  let o: Record<string, unknown> = data;
  for (let i = 0; i < ps.length - 1; i++) {
    const next = o[ps[i]!];
    if (next === null || typeof next !== 'object') o[ps[i]!] = {};
    o = o[ps[i]!] as Record<string, unknown>;
  }
  o[ps[ps.length - 1]!] = value;
}
