// mulberry32, a 32-bit-state PRNG by Tommy Ettinger (2017, public domain; posted as a gist and widely copied),
// with normal deviates by the Box & Muller (1958) transform, Ann. Math. Stat. 29(2):610–611.

/** Seeded uniform generator on [0, 1). Same seed → same sequence on every platform (32-bit integer ops only). */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Seeded standard normal deviates (Box–Muller; the second deviate of each pair is kept for the next call). */
export function normalDeviates(seed: number): () => number {
  const u = mulberry32(seed);
  let spare = NaN;
  return () => {
    if (spare === spare) { const s = spare; spare = NaN; return s; }
    const u1 = 1 - u(); // (0, 1]: keeps the logarithm finite
    const r = Math.sqrt(-2 * Math.log(u1)), th = 2 * Math.PI * u();
    spare = r * Math.sin(th);
    return r * Math.cos(th);
  };
}
