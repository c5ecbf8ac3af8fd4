/**
 * Mann–Whitney U (Wilcoxon rank-sum) test for two independent samples.
 */
import { normalCdf } from "./distributions";
import { type Alternative, StatsInputError, assertAlternative, finiteValues } from "./types";

export type MannWhitneyMethod = "exact" | "normal";

export interface MannWhitneyOptions {
  /** "auto" (default): exact when both samples have fewer than 50 values and there are no ties. */
  readonly method?: MannWhitneyMethod | "auto";
}

export interface MannWhitneyResult {
  /** U of the first sample: the number of pairs (a, b) with a > b, ties counting ½. */
  readonly u: number;
  /** U of the second sample; u + uB = nA·nB. */
  readonly uB: number;
  readonly nA: number;
  readonly nB: number;
  readonly p: number | null;
  readonly method: MannWhitneyMethod;
  /** Standardised statistic of the normal approximation (continuity-corrected); null when exact. */
  readonly z: number | null;
  /** Whether the pooled sample had tied values. */
  readonly ties: boolean;
  /** u / (nA·nB): estimated P(A > B) + ½P(A = B), the "common-language" effect size. */
  readonly probabilityOfSuperiority: number | null;
  readonly alternative: Alternative;
  readonly warnings: readonly string[];
}

/** Largest sample size (exclusive) for which the exact distribution is used by default. */
export const MANN_WHITNEY_EXACT_LIMIT = 50;

/** Mid-ranks (1-based, ties get their average rank) of pooled values, and the tie-group sizes. */
function midRanks(pooled: readonly number[]): { ranks: number[]; tieSizes: number[] } {
  const order = pooled.map((value, index) => ({ value, index })).sort((x, y) => x.value - y.value);
  const ranks = new Array<number>(pooled.length).fill(0);
  const tieSizes: number[] = [];
  let start = 0;
  while (start < order.length) {
    let end = start;
    while (end + 1 < order.length && order[end + 1]?.value === order[start]?.value) end++;
    const rank = (start + end) / 2 + 1;
    for (let k = start; k <= end; k++) {
      const item = order[k];
      if (item) ranks[item.index] = rank;
    }
    tieSizes.push(end - start + 1);
    start = end + 1;
  }
  return { ranks, tieSizes };
}

/**
 * Exact null distribution of U for sample sizes m and n without ties: P(U = u), u = 0..m·n.
 * Recurrence p(i, j; u) = i/(i+j)·p(i−1, j; u−j) + j/(i+j)·p(i, j−1; u) (Mann & Whitney 1947),
 * carried as probabilities so that no count overflows.
 */
export function mannWhitneyExactDistribution(m: number, n: number): number[] {
  if (!Number.isInteger(m) || !Number.isInteger(n) || m < 0 || n < 0) {
    throw new StatsInputError(`sample sizes must be non-negative integers, got ${m} and ${n}`);
  }
  // previous[j] holds the distribution for (i − 1, j); current[j] for (i, j).
  let previous: number[][] = [];
  for (let j = 0; j <= n; j++) previous.push([1]);
  for (let i = 1; i <= m; i++) {
    const current: number[][] = [[1]];
    for (let j = 1; j <= n; j++) {
      const size = i * j + 1;
      const dist = new Array<number>(size).fill(0);
      const fromA = previous[j] ?? [];
      const fromB = current[j - 1] ?? [];
      const wA = i / (i + j);
      const wB = j / (i + j);
      // Largest value placed last is from A: it beats all j values of B, so U grows by j.
      fromA.forEach((prob, u) => {
        dist[u + j] = (dist[u + j] ?? 0) + wA * prob;
      });
      fromB.forEach((prob, u) => {
        dist[u] = (dist[u] ?? 0) + wB * prob;
      });
      current.push(dist);
    }
    previous = current;
  }
  return previous[n] ?? [1];
}

