import { describe, expect, test } from "vitest";
import { bootstrapMeanCi, meanConfidenceInterval, meanConfidenceIntervalFromSummary, mulberry32, randomNormal, tCritical } from "@/lib/stats";

describe("t critical values", () => {
  test.each([
    { df: 1, expected: 12.706 }, // any Student t table, two-sided 95 %
    { df: 5, expected: 2.571 }, // any Student t table, two-sided 95 %
    { df: 10, expected: 2.228 }, // any Student t table, two-sided 95 %
    { df: 30, expected: 2.042 }, // any Student t table, two-sided 95 %
    { df: Number.POSITIVE_INFINITY, expected: 1.96 }, // any Student t table (normal limit), two-sided 95 %
  ])("df = $df → $expected", ({ df, expected }) => {
    expect(tCritical(0.95, df)).toBeCloseTo(expected, 3);
  });
});

describe("meanConfidenceInterval", () => {
  test("NIST ZARR13 95 % interval from n, mean, SD", () => {
    // NIST/SEMATECH e-Handbook §1.3.5.2 (confidence limits for the mean), data set ZARR13
    const r = meanConfidenceIntervalFromSummary({ n: 195, mean: 9.26146, sd: 0.02278881 });
    // Tolerance 1e-6: the handbook prints 6 decimals and rounds its intermediate t quantile.
    expect(Math.abs((r.low ?? 0) - 9.258242)).toBeLessThan(1e-6); // NIST/SEMATECH e-Handbook §1.3.5.2, ZARR13
    expect(Math.abs((r.high ?? 0) - 9.264679)).toBeLessThan(1e-6); // NIST/SEMATECH e-Handbook §1.3.5.2, ZARR13
    expect(r.df).toBe(194);
  });

  test("raw values agree with the summary form", () => {
    const values = [5, 2, 9, 4, 4, 7, 4, 5];
    const r = meanConfidenceInterval(values, 0.9);
    // [D] mean 5, sd √(32/7); t(0.95, 7) = 1.895 [S: Student t table, df 7, one-tailed 0.05]
    const half = (1.895 * Math.sqrt(32 / 7)) / Math.sqrt(8);
    expect(r.low).toBeCloseTo(5 - half, 2);
    expect(r.high).toBeCloseTo(5 + half, 2);
    expect(r.level).toBe(0.9);
  });

  test("one value gives nulls and a warning", () => {
    const r = meanConfidenceInterval([3]);
    expect(r.mean).toBe(3);
    expect(r.low).toBeNull();
    expect(r.warnings.length).toBeGreaterThan(0);
  });

  test("level outside (0, 1) is a typed error", () => {
    expect(() => meanConfidenceInterval([1, 2, 3], 95)).toThrow(/level/);
  });
});

describe("bootstrapMeanCi", () => {
  const random = mulberry32(7);
  const sample = Array.from({ length: 40 }, () => randomNormal(random, 6.5, 1.2));

  test("same seed, same interval; other seed, other interval", () => {
    const first = bootstrapMeanCi(sample, { seed: 42 });
    const again = bootstrapMeanCi(sample, { seed: 42 });
    const other = bootstrapMeanCi(sample, { seed: 43 });
    expect(again).toEqual(first);
    expect([other.low, other.high]).not.toEqual([first.low, first.high]);
    expect(first.resamples).toBe(2000);
  });

  test("brackets the sample mean and roughly matches the t interval for normal data", () => {
    const boot = bootstrapMeanCi(sample, { seed: 1, resamples: 4000 });
    const t = meanConfidenceInterval(sample);
    expect(boot.low ?? Infinity).toBeLessThan(boot.estimate ?? -Infinity);
    expect(boot.high ?? -Infinity).toBeGreaterThan(boot.estimate ?? Infinity);
    // [P] percentile bootstrap is slightly narrower than t for n = 40; widths agree within 20 %
    const bootWidth = (boot.high ?? 0) - (boot.low ?? 0);
    const tWidth = (t.high ?? 0) - (t.low ?? 0);
    expect(bootWidth / tWidth).toBeGreaterThan(0.8);
    expect(bootWidth / tWidth).toBeLessThan(1.2);
  });

  test("too few values gives nulls; bad options are typed errors", () => {
    expect(bootstrapMeanCi([1], { seed: 1 }).low).toBeNull();
    expect(() => bootstrapMeanCi([1, 2], { seed: 1, resamples: 10 })).toThrow(/resamples/);
  });
});
