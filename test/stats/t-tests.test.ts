import { describe, expect, test } from "vitest";
import {
  oneSampleTTest,
  oneSampleTTestFromSummary,
  pooledTTest,
  pooledTTestFromSummary,
  welchTTest,
  welchTTestFromSummary,
} from "@/lib/stats";

// NIST/SEMATECH e-Handbook of Statistical Methods, §1.3.5.3 (two-sample t test), data set AUTO83B:
// US cars vs Japanese cars, miles per gallon.
const us = { n: 249, mean: 20.14458, sd: 6.4147 };
const japan = { n: 79, mean: 30.48101, sd: 6.10771 };

describe("two-sample t tests from summaries (NIST AUTO83B)", () => {
  test("pooled: t = −12.62059, df = 326", () => {
    const r = pooledTTestFromSummary(us, japan);
    expect(r.t).toBeCloseTo(-12.62059, 4); // NIST/SEMATECH e-Handbook §1.3.5.3, AUTO83B
    expect(r.df).toBe(326); // NIST/SEMATECH e-Handbook §1.3.5.3, AUTO83B
    expect(r.meanDifference).toBeCloseTo(20.14458 - 30.48101, 10); // [D]
    expect(r.p).not.toBeNull();
    expect(r.p ?? 1).toBeLessThan(1e-20);
  });

  test("Welch: t = −12.94627, df = 136.875", () => {
    const r = welchTTestFromSummary(us, japan);
    expect(r.t).toBeCloseTo(-12.94627, 4); // NIST/SEMATECH e-Handbook §1.3.5.3, AUTO83B
    expect(r.df).toBeCloseTo(136.875, 2); // NIST/SEMATECH e-Handbook §1.3.5.3, AUTO83B
  });

  test("one-sided alternatives split the two-sided p and open one end of the interval", () => {
    const two = welchTTestFromSummary(us, japan, "two-sided");
    const less = welchTTestFromSummary(us, japan, "less");
    const greater = welchTTestFromSummary(us, japan, "greater");
    expect(less.p).toBeCloseTo((two.p ?? 0) / 2, 40);
    expect(greater.p).toBeCloseTo(1, 12);
    expect(less.ci95.low).toBeNull();
    expect(less.ci95.high).not.toBeNull();
    expect(greater.ci95.high).toBeNull();
    // One-sided bound lies inside the two-sided interval [P: one-sided quantile 0.95 < 0.975]
    expect(less.ci95.high ?? 0).toBeLessThan(two.ci95.high ?? 0);
  });
});

describe("t tests on raw values", () => {
  // Hand-worked [D]: a = 1..5 (mean 3, var 2.5), b = 4..9 (mean 6.5, var 3.5).
  const a = [1, 2, 3, 4, 5];
  const b = [4, 5, 6, 7, 8, 9];

  test("Welch matches the formula recomputed by hand", () => {
    const r = welchTTest(a, b);
    const va = 2.5 / 5;
    const vb = 3.5 / 6;
    expect(r.t).toBeCloseTo((3 - 6.5) / Math.sqrt(va + vb), 12); // [D] Welch 1947
    expect(r.df).toBeCloseTo((va + vb) ** 2 / (va ** 2 / 4 + vb ** 2 / 5), 12); // [D] Welch–Satterthwaite
  });

  test("pooled matches the formula recomputed by hand", () => {
    const r = pooledTTest(a, b);
    const sp2 = (4 * 2.5 + 5 * 3.5) / 9;
    expect(r.t).toBeCloseTo(-3.5 / Math.sqrt(sp2 * (1 / 5 + 1 / 6)), 12); // [D]
    expect(r.df).toBe(9);
  });

  test("too few values or no spread gives nulls with warnings, never NaN", () => {
    const few = welchTTest([1], [2, 3]);
    expect(few.t).toBeNull();
    expect(few.p).toBeNull();
    expect(few.warnings.length).toBeGreaterThan(0);
    const flat = pooledTTest([2, 2, 2], [2, 2]);
    expect(flat.t).toBeNull();
    expect(flat.p).toBeNull();
  });
});

describe("one-sample t test", () => {
  test("hand-worked example", () => {
    // [D] values 6.1, 6.5, 7.0, 6.8, 6.6: mean 6.6, Σ(x − mean)² = 0.25+0.01+0.16+0.04+0 = 0.46
    const values = [6.1, 6.5, 7.0, 6.8, 6.6];
    const r = oneSampleTTest(values, 6.5);
    const se = Math.sqrt(0.46 / 4) / Math.sqrt(5);
    expect(r.estimate).toBeCloseTo(6.6, 12);
    expect(r.t).toBeCloseTo(0.1 / se, 10); // [D]
    expect(r.df).toBe(4);
    // 95 % two-sided interval uses t(0.975, 4) = 2.776 [S: Student t table, df 4]
    expect(r.ci95.low).toBeCloseTo(6.6 - 2.776 * se, 2);
    expect(r.ci95.high).toBeCloseTo(6.6 + 2.776 * se, 2);
    expect(r.p ?? 0).toBeGreaterThan(0.5);
  });

  test("one-sided interval bound uses t(0.95, df)", () => {
    const r = oneSampleTTestFromSummary({ n: 11, mean: 6.0, sd: 1.0 }, 6.5, "less");
    // t(0.95, 10) = 1.812 [S: Student t table, df 10, one-tailed 0.05]
    expect(r.ci95.high).toBeCloseTo(6.0 + (1.812 * 1.0) / Math.sqrt(11), 2);
    expect(r.ci95.low).toBeNull();
    expect(r.t).toBeCloseTo(-0.5 / (1 / Math.sqrt(11)), 10); // [D]
    // p(less) + p(greater) = 1 for a continuous statistic [D]
    const g = oneSampleTTestFromSummary({ n: 11, mean: 6.0, sd: 1.0 }, 6.5, "greater");
    expect((r.p ?? 0) + (g.p ?? 0)).toBeCloseTo(1, 12);
  });

  test("rejects a bad alternative with a typed error", () => {
    expect(() => oneSampleTTest([1, 2, 3], 0, "both" as never)).toThrow(/alternative/);
  });
});
