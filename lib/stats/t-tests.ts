/**
 * Student t tests: one-sample, two-sample pooled (equal variances) and Welch (unequal variances),
 * from raw values or from published summary statistics (n, mean, SD).
 */
import { describe } from "./describe";
import { tCritical, tQuantile, tTestPValue } from "./distributions";
import {
  type Alternative,
  type Interval,
  type SampleSummary,
  assertAlternative,
  StatsInputError,
  assertSummary,
  finiteOrNull,
} from "./types";

export interface OneSampleTTestResult {
  readonly n: number;
  /** Sample mean. */
  readonly estimate: number | null;
  /** Hypothesised mean under the null hypothesis. */
  readonly mu0: number;
  readonly standardError: number | null;
  readonly t: number | null;
  readonly df: number | null;
  readonly p: number | null;
  readonly alternative: Alternative;
  /** 95 % interval matching the alternative: one-sided tests leave one end open (null). */
  readonly ci95: Interval;
  readonly warnings: readonly string[];
}

export interface TwoSampleTTestResult {
  readonly method: "welch" | "pooled";
  readonly nA: number;
  readonly nB: number;
  readonly meanA: number | null;
  readonly meanB: number | null;
  /** meanA − meanB. */
  readonly meanDifference: number | null;
  readonly standardError: number | null;
  readonly t: number | null;
  readonly df: number | null;
  readonly p: number | null;
  readonly alternative: Alternative;
  /** 95 % interval for meanA − meanB matching the alternative (open end = null). */
  readonly ci95: Interval;
  readonly warnings: readonly string[];
}

const NO_INTERVAL: Interval = { low: null, high: null, level: 0.95 };

/**
 * t statistic, p-value and 95 % interval for an estimate with standard error `se` and `df` degrees
 * of freedom. One-sided intervals use the one-sided 95 % quantile, as R's t.test does.
 */
function tInference(
  estimate: number,
  nullValue: number,
  se: number,
  df: number,
  alternative: Alternative,
  warnings: string[],
): { t: number | null; p: number | null; ci95: Interval } {
  if (!(se > 0) || !Number.isFinite(se)) {
    warnings.push("standard error is zero or not finite (no spread in the data); t and p are undefined");
    return { t: null, p: null, ci95: NO_INTERVAL };
  }
  const t = finiteOrNull((estimate - nullValue) / se, "t", warnings);
  const p = t === null ? null : tTestPValue(t, df, alternative);
  let ci95: Interval;
  if (alternative === "two-sided") {
    const margin = tCritical(0.95, df) * se;
    ci95 = {
      low: finiteOrNull(estimate - margin, "ci95 low", warnings),
      high: finiteOrNull(estimate + margin, "ci95 high", warnings),
      level: 0.95,
    };
  } else {
    const margin = tQuantile(0.95, df) * se;
    ci95 =
      alternative === "greater"
        ? { low: finiteOrNull(estimate - margin, "ci95 low", warnings), high: null, level: 0.95 }
        : { low: null, high: finiteOrNull(estimate + margin, "ci95 high", warnings), level: 0.95 };
  }
  return { t, p, ci95 };
}

/**
 * One-sample t test of H0: mean = mu0 from summary statistics. t = (mean − mu0)/(sd/√n),
 * df = n − 1 (Student 1908; NIST/SEMATECH e-Handbook §1.3.5.2). Assumes independent, roughly
 * normal values. Needs n ≥ 2 and sd > 0, else t and p are null with a warning.
 */
export function oneSampleTTestFromSummary(
  summary: SampleSummary,
  mu0: number,
  alternative: Alternative = "two-sided",
): OneSampleTTestResult {
  assertSummary(summary, "summary");
  assertAlternative(alternative);
  const warnings: string[] = [];
  const { n, mean, sd } = summary;
  const base = { n, estimate: mean, mu0, alternative, warnings };
  if (n < 2) {
    warnings.push("a t test needs at least 2 values");
    return { ...base, standardError: null, t: null, df: null, p: null, ci95: NO_INTERVAL };
  }
  const df = n - 1;
  const se = sd / Math.sqrt(n);
  const inference = tInference(mean, mu0, se, df, alternative, warnings);
  return { ...base, standardError: finiteOrNull(se, "standardError", warnings), df, ...inference };
}

/**
 * One-sample t test of H0: mean = mu0 on raw values (see oneSampleTTestFromSummary).
 * Non-finite values are ignored with a warning. Units of mu0 are those of the values.
 */
