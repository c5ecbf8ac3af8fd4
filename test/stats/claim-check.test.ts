import { describe, expect, test } from "vitest";
import jStat from "jstat";
import { hedgesG, mannWhitneyU, minimumDetectableDifference, mulberry32, oneSampleTTest, welchTTest } from "../../lib/stats/index";
import { ONE_SITE_SHARE_LIMIT, SMALL_GROUP_N, formatP, runClaimCheck, sampleSkewness } from "../../lib/stats/claims";

/** Box–Muller normal draws from the seeded generator (test fixture, not library code). */
function normals(seed: number, n: number, mean: number, sd: number): number[] {
  const next = mulberry32(seed);
  const out: number[] = [];
  while (out.length < n) {
    const u1 = Math.max(next(), 1e-12);
    const u2 = next();
    out.push(mean + sd * Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2));
  }
  return out;
}

describe("sampleSkewness", () => {
  test.each([
    // [D] G1 = √(n(n−1))/(n−2) · g1 with g1 = m3/m2^1.5 (population moments), recomputed below
    { values: [1, 2, 3, 4, 10] },
    { values: [2.1, 2.4, 2.2, 5.9, 2.0, 2.3, 2.2] },
    { values: [-3, -1, 0, 0.5, 1, 1.2] },
  ])("matches the adjusted Fisher–Pearson coefficient for $values", ({ values }) => {
    const n = values.length;
    const mean = values.reduce((s, v) => s + v, 0) / n;
    const m2 = values.reduce((s, v) => s + (v - mean) ** 2, 0) / n;
    const m3 = values.reduce((s, v) => s + (v - mean) ** 3, 0) / n;
    const expected = (Math.sqrt(n * (n - 1)) / (n - 2)) * (m3 / m2 ** 1.5);
    expect(sampleSkewness(values)).toBeCloseTo(expected, 12);
  });

  test("symmetric data have zero skewness; too few or constant values give null", () => {
    expect(sampleSkewness([1, 2, 3, 4, 5])).toBeCloseTo(0, 14); // [D] symmetric about the mean
    expect(sampleSkewness([1, 2])).toBeNull();
    expect(sampleSkewness([4, 4, 4, 4])).toBeNull();
  });
});

describe("runClaimCheck: numbers equal lib/stats on the same values", () => {
  const a = normals(11, 14, 6.9, 0.4);
  const b = normals(12, 11, 6.3, 0.6);

  test.each(["two-sided", "greater", "less"] as const)("two groups, %s", (alternative) => {
    const r = runClaimCheck({ kind: "two-group", alternative, groupA: { label: "JJA", values: a }, groupB: { label: "Oct–Nov", values: b }, metricLabel: "band lapse rate", unit: "K/km" });
    const welch = welchTTest(a, b, alternative);
    const mw = mannWhitneyU(a, b, alternative);
    const g = hedgesG(a, b);
    expect(r.test).toBe("Welch t");
    expect(r.estimate).toBe(welch.meanDifference);
    expect(r.t).toBe(welch.t);
    expect(r.df).toBe(welch.df);
    expect(r.p).toBe(welch.p);
    expect(r.ci95).toEqual(welch.ci95);
    expect(r.rankCheck?.u).toBe(mw.u);
    expect(r.rankCheck?.p).toBe(mw.p);
    expect(r.hedgesG).toBe(g.g);
    // [D] pooled SD from the two sample SDs, then the lib/stats detectable-difference formula
    const sa = Math.sqrt(a.reduce((s, v) => s + (v - a.reduce((x, y) => x + y, 0) / a.length) ** 2, 0) / (a.length - 1));
    const sb = Math.sqrt(b.reduce((s, v) => s + (v - b.reduce((x, y) => x + y, 0) / b.length) ** 2, 0) / (b.length - 1));
    const pooled = Math.sqrt(((a.length - 1) * sa ** 2 + (b.length - 1) * sb ** 2) / (a.length + b.length - 2));
    expect(r.minimumDetectableDifference).toBeCloseTo(minimumDetectableDifference({ sd: pooled, nA: a.length, nB: b.length, alternative }).difference, 10);
    expect(r.groups.map((x) => x.n)).toEqual([14, 11]);
  });

  test.each(["two-sided", "greater", "less"] as const)("one sample against 6.5 K/km, %s", (alternative) => {
    const r = runClaimCheck({ kind: "one-sample", alternative, statedValue: 6.5, group: { label: "all", values: a }, metricLabel: "tropospheric lapse rate", unit: "K/km" });
    const t = oneSampleTTest(a, 6.5, alternative);
    expect(r.test).toBe("one-sample t");
    expect(r.estimate).toBe(t.estimate);
    expect(r.t).toBe(t.t);
    expect(r.p).toBe(t.p);
    expect(r.ci95).toEqual(t.ci95);
    expect(r.rankCheck).toBeNull();
    // [D] Hedges & Olkin correction J = 1 − 3/(4·df − 1) on (mean − 6.5)/SD, df = n − 1
    const mean = a.reduce((s, v) => s + v, 0) / a.length;
    const sd = Math.sqrt(a.reduce((s, v) => s + (v - mean) ** 2, 0) / (a.length - 1));
    expect(r.hedgesG).toBeCloseTo((1 - 3 / (4 * (a.length - 1) - 1)) * ((mean - 6.5) / sd), 12);
  });

  test("NIST AUTO83B summaries: Welch t from the raw-value path matches the published statistic", () => {
    // NIST/SEMATECH e-Handbook AUTO83B: Welch t = −12.94627, df = 136.875. Rebuild two samples with
    // exactly the published n, mean and SD [D: shift and scale standard normal draws].
    const shape = (values: number[], mean: number, sd: number) => {
      const m = values.reduce((s, v) => s + v, 0) / values.length;
      const s = Math.sqrt(values.reduce((acc, v) => acc + (v - m) ** 2, 0) / (values.length - 1));
      return values.map((v) => mean + ((v - m) / s) * sd);
    };
    const x = shape(normals(1, 249, 0, 1), 20.14458, 6.4147);
    const y = shape(normals(2, 79, 0, 1), 30.48101, 6.10771);
    const r = runClaimCheck({ kind: "two-group", alternative: "two-sided", groupA: { label: "US", values: x }, groupB: { label: "JP", values: y }, metricLabel: "mpg", unit: "mpg" });
    expect(r.t).toBeCloseTo(-12.94627, 4);
    expect(r.df).toBeCloseTo(136.875, 2);
    expect(r.outcome).toBe("supported");
  });
});

