/**
 * Student t and standard normal distribution functions, delegated to jstat (no hand-written
 * special functions). `df = Infinity` means the normal limit.
 */
import jStat from "jstat";
import { type Alternative, StatsInputError, assertLevel } from "./types";

function assertDf(df: number): void {
  if (!(df > 0)) throw new StatsInputError(`degrees of freedom must be > 0, got ${df}`);
}

const T_CDF_LIMIT = 1e150;

/** P(T ≤ x) for Student's t with `df` degrees of freedom (normal when df is Infinity). */
export function tCdf(x: number, df: number): number {
  assertDf(df);
  if (df === Infinity) return normalCdf(x);
  // jstat squares x internally; beyond ~1e154 that overflows to NaN. At |x| = 1e150 the tail is
  // already below 1e-150 for any df ≥ 1, so clamping changes nothing that matters.
  const clamped = Math.max(-T_CDF_LIMIT, Math.min(T_CDF_LIMIT, x));
  return jStat.studentt.cdf(clamped, df);
}

/** Quantile of Student's t: the x with P(T ≤ x) = p (normal when df is Infinity). */
export function tQuantile(p: number, df: number): number {
  assertDf(df);
  if (!(p > 0 && p < 1)) throw new StatsInputError(`probability must be in (0, 1), got ${p}`);
  return df === Infinity ? jStat.normal.inv(p, 0, 1) : jStat.studentt.inv(p, df);
}

/**
 * Two-sided critical value t* with P(|T| ≤ t*) = level, e.g. tCritical(0.95, 10) ≈ 2.228.
 * This is the multiplier of the standard error in a two-sided confidence interval.
 */
export function tCritical(level: number, df: number): number {
  assertLevel(level);
  return tQuantile(1 - (1 - level) / 2, df);
}

/**
 * Standard normal P(Z ≤ z). Beyond |z| = 3 the smaller tail comes from `normalUpperTail`, because jstat
 * computes 0.5·(1 + erf) and its erfc loses everything below about 1e-17 (P(Z ≤ −9) came out as 0).
 */
export function normalCdf(z: number): number {
  if (Number.isNaN(z)) return Number.NaN;
  if (z < -NORMAL_TAIL_FROM) return normalUpperTail(-z);
  if (z > NORMAL_TAIL_FROM) return 1 - normalUpperTail(z);
  return jStat.normal.cdf(z, 0, 1);
}

const NORMAL_TAIL_FROM = 3;

/**
 * Upper tail Q(x) = P(Z > x) of the standard normal for x ≥ 3, without cancellation: Laplace's continued
 * fraction Q(x) = φ(x) / (x + 1/(x + 2/(x + 3/(x + …)))) (Abramowitz & Stegun 1964, eq. 26.2.14),
 * evaluated by the modified Lentz method (Press et al., Numerical Recipes, 3rd ed., §5.2). It converges in
 * a few dozen terms for x ≥ 3 and keeps full relative precision down to the smallest doubles.
 */
export function normalUpperTail(x: number): number {
  if (!(x >= NORMAL_TAIL_FROM)) return 1 - jStat.normal.cdf(x, 0, 1);
  const tiny = 1e-300;
  let fraction = x;
  let c = x;
  let d = 0;
  for (let k = 1; k < 1000; k++) {
    d = x + k * d;
    if (d === 0) d = tiny;
    c = x + k / c;
    if (c === 0) c = tiny;
    d = 1 / d;
    const delta = c * d;
    fraction *= delta;
    if (Math.abs(delta - 1) < 1e-16) break;
  }
  // exp(−x²/2) underflows past x ≈ 38.6; the tail is then below the smallest double anyway.
  return Math.exp(-0.5 * x * x) / Math.sqrt(2 * Math.PI) / fraction;
}

/** Standard normal quantile: the z with P(Z ≤ z) = p. */
export function normalQuantile(p: number): number {
  if (!(p > 0 && p < 1)) throw new StatsInputError(`probability must be in (0, 1), got ${p}`);
  return jStat.normal.inv(p, 0, 1);
}

/**
 * p-value of a t statistic for the given alternative. Lower tails are computed directly (never as
 * 1 − cdf) so that very small p-values keep their precision.
 */
export function tTestPValue(t: number, df: number, alternative: Alternative): number {
  const p =
    alternative === "greater"
      ? tCdf(-t, df)
      : alternative === "less"
        ? tCdf(t, df)
        : 2 * tCdf(-Math.abs(t), df);
  return Math.min(1, Math.max(0, p));
}
