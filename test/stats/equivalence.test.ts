import { describe, expect, test } from "vitest";
import { equivalenceTest, mulberry32, oneSampleTTest, tCdf, tQuantile } from "../../lib/stats/index";
import { claimDigits, formatClaimNumber, runClaimCheck } from "../../lib/stats/claims";

/** Invented lapse rates (K/km) for the checks below. */
const VALUES = [6.41, 6.62, 6.55, 6.48, 6.7, 6.38, 6.59, 6.52, 6.61, 6.47, 6.66, 6.44];

function summary(values: readonly number[]): { n: number; mean: number; sd: number } {
  const n = values.length;
  const mean = values.reduce((s, v) => s + v, 0) / n;
  const sd = Math.sqrt(values.reduce((s, v) => s + (v - mean) ** 2, 0) / (n - 1));
  return { n, mean, sd };
}

describe("equivalenceTest (two one-sided tests, REFERENCE.md §20)", () => {
  test("t and p of each one-sided test follow from the t distribution", () => {
    const { n, mean, sd } = summary(VALUES);
    const se = sd / Math.sqrt(n);
    const r = equivalenceTest(mean, 6.5, 0.3, se, n - 1, 0.05);
    expect(r).not.toBeNull();
    // [D] Schuirmann 1987 (REFERENCE.md §20): t_L = (x̄ − (μ0 − δ))/se, p_L = P(T ≥ t_L); t_U = (x̄ − (μ0 + δ))/se, p_U = P(T ≤ t_U)
    const tL = (mean - 6.2) / se;
    const tU = (mean - 6.8) / se;
    expect(r?.tLower).toBeCloseTo(tL, 12);
    expect(r?.tUpper).toBeCloseTo(tU, 12);
    expect(r?.pLower).toBeCloseTo(1 - tCdf(tL, n - 1), 12);
    expect(r?.pUpper).toBeCloseTo(tCdf(tU, n - 1), 12);
    expect(r?.p).toBe(Math.max(r?.pLower ?? 0, r?.pUpper ?? 0));
    // [D] the (1 − 2α) = 90 % interval x̄ ± t(0.95, n − 1)·se
    const margin = tQuantile(0.95, n - 1) * se;
    expect(r?.interval.low).toBeCloseTo(mean - margin, 12);
    expect(r?.interval.high).toBeCloseTo(mean + margin, 12);
    expect(r?.interval.level).toBeCloseTo(0.9, 12);
    expect(r?.equivalent).toBe(true);
  });

  test("each one-sided p equals a one-sample t test against the shifted bound", () => {
    // [D] Lakens 2017 (REFERENCE.md §20): TOST is two ordinary one-sided t tests, against μ0 − δ ("greater") and μ0 + δ ("less")
    const { n, mean, sd } = summary(VALUES);
    const r = equivalenceTest(mean, 6.5, 0.1, sd / Math.sqrt(n), n - 1);
    expect(r?.pLower).toBeCloseTo(oneSampleTTest(VALUES, 6.4, "greater").p ?? NaN, 12);
    expect(r?.pUpper).toBeCloseTo(oneSampleTTest(VALUES, 6.6, "less").p ?? NaN, 12);
  });

  test("both one-sided p < α exactly when the (1 − 2α) interval lies inside ±δ", () => {
    const next = mulberry32(2024);
    let equivalentSeen = 0;
    let notSeen = 0;
    for (let i = 0; i < 400; i++) {
      const estimate = 6 + next();
      const se = 0.02 + 0.3 * next();
      const df = 2 + Math.floor(40 * next());
      const tolerance = 0.05 + 0.6 * next();
      const alpha = [0.01, 0.05, 0.1][i % 3] ?? 0.05;
      const r = equivalenceTest(estimate, 6.5, tolerance, se, df, alpha);
      if (!r) throw new Error("expected a result");
      const inside = r.interval.low! > 6.5 - tolerance && r.interval.high! < 6.5 + tolerance;
      expect(r.equivalent).toBe(inside);
      if (r.equivalent) equivalentSeen++;
      else notSeen++;
    }
    expect(equivalentSeen).toBeGreaterThan(20);
    expect(notSeen).toBeGreaterThan(20);
  });

  test("bad inputs are refused or give null", () => {
    expect(() => equivalenceTest(1, 1, 0, 0.1, 5)).toThrow(/tolerance/);
    expect(() => equivalenceTest(1, 1, 0.1, 0.1, 5, 0.6)).toThrow(/alpha/);
    expect(equivalenceTest(1, 1, 0.1, 0, 5)).toBeNull();
  });
});

