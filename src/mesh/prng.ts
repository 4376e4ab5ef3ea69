// Small seeded generator (mulberry32): the only source of randomness in meshing.

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
