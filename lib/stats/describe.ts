/**
 * Descriptive statistics of one sample.
 */
import { tCritical } from "./distributions";
import { finiteOrNull, finiteValues } from "./types";

export interface Description {
  /** Number of finite values used. */
  readonly n: number;
  /** How many NaN / ±Infinity inputs were ignored. */
  readonly nonFiniteDropped: number;
  readonly mean: number | null;
  /** Sample standard deviation (n − 1 denominator); null for n < 2. */
  readonly sd: number | null;
  /** Standard error of the mean, sd/√n; null for n < 2. */
  readonly sem: number | null;
  readonly median: number | null;
  /** First quartile, type-7 (linear interpolation) quantile. */
  readonly q1: number | null;
  /** Third quartile, type-7 (linear interpolation) quantile. */
  readonly q3: number | null;
  readonly iqr: number | null;
  readonly min: number | null;
  readonly max: number | null;
  /** Two-sided 95 % t confidence interval for the mean; null for n < 2. */
  readonly ci95Low: number | null;
  readonly ci95High: number | null;
  readonly warnings: readonly string[];
}

/**
 * Quantile of already sorted finite values by linear interpolation between order statistics,
 * "type 7" in Hyndman & Fan (1996): h = (n − 1)p, Q = x[⌊h⌋] + (h − ⌊h⌋)(x[⌊h⌋+1] − x[⌊h⌋]).
 * It is the default of R's quantile() and of numpy.quantile. Returns null for an empty array.
 */
export function quantileSorted(sorted: readonly number[], p: number): number | null {
  if (!(p >= 0 && p <= 1)) throw new RangeError(`quantile probability must be in [0, 1], got ${p}`);
  const n = sorted.length;
  if (n === 0) return null;
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  const fraction = h - lo;
  const xLo = sorted[lo];
  if (xLo === undefined) return null;
  const xHi = sorted[Math.min(lo + 1, n - 1)] ?? xLo;
  if (fraction === 0 || xHi === xLo) return xLo;
  const gap = xHi - xLo;
  // The weighted form avoids overflow when the gap between two huge values is not representable.
  const q = Number.isFinite(gap) ? xLo + fraction * gap : xLo * (1 - fraction) + xHi * fraction;
  return Math.min(xHi, Math.max(xLo, q));
}

/** Type-7 quantile (see quantileSorted) of unsorted values; non-finite values are ignored. */
export function quantile(values: readonly number[], p: number): number | null {
  const sorted = finiteValues(values).finite.sort((x, y) => x - y);
  return quantileSorted(sorted, p);
}

/**
 * Mean and sum of squared deviations, computed on values scaled by a power of two (exact), so that
 * neither huge values overflow nor tiny ones underflow when squared.
 */
function scaledMoments(values: readonly number[]): { mean: number; sumSquares: number; scale: number } {
  let maxAbs = 0;
  for (const v of values) maxAbs = Math.max(maxAbs, Math.abs(v));
  if (maxAbs === 0) return { mean: 0, sumSquares: 0, scale: 1 };
  const exponent = Math.min(1023, Math.max(-1022, Math.ceil(Math.log2(maxAbs))));
  const scale = 2 ** exponent;
  const n = values.length;
  let sum = 0;
  for (const v of values) sum += v / scale;
  const scaledMean = sum / n;
  let sumSquares = 0;
  for (const v of values) sumSquares += (v / scale - scaledMean) ** 2;
  return { mean: scaledMean, sumSquares, scale };
}

/**
 * Descriptive statistics: n, mean, sample SD (n − 1), standard error, median and quartiles
 * (type 7, linear interpolation, as R's and numpy's defaults), IQR, range and the two-sided 95 %
 * Student-t confidence interval of the mean (mean ± t(0.975, n − 1)·sd/√n).
 *
 * Non-finite inputs (NaN, ±Infinity) are ignored and counted in `nonFiniteDropped` with a warning.
 * Fields that are undefined for the sample size are null: everything for n = 0; sd, sem and the CI
 * for n = 1. Units are those of the input.
 */
export function describe(values: readonly number[]): Description {
  const warnings: string[] = [];
  const { finite, dropped } = finiteValues(values);
  if (dropped > 0) warnings.push(`${dropped} non-finite value(s) ignored`);
  const n = finite.length;
  const empty: Description = {
    n,
    nonFiniteDropped: dropped,
    mean: null,
    sd: null,
    sem: null,
    median: null,
    q1: null,
    q3: null,
    iqr: null,
    min: null,
    max: null,
    ci95Low: null,
    ci95High: null,
    warnings,
  };
  if (n === 0) {
    warnings.push("no finite values");
    return empty;
  }

  const sorted = [...finite].sort((x, y) => x - y);
  const { mean: scaledMean, sumSquares, scale } = scaledMoments(sorted);
  // Rounding can push the mean of near-equal values a hair outside their range; clamp it back.
  const mean = Math.min(sorted[n - 1] ?? 0, Math.max(sorted[0] ?? 0, scaledMean * scale));
  const q1 = quantileSorted(sorted, 0.25);
  const q3 = quantileSorted(sorted, 0.75);

  let sd: number | null = null;
  let sem: number | null = null;
  let ci95Low: number | null = null;
  let ci95High: number | null = null;
  if (n >= 2) {
    const scaledSd = Math.sqrt(sumSquares / (n - 1));
    sd = finiteOrNull(scaledSd * scale, "sd", warnings);
    const scaledSem = scaledSd / Math.sqrt(n);
    sem = finiteOrNull(scaledSem * scale, "sem", warnings);
    const margin = tCritical(0.95, n - 1) * scaledSem;
    ci95Low = finiteOrNull((scaledMean - margin) * scale, "ci95Low", warnings);
    ci95High = finiteOrNull((scaledMean + margin) * scale, "ci95High", warnings);
  } else {
    warnings.push("sd, sem and confidence interval need at least 2 values");
  }

  return {
    ...empty,
    mean: finiteOrNull(mean, "mean", warnings),
    sd,
    sem,
    median: quantileSorted(sorted, 0.5),
    q1,
    q3,
    iqr: q1 === null || q3 === null ? null : finiteOrNull(q3 - q1, "iqr", warnings),
    min: sorted[0] ?? null,
    max: sorted[n - 1] ?? null,
    ci95Low,
    ci95High,
  };
}