describe("runClaimCheck with a tolerance", () => {
  const base = { kind: "one-sample", alternative: "two-sided", metricLabel: "tropospheric lapse rate", unit: "K/km" } as const;

  test("a mean near the stated value with a tight interval is equivalent", () => {
    const r = runClaimCheck({ ...base, statedValue: 6.5, tolerance: 0.3, group: { label: "all", values: VALUES } });
    expect(r.outcome).toBe("equivalent");
    expect(r.equivalence?.equivalent).toBe(true);
    expect(r.verdict).toContain("6.50 ± 0.30 K/km");
    expect(r.verdict).toContain("lies within 6.20 to 6.80 K/km");
  });

  test("without a tolerance the same data are only 'consistent'; a too-narrow tolerance is 'inconclusive'", () => {
    const plain = runClaimCheck({ ...base, statedValue: 6.5, group: { label: "all", values: VALUES } });
    expect(plain.outcome).toBe("consistent");
    expect(plain.equivalence).toBeNull();
    const narrow = runClaimCheck({ ...base, statedValue: 6.5, tolerance: 0.02, group: { label: "all", values: VALUES } });
    expect(narrow.outcome).toBe("inconclusive");
    expect(narrow.verdict).toMatch(/neither show a difference nor show the claim/);
  });

  test("a clear difference says whether it is also larger than the tolerance", () => {
    const shifted = VALUES.map((v) => v + 0.9); // mean ≈ 7.44
    const far = runClaimCheck({ ...base, statedValue: 6.5, tolerance: 0.3, group: { label: "all", values: shifted } });
    expect(far.outcome).toBe("contradicted");
    expect(far.equivalence?.beyondTolerance).toBe(true);
    expect(far.verdict).toContain("also larger than the stated tolerance of 0.30 K/km");
    const near = VALUES.map((v) => v + 0.25); // mean ≈ 6.79: clearly above 6.5, interval straddles 6.8
    const r = runClaimCheck({ ...base, statedValue: 6.5, tolerance: 0.3, group: { label: "all", values: near } });
    expect(r.outcome).toBe("contradicted");
    expect(r.equivalence?.beyondTolerance).toBe(false);
    expect(r.verdict).toContain("cannot tell whether the difference is larger than the stated tolerance");
  });

  test("a clear difference smaller than the tolerance is still equivalent, and says so", () => {
    const many = Array.from({ length: 60 }, (_, i) => 6.6 + 0.05 * Math.sin(i)); // mean ≈ 6.6, se tiny
    const r = runClaimCheck({ ...base, statedValue: 6.5, tolerance: 0.3, group: { label: "all", values: many } });
    expect(r.p).toBeLessThan(0.05);
    expect(r.outcome).toBe("equivalent");
    expect(r.verdict).toContain("but by less than the stated tolerance");
  });

  test("a tolerance on a one-sided claim is refused", () => {
    expect(() => runClaimCheck({ ...base, alternative: "greater", statedValue: 6.5, tolerance: 0.3, group: { label: "all", values: VALUES } })).toThrow(/two-sided/);
  });
});

describe("claim precision: one format for wording and verdict", () => {
  test("claimDigits shows each stated number exactly, at least 2 decimals", () => {
    expect(claimDigits([6.5])).toBe(2);
    expect(claimDigits([6.125])).toBe(3);
    expect(claimDigits([6.5, 0.25])).toBe(2);
    expect(claimDigits([6.5, 0.125])).toBe(3);
    expect(claimDigits([1 / 3])).toBe(6);
    expect(formatClaimNumber(-0.0001, 2)).toBe("0.00");
  });

  test("a stated value with three decimals appears unrounded in the verdict, and every number there uses the same decimals", () => {
    const r = runClaimCheck({ kind: "one-sample", alternative: "two-sided", statedValue: 6.125, group: { label: "all", values: VALUES }, metricLabel: "lapse rate", unit: "K/km" });
    expect(r.digits).toBe(3);
    expect(r.verdict).toContain("6.125 K/km");
    const numbers = r.verdict.replace(/p [=<] [0-9.]+/g, "").match(/-?\d+\.\d+/g) ?? [];
    expect(numbers.length).toBeGreaterThan(3);
    for (const text of numbers) expect(text.split(".")[1]).toHaveLength(3);
  });
});
