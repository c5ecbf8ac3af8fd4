import { describe, expect, test } from "vitest";
import { fitOrdinaryLeastSquares, medianInPlace, selectKth, solveLeastSquares, theilSenSlope } from "../../lib/analysis/regression";
import { seededUniform } from "../support/synthetic-profiles";

describe("Theil–Sen", () => {
  test("x = 0..4, y = [0, 1, 4, 3, 6] → 1.25", () => {
    expect(theilSenSlope([0, 1, 2, 3, 4], [0, 1, 4, 3, 6])).toBe(1.25); // REFERENCE.md §9, Sen 1968 [D]
  });
  test("equal-x pairs are skipped; null without a usable pair", () => {
    // [D] usable pairs: (1,0)–(2,2) slope 2 and (1,5)–(2,2) slope −3 → median −0.5
    expect(theilSenSlope([1, 1, 2], [0, 5, 2])).toBe(-0.5);
    expect(theilSenSlope([3, 3], [1, 2])).toBeNull();
    expect(theilSenSlope([1], [1])).toBeNull();
  });
});

describe("ordinary least squares", () => {
  test("hand-worked example", () => {
    // [D] x = 1..5, y = [2, 4, 5, 4, 5]: Sxx = 10, Sxy = 6, slope 0.6, intercept 2.2,
    // SSres = Syy − b·Sxy = 6 − 3.6 = 2.4, SE = sqrt(2.4/3/10), r² = 1 − 2.4/6 = 0.6
    const fit = fitOrdinaryLeastSquares([1, 2, 3, 4, 5], [2, 4, 5, 4, 5]);
    expect(fit?.slope).toBeCloseTo(0.6, 12);
    expect(fit?.intercept).toBeCloseTo(2.2, 12);
    expect(fit?.slopeStdErr).toBeCloseTo(Math.sqrt(0.08), 12);
    expect(fit?.rSquared).toBeCloseTo(0.6, 12);
  });
  test("two points: exact line, no standard error; degenerate input is null", () => {
    const two = fitOrdinaryLeastSquares([0, 2], [1, 5]);
    expect(two?.slope).toBe(2);
    expect(two?.slopeStdErr).toBeNull();
    expect(fitOrdinaryLeastSquares([1, 1, 1], [1, 2, 3])).toBeNull();
    expect(fitOrdinaryLeastSquares([1], [1])).toBeNull();
    expect(fitOrdinaryLeastSquares([0, 1, 2], [4, 4, 4])?.rSquared).toBeNull();
  });
  test("x values equal within rounding are no fit, not a slope with a 1e16 standard error", () => {
    // [D] Levels at 1000 m whose altitudes differ only in the last bits (e.g. 1000 and 1000 + 1 ulp after a unit
    // conversion) have no altitude spread to fit: Sxx is round-off, and a slope from it is meaningless.
    const ulp = 1000 * Number.EPSILON;
    expect(fitOrdinaryLeastSquares([1000, 1000 + ulp, 1000 - ulp, 1000], [280, 281, 279, 280])).toBeNull();
    expect(fitOrdinaryLeastSquares([0.1 + 0.2, 0.3, 0.3], [1, 2, 3])).toBeNull();
    // A real spread of a millimetre on a 30 km altitude still fits.
    const fine = fitOrdinaryLeastSquares([30000, 30000.001, 30000.002], [220, 220.001, 220.002]);
    expect(fine?.slope).toBeCloseTo(1, 3);
  });
});

describe("selection and least squares helpers", () => {
  test("selectKth and median agree with sorting on random data", () => {
    const u = seededUniform(42);
    for (let trial = 0; trial < 50; trial++) {
      const n = 1 + Math.floor(u() * 40);
      const values = Float64Array.from({ length: n }, () => Math.round(u() * 20));
      const sorted = Float64Array.from(values).sort();
      const k = Math.floor(u() * n);
      expect(selectKth(Float64Array.from(values), n, k)).toBe(sorted[k]);
      const mid = n >> 1;
      const expected = n % 2 ? (sorted[mid] as number) : ((sorted[mid - 1] as number) + (sorted[mid] as number)) / 2;
      expect(medianInPlace(Float64Array.from(values), n)).toBe(expected);
    }
  });
  test("solveLeastSquares solves an exact system and rejects a rank-deficient one", () => {
    // [D] y = 1 + 2x − 0.5x²
    const xs = [0, 1, 2, 3, 4];
    const c = solveLeastSquares(xs.map((x) => [1, x, x * x]), xs.map((x) => 1 + 2 * x - 0.5 * x * x));
    expect(c?.[0]).toBeCloseTo(1, 10);
    expect(c?.[1]).toBeCloseTo(2, 10);
    expect(c?.[2]).toBeCloseTo(-0.5, 10);
    expect(solveLeastSquares([[1, 2], [2, 4], [3, 6]], [1, 2, 3])).toBeNull();
  });
});