export function oneSampleTTest(
  values: readonly number[],
  mu0: number,
  alternative: Alternative = "two-sided",
): OneSampleTTestResult {
  assertAlternative(alternative);
  const d = describe(values);
  if (d.mean === null || d.sd === null) {
    return {
      n: d.n,
      estimate: d.mean,
      mu0,
      standardError: null,
      t: null,
      df: null,
      p: null,
      alternative,
      ci95: NO_INTERVAL,
      warnings: [...d.warnings, "a t test needs at least 2 finite values with a finite SD"],
    };
  }
  const result = oneSampleTTestFromSummary({ n: d.n, mean: d.mean, sd: d.sd }, mu0, alternative);
  return { ...result, warnings: [...d.warnings, ...result.warnings] };
}

type TwoSampleMethod = TwoSampleTTestResult["method"];

function twoSampleFromSummary(
  method: TwoSampleMethod,
  a: SampleSummary,
  b: SampleSummary,
  alternative: Alternative,
): TwoSampleTTestResult {
  assertSummary(a, "a");
  assertSummary(b, "b");
  assertAlternative(alternative);
  const warnings: string[] = [];
  const base = {
    method,
    nA: a.n,
    nB: b.n,
    meanA: a.mean,
    meanB: b.mean,
    meanDifference: finiteOrNull(a.mean - b.mean, "meanDifference", warnings),
    alternative,
    warnings,
  };
  if (a.n < 2 || b.n < 2 || base.meanDifference === null) {
    if (a.n < 2 || b.n < 2) warnings.push("a two-sample t test needs at least 2 values in each group");
    return { ...base, standardError: null, t: null, df: null, p: null, ci95: NO_INTERVAL };
  }
  const varA = a.sd ** 2 / a.n;
  const varB = b.sd ** 2 / b.n;
  let se: number;
  let df: number;
  if (method === "welch") {
    se = Math.sqrt(varA + varB);
    // Welch–Satterthwaite approximation.
    df = (varA + varB) ** 2 / (varA ** 2 / (a.n - 1) + varB ** 2 / (b.n - 1));
  } else {
    df = a.n + b.n - 2;
    const pooledVariance = ((a.n - 1) * a.sd ** 2 + (b.n - 1) * b.sd ** 2) / df;
    se = Math.sqrt(pooledVariance * (1 / a.n + 1 / b.n));
  }
  if (!Number.isFinite(df) || !(df > 0)) {
    warnings.push("degrees of freedom undefined (no spread in either group)");
    return { ...base, standardError: finiteOrNull(se, "standardError", warnings), t: null, df: null, p: null, ci95: NO_INTERVAL };
  }
  const inference = tInference(base.meanDifference, 0, se, df, alternative, warnings);
  return { ...base, standardError: finiteOrNull(se, "standardError", warnings), df, ...inference };
}

function twoSampleFromValues(
  method: TwoSampleMethod,
  a: readonly number[],
  b: readonly number[],
  alternative: Alternative,
): TwoSampleTTestResult {
  assertAlternative(alternative);
  const da = describe(a);
  const db = describe(b);
  const earlier = [...da.warnings.map((w) => `a: ${w}`), ...db.warnings.map((w) => `b: ${w}`)];
  if (da.mean === null || da.sd === null || db.mean === null || db.sd === null) {
    return {
      method,
      nA: da.n,
      nB: db.n,
      meanA: da.mean,
      meanB: db.mean,
      meanDifference: null,
      standardError: null,
      t: null,
      df: null,
      p: null,
      alternative,
      ci95: NO_INTERVAL,
      warnings: [...earlier, "a two-sample t test needs at least 2 finite values in each group"],
    };
  }
  const result = twoSampleFromSummary(
    method,
    { n: da.n, mean: da.mean, sd: da.sd },
    { n: db.n, mean: db.mean, sd: db.sd },
    alternative,
  );
  return { ...result, warnings: [...earlier, ...result.warnings] };
}

/**
 * Welch's unequal-variance t test of H0: meanA = meanB from summaries (Welch 1947):
 * t = (meanA − meanB)/√(sA²/nA + sB²/nB), df by Welch–Satterthwaite. NIST/SEMATECH e-Handbook
 * §1.3.5.3. "greater" means meanA > meanB under the alternative.
 */
export function welchTTestFromSummary(
  a: SampleSummary,
  b: SampleSummary,
  alternative: Alternative = "two-sided",
): TwoSampleTTestResult {
  return twoSampleFromSummary("welch", a, b, alternative);
}