describe("runClaimCheck: planted differences (seeded)", () => {
  // Seeds 101–104 with mulberry32; the planted difference of 0.8 K/km is twice the SD.
  test("a planted difference is found", () => {
    const r = runClaimCheck({
      kind: "two-group", alternative: "greater",
      groupA: { label: "JJA", values: normals(101, 15, 7.0, 0.4) }, groupB: { label: "Oct–Nov", values: normals(102, 15, 6.2, 0.4) },
      metricLabel: "band lapse rate", unit: "K/km",
    });
    expect(r.outcome).toBe("supported");
    expect(r.p).toBeLessThan(0.001);
    expect(r.verdict).toMatch(/^The data support the claim/);
  });

  test("no difference is found where none was planted", () => {
    const r = runClaimCheck({
      kind: "two-group", alternative: "greater",
      groupA: { label: "JJA", values: normals(103, 15, 6.6, 0.4) }, groupB: { label: "Oct–Nov", values: normals(104, 15, 6.6, 0.4) },
      metricLabel: "band lapse rate", unit: "K/km",
    });
    expect(r.outcome).toBe("not-shown");
    expect(r.p).toBeGreaterThan(0.05);
    expect(r.verdict).toMatch(/do not show/);
    expect(r.verdict).toMatch(/80 % power/);
  });

  test("over many seeds, the false-positive rate stays near α = 0.05", () => {
    let positives = 0;
    const runs = 400;
    for (let i = 0; i < runs; i++) {
      const r = runClaimCheck({
        kind: "two-group", alternative: "two-sided",
        groupA: { label: "A", values: normals(1000 + 2 * i, 12, 5, 1) }, groupB: { label: "B", values: normals(1001 + 2 * i, 12, 5, 1) },
        metricLabel: "x", unit: "K/km",
      });
      if (r.outcome === "supported") positives++;
    }
    // [D] binomial(400, 0.05): mean 20, SD 4.4; ±4 SD covers it
    expect(positives).toBeGreaterThan(2);
    expect(positives).toBeLessThan(38);
  });
});

