/**
 * Seeded random numbers for the demo scenario: small, fast and the same on every machine, so that a seed
 * always gives the same site (the demo's idempotency rests on it: same epochs, same content hashes).
 *
 * - Uniform: mulberry32 (Tommy Ettinger, 2017; public-domain 32-bit generator), period 2³², ample for
 *   the ~10⁵ draws of one scenario.
 * - Normal: Box-Muller transform (Box & Muller 1958, "A note on the generation of random normal
 *   deviates", Ann. Math. Statist. 29(2)), both deviates of each pair used.
 */

export interface Random {
  /** Uniform in [0, 1). */
  uniform(): number;
  /** Standard normal N(0, 1). */
  normal(): number;
}

/** mulberry32: one 32-bit state word, returns floats in [0, 1) with 32 bits of resolution. */
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

export function createRandom(seed: number): Random {
  if (!Number.isInteger(seed)) throw new RangeError(`createRandom: seed must be an integer, got ${seed}`);
  const next = mulberry32(seed);
  let spare: number | null = null;
  return {
    uniform: next,
    normal(): number {
      if (spare !== null) {
        const s = spare;
        spare = null;
        return s;
      }
      // 1 − u keeps the logarithm's argument in (0, 1].
      const r = Math.sqrt(-2 * Math.log(1 - next()));
      const theta = 2 * Math.PI * next();
      spare = r * Math.sin(theta);
      return r * Math.cos(theta);
    },
  };
}
