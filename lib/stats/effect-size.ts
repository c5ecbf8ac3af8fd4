/**
 * Standardised mean difference with small-sample correction.
 */
import { describe } from "./describe";
import { normalQuantile } from "./distributions";
import { type Interval, finiteOrNull } from "./types";

export interface HedgesGResult {
  readonly nA: number;
  readonly nB: number;
  /** Cohen's d: (meanA − meanB)/pooled SD. */
  readonly d: number | null;
  /** Small-sample correction factor J = 1 − 3/(4(nA+nB) − 9). */
  readonly correction: number | null;
  /** Hedges' g = J·d. */
  readonly g: number | null;
  readonly standardError: number | null;
  /** Approximate 95 % interval g ± z(0.975)·SE (normal approximation). */
  readonly ci95: Interval;
  readonly warnings: readonly string[];
}

/**
 * Hedges' g for meanA − meanB in units of the pooled SD
 * s_p = √(((nA−1)sA² + (nB−1)sB²)/(nA+nB−2)), with the approximate small-sample correction
 * J = 1 − 3/(4(nA+nB) − 9) (Hedges & Olkin 1985). Standard error
 * SE(g) = J·√((nA+nB)/(nA·nB) + d²/(2(nA+nB))) and the 95 % interval g ± 1.96·SE follow
 * Borenstein et al. (2009), Introduction to Meta-Analysis, ch. 4 (large-sample normal approximation).
 * Needs at least 2 finite values per group and a positive pooled SD; otherwise nulls and a warning.
 */
export function hedgesG(a: readonly number[], b: readonly number[]): HedgesGResult {
  const da = describe(a);
  const db = describe(b);
  const warnings = [...da.warnings.map((w) => `a: ${w}`), ...db.warnings.map((w) => `b: ${w}`)];
  const nA = da.n;
  const nB = db.n;
  const none: HedgesGResult = {
    nA,
    nB,
    d: null,
    correction: null,
    g: null,
    standardError: null,
    ci95: { low: null, high: null, level: 0.95 },
    warnings,
  };
  if (da.mean === null || db.mean === null || da.sd === null || db.sd === null) {
    warnings.push("Hedges' g needs at least 2 finite values in each group");
    return none;
  }
  const total = nA + nB;
  const pooledSd = Math.sqrt(((nA - 1) * da.sd ** 2 + (nB - 1) * db.sd ** 2) / (total - 2));
  if (!(pooledSd > 0) || !Number.isFinite(pooledSd)) {
    warnings.push("pooled SD is zero or not finite; the standardised difference is undefined");
    return none;
  }
  const d = (da.mean - db.mean) / pooledSd;
  if (!Number.isFinite(d)) {
    warnings.push("standardised difference is not finite");
    return none;
  }
  const correction = 1 - 3 / (4 * total - 9);
  const g = correction * d;
  const standardError = finiteOrNull(
    correction * Math.sqrt(total / (nA * nB) + d ** 2 / (2 * total)),
    "standardError",
    warnings,
  );
  const z = normalQuantile(0.975);
  return {
    ...none,
    d,
    correction,
    g,
    standardError,
    ci95:
      standardError === null
        ? none.ci95
        : {
            low: finiteOrNull(g - z * standardError, "ci95 low", warnings),
            high: finiteOrNull(g + z * standardError, "ci95 high", warnings),
            level: 0.95,
          },
  };
}