/**
 * Mann–Whitney U test (Mann & Whitney 1947) of H0: the two populations are identical, against
 * "greater" (values of `a` tend to be larger), "less" or "two-sided". U is reported for the first
 * sample, U = R_A − nA(nA+1)/2, as SciPy does.
 *
 * p-value: exact distribution (dynamic programming) when both samples have fewer than 50 values and
 * no ties; otherwise the normal approximation with tie-corrected variance
 * σ² = nA·nB/12·((N+1) − Σ(t³−t)/(N(N−1))) and a 0.5 continuity correction. Two-sided p doubles
 * the smaller tail, capped at 1. Non-finite values are ignored with a warning.
 */
export function mannWhitneyU(
  a: readonly number[],
  b: readonly number[],
  alternative: Alternative = "two-sided",
  options: MannWhitneyOptions = {},
): MannWhitneyResult {
  assertAlternative(alternative);
  const requested = options.method ?? "auto";
  const warnings: string[] = [];
  const fa = finiteValues(a);
  const fb = finiteValues(b);
  if (fa.dropped + fb.dropped > 0) warnings.push(`${fa.dropped + fb.dropped} non-finite value(s) ignored`);
  const nA = fa.finite.length;
  const nB = fb.finite.length;

  if (nA === 0 || nB === 0) {
    warnings.push("both samples need at least one finite value");
    return {
      u: 0,
      uB: 0,
      nA,
      nB,
      p: null,
      method: requested === "exact" ? "exact" : "normal",
      z: null,
      ties: false,
      probabilityOfSuperiority: null,
      alternative,
      warnings,
    };
  }

  const { ranks, tieSizes } = midRanks([...fa.finite, ...fb.finite]);
  let rankSumA = 0;
  for (let k = 0; k < nA; k++) rankSumA += ranks[k] ?? 0;
  const u = rankSumA - (nA * (nA + 1)) / 2;
  const uB = nA * nB - u;
  const ties = tieSizes.some((size) => size > 1);

  let method: MannWhitneyMethod;
  if (requested === "auto") {
    method = !ties && nA < MANN_WHITNEY_EXACT_LIMIT && nB < MANN_WHITNEY_EXACT_LIMIT ? "exact" : "normal";
  } else if (requested === "exact" && ties) {
    warnings.push("exact p-value is not defined with ties; used the normal approximation");
    method = "normal";
  } else {
    method = requested;
  }

  const common = { u, uB, nA, nB, ties, probabilityOfSuperiority: u / (nA * nB), alternative, warnings };

  if (method === "exact") {
    const dist = mannWhitneyExactDistribution(nA, nB);
    let lower = 0; // P(U ≤ u)
    let upper = 0; // P(U ≥ u)
    dist.forEach((prob, value) => {
      if (value <= u) lower += prob;
      if (value >= u) upper += prob;
    });
    const p = alternative === "greater" ? upper : alternative === "less" ? lower : 2 * Math.min(lower, upper);
    return { ...common, p: Math.min(1, p), method, z: null };
  }

  const total = nA + nB;
  const tieTerm = tieSizes.reduce((sum, t) => sum + (t ** 3 - t), 0) / (total * (total - 1));
  const variance = ((nA * nB) / 12) * (total + 1 - tieTerm);
  if (!(variance > 0)) {
    warnings.push("all values are tied; the rank test is undefined");
    return { ...common, p: null, method, z: null };
  }
  const sigma = Math.sqrt(variance);
  const mu = (nA * nB) / 2;
  // SciPy's convention: test the U relevant to the alternative, shifted by the continuity correction.
  const uTested = alternative === "greater" ? u : alternative === "less" ? uB : Math.max(u, uB);
  const z = (uTested - mu - 0.5) / sigma;
  const tail = normalCdf(-z);
  const p = alternative === "two-sided" ? Math.min(1, 2 * tail) : tail;
  return { ...common, p, method, z };
}
