import { describe, expect, test } from "vitest";
import { mannWhitneyExactDistribution, mannWhitneyU } from "@/lib/stats";

// SciPy reference documentation, scipy.stats.mannwhitneyu example (after Shier 2004):
// males [19, 22, 16, 29, 24], females [20, 11, 17, 12].
const males = [19, 22, 16, 29, 24];
const females = [20, 11, 17, 12];

describe("mannWhitneyU", () => {
  test("SciPy docs example: U = 17, exact two-sided p = 0.1111", () => {
    const r = mannWhitneyU(males, females);
    expect(r.method).toBe("exact");
    expect(r.u).toBe(17); // SciPy mannwhitneyu docs
    expect(r.p).toBeCloseTo(0.1111, 4); // SciPy mannwhitneyu docs
    // [D] P(U ≥ 17) = P(U ≤ 3) = (1 + 1 + 2 + 3)/C(9, 4) = 7/126, doubled
    expect(r.p).toBeCloseTo((2 * 7) / 126, 12);
    expect(r.uB).toBe(3);
  });

  test("SciPy docs example, normal approximation with continuity correction", () => {
    const r = mannWhitneyU(males, females, "two-sided", { method: "normal" });
    expect(r.method).toBe("normal");
    // [D] μ = 10, σ² = 5·4·10/12, z = (17 − 10 − 0.5)/σ, p = 2(1 − Φ(z));
    // SciPy's docs print 0.11134688653314041 for method="asymptotic" [Mem]
    expect(r.p).toBeCloseTo(0.111347, 6);
    expect(r.z).toBeCloseTo(6.5 / Math.sqrt(200 / 12), 12);
  });

  test("one-sided alternatives", () => {
    // [D] P(U ≥ 17) = 7/126 for "greater"; P(U ≤ 17) = 1 − P(U ≥ 18) = 1 − 4/126 for "less"
    expect(mannWhitneyU(males, females, "greater").p).toBeCloseTo(7 / 126, 12);
    expect(mannWhitneyU(males, females, "less").p).toBeCloseTo(1 - 4 / 126, 12);
  });

  test("swapping samples swaps U and keeps the two-sided p", () => {
    const r = mannWhitneyU(females, males);
    expect(r.u).toBe(3);
    expect(r.p).toBeCloseTo(0.1111, 4);
  });

  test("ties force the normal approximation with a tie-corrected variance", () => {
    const a = [1, 2, 2, 3, 4];
    const b = [2, 3, 3, 5];
    const r = mannWhitneyU(a, b);
    expect(r.ties).toBe(true);
    expect(r.method).toBe("normal");
    // [D] pooled sorted 1 2 2 2 3 3 3 4 5 → ranks 1, 3, 3, 3, 6, 6, 6, 8, 9;
    // R_A = 1 + 3 + 3 + 6 + 8 = 21, U = 21 − 15 = 6; tie groups of 3 and 3
    expect(r.u).toBe(6);
    const variance = ((5 * 4) / 12) * (10 - (24 + 24) / (9 * 8));
    expect(r.z).toBeCloseTo((Math.max(6, 14) - 10 - 0.5) / Math.sqrt(variance), 12);
  });

  test("all values tied: p is null with a warning", () => {
    const r = mannWhitneyU([3, 3], [3, 3, 3]);
    expect(r.p).toBeNull();
    expect(r.warnings.length).toBeGreaterThan(0);
  });
});

describe("mannWhitneyExactDistribution", () => {
  test.each([
    { m: 1, n: 1 },
    { m: 3, n: 4 },
    { m: 12, n: 20 },
  ])("sums to 1 and is symmetric for m = $m, n = $n", ({ m, n }) => {
    const dist = mannWhitneyExactDistribution(m, n);
    expect(dist.length).toBe(m * n + 1);
    expect(dist.reduce((s, p) => s + p, 0)).toBeCloseTo(1, 12);
    for (let u = 0; u <= m * n; u++) expect(dist[u]).toBeCloseTo(dist[m * n - u] ?? -1, 14);
  });

  test("m = 2, n = 2 by enumeration", () => {
    // [D] the 6 arrangements of AABB give U = 0, 1, 2, 2, 3, 4
    expect(mannWhitneyExactDistribution(2, 2).map((p) => p * 6)).toEqual([1, 1, 2, 1, 1].map((c) => expect.closeTo(c, 12)));
  });
});
