/**
 * Small seeded pseudo-random source for the demo generator.
 *
 * Uniforms from the project's one generator (mulberry32 in lib/stats/random.ts) and the
 * Box–Muller transform for normal deviates. Deterministic across platforms because it
 * only uses 32-bit integer arithmetic and Math.log/sqrt/cos.
 */
import { mulberry32 } from "../lib/stats/random.ts";

export interface Prng {
  /** Uniform in [0, 1). */
  next(): number;
  /** Uniform in [lo, hi). */
  uniform(lo: number, hi: number): number;
  /** Integer uniform in [lo, hi] (both inclusive). */
  int(lo: number, hi: number): number;
  /** Normal deviate with the given mean and standard deviation. */
  normal(mean: number, sd: number): number;
  /** True with probability p. */
  chance(p: number): boolean;
  /** One element of a non-empty list. */
  pick<T>(items: readonly T[]): T;
  /** Independent stream derived from this stream's seed and a label, unaffected by draws made here. */
  fork(label: number): Prng;
}

/** Mixes two 32-bit integers into one well-spread 32-bit seed (a murmur3-style finaliser). */
export function mixSeed(a: number, b: number): number {
  let h = (Math.imul(a ^ 0x9e3779b9, 0x85ebca6b) ^ Math.imul(b + 0x7f4a7c15, 0xc2b2ae35)) >>> 0;
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return h >>> 0;
}

export function createPrng(seed: number): Prng {
  const rootSeed = seed >>> 0;
  let spareNormal: number | null = null;

  const next = mulberry32(rootSeed);

  const standardNormal = (): number => {
    if (spareNormal !== null) {
      const value = spareNormal;
      spareNormal = null;
      return value;
    }
    // 1 - next() lies in (0, 1], so the logarithm is finite.
    const u1 = 1 - next();
    const u2 = next();
    const radius = Math.sqrt(-2 * Math.log(u1));
    spareNormal = radius * Math.sin(2 * Math.PI * u2);
    return radius * Math.cos(2 * Math.PI * u2);
  };

  return {
    next,
    uniform: (lo, hi) => lo + (hi - lo) * next(),
    int: (lo, hi) => lo + Math.floor(next() * (hi - lo + 1)),
    normal: (mean, sd) => mean + sd * standardNormal(),
    chance: (p) => next() < p,
    pick: <T>(items: readonly T[]): T => {
      const item = items[Math.floor(next() * items.length)];
      if (item === undefined) throw new Error("pick() needs a non-empty list");
      return item;
    },
    fork: (label) => createPrng(mixSeed(rootSeed, label)),
  };
}