describe("runClaimCheck: verdicts and caveats", () => {
  test("one-sample two-sided: consistent when the stated value is inside the interval, contradicted when far outside", () => {
    const values = normals(7, 30, 6.5, 0.5);
    const near = runClaimCheck({ kind: "one-sample", alternative: "two-sided", statedValue: 6.5, group: { label: "all", values }, metricLabel: "lapse rate", unit: "K/km" });
    expect(near.outcome).toBe("consistent");
    expect(near.verdict).toMatch(/cannot be ruled out/);
    const far = runClaimCheck({ kind: "one-sample", alternative: "two-sided", statedValue: 9.8, group: { label: "all", values }, metricLabel: "lapse rate", unit: "K/km" });
    expect(far.outcome).toBe("contradicted");
    expect(far.verdict).toMatch(/contradict/);
  });

  test("small n, skew and one-site clustering each give a caveat", () => {
    const skewed = [6.0, 6.1, 6.05, 6.2, 6.1, 9.5, 6.0, 6.15];
    const r = runClaimCheck({
      kind: "one-sample", alternative: "two-sided", statedValue: 6.5,
      group: { label: "all", values: skewed, siteIds: ["North Field", "North Field", "North Field", "North Field", "North Field", "North Field", "North Field", "Ridge"] },
      metricLabel: "lapse rate", unit: "K/km",
    });
    const codes = r.caveats.map((c) => c.code);
    expect(skewed.length).toBeLessThan(SMALL_GROUP_N);
    expect(codes).toContain("small-n");
    expect(codes).toContain("skewed");
    expect(7 / 8).toBeGreaterThan(ONE_SITE_SHARE_LIMIT);
    expect(codes).toContain("one-site");
    expect(r.caveats.find((c) => c.code === "one-site")?.message).toMatch(/88 %.*North Field/);
  });

  test("a large, spread, balanced sample has no caveats", () => {
    const values = normals(21, 40, 6.5, 0.5);
    const sites = values.map((_, i) => `site-${i % 4}`);
    const r = runClaimCheck({ kind: "one-sample", alternative: "greater", statedValue: 6.0, group: { label: "all", values, siteIds: sites }, metricLabel: "lapse rate", unit: "K/km" });
    expect(r.caveats).toEqual([]);
    expect(r.outcome).toBe("supported");
  });

  test("Welch and Mann–Whitney disagreeing is a caveat", () => {
    // One far outlier in B inflates its SD (Welch not significant) while the ranks separate cleanly.
    const a = [7.1, 7.2, 7.3, 7.15, 7.25, 7.05, 7.35, 7.2, 7.1, 7.3, 7.22, 7.18];
    const b = [6.1, 6.2, 6.0, 6.15, 6.05, 6.25, 6.1, 6.2, 6.0, 6.1, 6.12, 30];
    const r = runClaimCheck({ kind: "two-group", alternative: "greater", groupA: { label: "A", values: a }, groupB: { label: "B", values: b }, metricLabel: "x", unit: "K/km" });
    expect(r.p).toBeGreaterThan(0.05);
    expect(r.rankCheck?.p).toBeLessThan(0.05);
    expect(r.caveats.map((c) => c.code)).toContain("tests-disagree");
  });

  test("an estimate on the wrong side of a directional claim says so", () => {
    const r = runClaimCheck({ kind: "one-sample", alternative: "greater", statedValue: 7, group: { label: "all", values: normals(5, 20, 6.5, 0.3) }, metricLabel: "x", unit: "K/km" });
    expect(r.outcome).toBe("not-shown");
    expect(r.caveats.map((c) => c.code)).toContain("opposite-direction");
  });

  test("too few values: undetermined, never NaN", () => {
    const r = runClaimCheck({ kind: "two-group", alternative: "two-sided", groupA: { label: "A", values: [6.5] }, groupB: { label: "B", values: [6.1, 6.3] }, metricLabel: "x", unit: "K/km" });
    expect(r.outcome).toBe("undetermined");
    expect(r.verdict).toMatch(/cannot be tested/);
    for (const value of [r.t, r.p, r.df, r.estimate, r.hedgesG, r.minimumDetectableDifference]) {
      expect(value === null || Number.isFinite(value)).toBe(true);
    }
    expect(r.verdict).not.toMatch(/NaN|Infinity/);
  });

  test("formatP", () => {
    expect(formatP(0.0004)).toBe("p < 0.001");
    expect(formatP(0.0095)).toBe("p = 0.0095");
    expect(formatP(0.2346)).toBe("p = 0.235");
    expect(formatP(null)).toBe("p undefined");
  });

  test("t critical value used by the interval matches a t table", () => {
    // [S: any t table] two-sided 95 %, df 10 → 2.228; here checked through jStat so the test has its own path
    expect(jStat.studentt.inv(0.975, 10)).toBeCloseTo(2.228, 3);
  });
});
