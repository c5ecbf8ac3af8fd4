/**
 * Seeded pseudo-random numbers for reproducible resampling and test data.
 *
 * lib/stats is pure, so nothing here reads the clock or an unseeded generator: every stream starts from an
 * explicit integer seed and the same seed always gives the same sequence on every platform.
 */

/** A source of uniform numbers in [0, 1). */
export type RandomSource = () => number;

/**
 * mulberry32: a 32-bit-state generator (public-domain algorithm by Tommy Ettinger).
 * Fast and statistically adequate for bootstrap resampling and synthetic test data; not for
 * cryptography. The seed is reduced to an unsigned 32-bit integer (fractions are truncated).
 *
 * @returns a function yielding uniform numbers in [0, 1) with 2^-32 resolution.
 */
export function mulberry32(seed: number): RandomSource {
  if (!Number.isFinite(seed)) {
    throw new RangeError(`mulberry32: seed must be a finite number, got ${String(seed)}`);
  }
  let state = Math.trunc(seed) >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = Math.imul(state ^ (state >>> 15), state | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Uniform integer in [0, maxExclusive) drawn from `random`. */
export function randomInt(random: RandomSource, maxExclusive: number): number {
  if (!Number.isInteger(maxExclusive) || maxExclusive < 1) {
    throw new RangeError(`randomInt: maxExclusive must be a positive integer, got ${maxExclusive}`);
  }
  return Math.min(maxExclusive - 1, Math.floor(random() * maxExclusive));
}

/**
 * Normal deviate N(mean, sd²) by the Box–Muller transform (one of the pair is used, so each call
 * consumes exactly two uniforms and sequences stay easy to reason about).
 */
export function randomNormal(random: RandomSource, mean = 0, sd = 1): number {
  // 1 − u keeps the logarithm's argument in (0, 1].
  const u1 = 1 - random();
  const u2 = random();
  return mean + sd * Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
}
