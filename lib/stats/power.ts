/**
 * Minimum detectable difference for planned or completed comparisons of means.
 */
import { normalQuantile } from "./distributions";
import { type Alternative, StatsInputError, assertAlternative, assertLevel } from "./types";

export interface MinimumDetectableDifferenceInput {
  /** Population SD assumed common to both groups, in the units of the measured quantity. */
  readonly sd: number;
  /** Sample size of the (first) group. */
  readonly nA: number;
  /** Sample size of the second group; omit for a one-sample comparison against a fixed value. */
  readonly nB?: number;
  /** Significance level, default 0.05. */
  readonly alpha?: number;
  /** Desired power 1 − β, default 0.8. */
  readonly power?: number;
  readonly alternative?: Alternative;
}

export interface MinimumDetectableDifference {
  /** Smallest true difference of means detectable with the requested power, in units of `sd`. */
  readonly difference: number;
  /** Standard error of the (difference of) mean(s): sd·√(1/nA) or sd·√(1/nA + 1/nB). */
  readonly standardError: number;
  readonly zAlpha: number;
  readonly zPower: number;
  readonly design: "one-sample" | "two-sample";
  readonly method: "normal-approximation";
}

/**
 * Minimum detectable difference Δ = (z_{1−α/2} + z_{power})·SE for a two-sided test, or
 * (z_{1−α} + z_{power})·SE for a one-sided one, with SE = sd/√nA (one-sample) or
 * sd·√(1/nA + 1/nB) (two-sample, equal SD). Normal approximation to the t test: it slightly
 * understates Δ for small n (the t quantiles are larger). Standard sample-size formula, e.g.
 * Chow, Shao & Wang, Sample Size Calculations in Clinical Research, ch. 3.
 */
export function minimumDetectableDifference(input: MinimumDetectableDifferenceInput): MinimumDetectableDifference {
  const { sd, nA, nB } = input;
  const alpha = input.alpha ?? 0.05;
  const power = input.power ?? 0.8;
  const alternative = input.alternative ?? "two-sided";
  if (!(Number.isFinite(sd) && sd > 0)) throw new StatsInputError(`sd must be finite and > 0, got ${sd}`);
  if (!(Number.isFinite(nA) && nA >= 1)) throw new StatsInputError(`nA must be ≥ 1, got ${nA}`);
  if (nB !== undefined && !(Number.isFinite(nB) && nB >= 1)) {
    throw new StatsInputError(`nB must be ≥ 1 when given, got ${nB}`);
  }
  assertLevel(alpha, "alpha");
  assertLevel(power, "power");
  assertAlternative(alternative);

  const zAlpha = normalQuantile(alternative === "two-sided" ? 1 - alpha / 2 : 1 - alpha);
  const zPower = normalQuantile(power);
  const standardError = nB === undefined ? sd * Math.sqrt(1 / nA) : sd * Math.sqrt(1 / nA + 1 / nB);
  const difference = (zAlpha + zPower) * standardError;
  if (!Number.isFinite(difference)) {
    throw new StatsInputError(`sd ${sd} is too large for a finite detectable difference`);
  }
  return {
    difference,
    standardError,
    zAlpha,
    zPower,
    design: nB === undefined ? "one-sample" : "two-sample",
    method: "normal-approximation",
  };
}
