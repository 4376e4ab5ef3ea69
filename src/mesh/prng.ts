// Small seeded generator (mulberry32): the only source of randomness (meshes, study draws,
// strength fields), and normal deviates drawn from it.

/** Uniform numbers in [0, 1), reproducible from the seed. */
export function prng(seed: number): () => number {
  // fold non-integer seeds into 32 bits so every seed gives its own stream
  let a = (Math.floor(seed) ^ Math.floor((seed % 1) * 0x9e3779b9)) >>> 0;
  a = (a + 0x6d2b79f5) >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) | 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal draws by the Box–Muller transform, from a uniform stream. */
export function normalStream(uniform: () => number): () => number {
  let spare: number | null = null;
  return () => {
    if (spare !== null) { const s = spare; spare = null; return s; }
    const u1 = 1 - uniform(), u2 = uniform(); // u1 in (0, 1]
    const r = Math.sqrt(-2 * Math.log(u1)), a = 2 * Math.PI * u2;
    spare = r * Math.sin(a);
    return r * Math.cos(a);
  };
}
