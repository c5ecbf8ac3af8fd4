/**
 * Confidence intervals for a mean: Student t (parametric) and percentile bootstrap.
 */
import { quantileSorted, describe } from "./describe";
import { tCritical } from "./distributions";
import { mulberry32, randomInt } from "./random";
import { type SampleSummary, StatsInputError, assertLevel, assertSummary, finiteOrNull, finiteValues } from "./types";

export interface MeanConfidenceInterval {
  readonly n: number;
  readonly mean: number | null;
  /** Degrees of freedom n − 1; null for n < 2. */
  readonly df: number | null;
  /** Half-width t*·sd/√n; null for n < 2. */
  readonly marginOfError: number | null;
  readonly low: number | null;
  readonly high: number | null;
  readonly level: number;
  readonly warnings: readonly string[];
}

/**
 * Two-sided Student-t confidence interval of a mean from n, mean and sample SD:
 * mean ± t(1 − (1 − level)/2, n − 1)·sd/√n. Assumes independent values from a roughly normal
 * population (or n large enough for the central limit theorem). Units are those of the mean.
 */
export function meanConfidenceIntervalFromSummary(summary: SampleSummary, level = 0.95): MeanConfidenceInterval {
  assertSummary(summary, "summary");
  assertLevel(level);
  const warnings: string[] = [];
  const { n, mean, sd } = summary;
  if (n < 2) {
    warnings.push("a confidence interval needs at least 2 values");
    return { n, mean, df: null, marginOfError: null, low: null, high: null, level, warnings };
  }
  const df = n - 1;
  const margin = finiteOrNull((tCritical(level, df) * sd) / Math.sqrt(n), "marginOfError", warnings);
  return {
    n,
    mean,
    df,
    marginOfError: margin,
    low: margin === null ? null : finiteOrNull(mean - margin, "low", warnings),
    high: margin === null ? null : finiteOrNull(mean + margin, "high", warnings),
    level,
    warnings,
  };
}

/**
 * Two-sided Student-t confidence interval of the mean of `values` (see
 * meanConfidenceIntervalFromSummary). Non-finite values are ignored with a warning.
 */
export function meanConfidenceInterval(values: readonly number[], level = 0.95): MeanConfidenceInterval {
  assertLevel(level);
  const d = describe(values);
  if (d.mean === null || d.sd === null) {
    // describe() has already said why (no values, a single value, or an SD out of range).
    return { n: d.n, mean: d.mean, df: null, marginOfError: null, low: null, high: null, level, warnings: d.warnings };
  }
  const result = meanConfidenceIntervalFromSummary({ n: d.n, mean: d.mean, sd: d.sd }, level);
  return { ...result, warnings: [...d.warnings, ...result.warnings] };
}

export interface BootstrapOptions {
  /** Number of resamples; at least 100, default 2000 (≥ 1000 is common practice). */
  readonly resamples?: number;
  /** Confidence level, default 0.95. */
  readonly level?: number;
  /** Seed of the mulberry32 stream; required so that results are reproducible. */
  readonly seed: number;
}

export interface BootstrapInterval {
  readonly n: number;
  /** Mean of the original sample. */
  readonly estimate: number | null;
  readonly low: number | null;
  readonly high: number | null;
  readonly level: number;
  readonly resamples: number;
  readonly seed: number;
  readonly warnings: readonly string[];
}

/**
 * Percentile bootstrap confidence interval of the mean (Efron & Tibshirani 1993, ch. 13): draw
 * `resamples` samples of size n with replacement, take the (1 − level)/2 and 1 − (1 − level)/2
 * type-7 quantiles of the resampled means. Deterministic for a given seed (mulberry32).
 * Non-finite values are ignored with a warning; needs at least 2 finite values.
 */
export function bootstrapMeanCi(values: readonly number[], options: BootstrapOptions): BootstrapInterval {
  const resamples = options.resamples ?? 2000;
  const level = options.level ?? 0.95;
  const seed = options.seed;
  assertLevel(level);
  if (!Number.isInteger(resamples) || resamples < 100) {
    throw new StatsInputError(`resamples must be an integer ≥ 100, got ${resamples}`);
  }
  if (!Number.isFinite(seed)) throw new StatsInputError(`seed must be a finite number, got ${seed}`);

  const warnings: string[] = [];
  const { finite, dropped } = finiteValues(values);
  if (dropped > 0) warnings.push(`${dropped} non-finite value(s) ignored`);
  const n = finite.length;
  const base = { n, level, resamples, seed, warnings };
  if (n < 2) {
    warnings.push("a bootstrap interval needs at least 2 values");
    return { ...base, estimate: n === 1 ? (finite[0] ?? null) : null, low: null, high: null };
  }

  const estimate = describe(finite).mean;
  const random = mulberry32(seed);
  const means: number[] = new Array<number>(resamples);
  for (let r = 0; r < resamples; r++) {
    let sum = 0;
    // Dividing each draw by n keeps the running sum within range for huge inputs.
    for (let i = 0; i < n; i++) sum += (finite[randomInt(random, n)] ?? 0) / n;
    means[r] = sum;
  }
  means.sort((x, y) => x - y);
  const tail = (1 - level) / 2;
  const low = quantileSorted(means, tail);
  const high = quantileSorted(means, 1 - tail);
  return {
    ...base,
    estimate,
    low: low === null ? null : finiteOrNull(low, "low", warnings),
    high: high === null ? null : finiteOrNull(high, "high", warnings),
  };
}
