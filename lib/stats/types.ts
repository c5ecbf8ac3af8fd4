/** Shared result shapes and input checks for lib/stats. */

/**
 * Direction of the alternative hypothesis, as in R and SciPy: "greater" means the first sample
 * (or the sample mean) is larger than the comparison under the alternative.
 */
export type Alternative = "two-sided" | "greater" | "less";

export const ALTERNATIVES: readonly Alternative[] = ["two-sided", "greater", "less"];

/**
 * A confidence interval. A one-sided interval has one open end, returned as null (never ±Infinity);
 * both ends are null when the interval is undefined (too few values, zero spread...).
 */
export interface Interval {
  readonly low: number | null;
  readonly high: number | null;
  /** Confidence level as a fraction, e.g. 0.95. */
  readonly level: number;
}

/** Summary statistics of one sample, for tests computed from published summaries. */
export interface SampleSummary {
  readonly n: number;
  readonly mean: number;
  /** Sample standard deviation (n − 1 denominator). */
  readonly sd: number;
}

/** Thrown for arguments that are wrong whatever the data (a level of 1.2, a negative n...). */
export class StatsInputError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "StatsInputError";
  }
}

/** Finite values of `values` (input untouched) and how many non-finite ones were dropped. */
export function finiteValues(values: readonly number[]): { finite: number[]; dropped: number } {
  const finite = values.filter((v) => Number.isFinite(v));
  return { finite, dropped: values.length - finite.length };
}

/** `value` if finite, else null with a warning pushed onto `warnings`. */
export function finiteOrNull(value: number, label: string, warnings: string[]): number | null {
  if (Number.isFinite(value)) return value === 0 ? 0 : value; // also folds −0 into 0
  warnings.push(`${label} is not representable as a finite number; returned null`);
  return null;
}

export function assertLevel(level: number, name = "level"): void {
  if (!(Number.isFinite(level) && level > 0 && level < 1)) {
    throw new StatsInputError(`${name} must be strictly between 0 and 1, got ${level}`);
  }
}

export function assertAlternative(alternative: string): asserts alternative is Alternative {
  if (!ALTERNATIVES.includes(alternative as Alternative)) {
    throw new StatsInputError(`alternative must be one of ${ALTERNATIVES.join(", ")}, got ${alternative}`);
  }
}

export function assertSummary(summary: SampleSummary, name: string): void {
  const { n, mean, sd } = summary;
  if (!Number.isInteger(n) || n < 1) throw new StatsInputError(`${name}.n must be a positive integer, got ${n}`);
  if (!Number.isFinite(mean)) throw new StatsInputError(`${name}.mean must be finite, got ${mean}`);
  if (!(Number.isFinite(sd) && sd >= 0)) throw new StatsInputError(`${name}.sd must be finite and ≥ 0, got ${sd}`);
}
