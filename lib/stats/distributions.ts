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
  if (df === Infinity) return jStat.normal.cdf(x, 0, 1);
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

/** Standard normal P(Z ≤ z). */
export function normalCdf(z: number): number {
  return jStat.normal.cdf(z, 0, 1);
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
