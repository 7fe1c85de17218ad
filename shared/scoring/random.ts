/**
 * mulberry32 (Tommy Ettinger, 2017; public domain): a small, fast 32-bit PRNG whose whole state is one
 * 32-bit word, so a seed reproduces a stream exactly on every machine and in the browser. Returns
 * numbers in [0, 1) with 2^-32 resolution. Used by the demo data and by the rank-interval sampler.
 */
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