/** Welch's t test on raw values (see welchTTestFromSummary); non-finite values are ignored. */
export function welchTTest(
  a: readonly number[],
  b: readonly number[],
  alternative: Alternative = "two-sided",
): TwoSampleTTestResult {
  return twoSampleFromValues("welch", a, b, alternative);
}

/**
 * Student's pooled-variance two-sample t test from summaries: assumes equal population variances,
 * sp² = ((nA−1)sA² + (nB−1)sB²)/(nA+nB−2), t = (meanA − meanB)/(sp√(1/nA + 1/nB)), df = nA+nB−2.
 * NIST/SEMATECH e-Handbook §1.3.5.3. Prefer Welch unless equal variances are justified.
 */
export function pooledTTestFromSummary(
  a: SampleSummary,
  b: SampleSummary,
  alternative: Alternative = "two-sided",
): TwoSampleTTestResult {
  return twoSampleFromSummary("pooled", a, b, alternative);
}

/** Pooled-variance t test on raw values (see pooledTTestFromSummary). */
export function pooledTTest(
  a: readonly number[],
  b: readonly number[],
  alternative: Alternative = "two-sided",
): TwoSampleTTestResult {
  return twoSampleFromValues("pooled", a, b, alternative);
}

export interface EquivalenceTestResult {
  /** Lower and upper equivalence bounds on the estimate's scale (nullValue ∓ tolerance). */
  readonly lowerBound: number;
  readonly upperBound: number;
  /** t and one-sided p of H0: true value ≤ lowerBound (p = P(T ≥ tLower)). */
  readonly tLower: number;
  readonly pLower: number;
  /** t and one-sided p of H0: true value ≥ upperBound (p = P(T ≤ tUpper)). */
  readonly tUpper: number;
  readonly pUpper: number;
  /** The larger of the two one-sided p values: the TOST p value. */
  readonly p: number;
  /** True when both one-sided tests reject at `alpha`, i.e. the (1 − 2α) interval lies inside the bounds. */
  readonly equivalent: boolean;
  /** The (1 − 2α) two-sided interval of the estimate that matches the TOST decision. */
  readonly interval: Interval;
  /**
   * True when the (1 − 2α) interval lies wholly outside the bounds on one side: the data show the
   * true value differs from nullValue by more than the tolerance (the two one-sided tests turned around).
   */
  readonly beyondTolerance: boolean;
  readonly alpha: number;
}

/**
 * Two one-sided tests (TOST) of equivalence for an estimate with standard error `se` and `df`
 * degrees of freedom (Schuirmann 1987; Lakens 2017): H0 is |true − nullValue| ≥ tolerance,
 * rejected at `alpha` when both t_lower = (estimate − (nullValue − tolerance))/se exceeds
 * t(1−α, df) and t_upper = (estimate − (nullValue + tolerance))/se falls below −t(1−α, df);
 * equivalently, when the (1 − 2α) interval lies inside nullValue ± tolerance. Null when se or df
 * is not usable.
 */
export function equivalenceTest(
  estimate: number,
  nullValue: number,
  tolerance: number,
  se: number,
  df: number,
  alpha = 0.05,
): EquivalenceTestResult | null {
  if (!(tolerance > 0) || !Number.isFinite(tolerance)) throw new StatsInputError(`tolerance must be a finite number > 0, got ${tolerance}`);
  if (!(alpha > 0 && alpha < 0.5)) throw new StatsInputError(`alpha must be in (0, 0.5) for two one-sided tests, got ${alpha}`);
  if (!Number.isFinite(estimate) || !Number.isFinite(nullValue) || !(se > 0) || !Number.isFinite(se) || !(df > 0)) return null;
  const lowerBound = nullValue - tolerance;
  const upperBound = nullValue + tolerance;
  const tLower = (estimate - lowerBound) / se;
  const tUpper = (estimate - upperBound) / se;
  const pLower = tTestPValue(tLower, df, "greater");
  const pUpper = tTestPValue(tUpper, df, "less");
  const p = Math.max(pLower, pUpper);
  const margin = tQuantile(1 - alpha, df) * se;
  const low = estimate - margin;
  const high = estimate + margin;
  if (![tLower, tUpper, p, low, high].every(Number.isFinite)) return null;
  return {
    lowerBound,
    upperBound,
    tLower,
    pLower,
    tUpper,
    pUpper,
    p,
    equivalent: pLower < alpha && pUpper < alpha,
    interval: { low, high, level: 1 - 2 * alpha },
    beyondTolerance: low > upperBound || high < lowerBound,
    alpha,
  };
}
