import fc from "fast-check";
import { describe, expect, test } from "vitest";
import {
  bootstrapMeanCi,
  hedgesG,
  mannWhitneyU,
  meanConfidenceInterval,
  oneSampleTTest,
  pooledTTest,
  welchTTest,
} from "@/lib/stats";

// Common brief: a returned number field is never NaN or ±Infinity (null plus a warning instead).
function nonFiniteNumbers(value: unknown, path = "result"): string[] {
  if (typeof value === "number") return Number.isFinite(value) ? [] : [`${path} = ${value}`];
  if (Array.isArray(value)) return value.flatMap((v, i) => nonFiniteNumbers(v, `${path}[${i}]`));
  if (value !== null && typeof value === "object") {
    return Object.entries(value).flatMap(([k, v]) => nonFiniteNumbers(v, `${path}.${k}`));
  }
  return [];
}

// Mix ordinary magnitudes with extremes, ties and tiny samples.
const sample = fc.array(
  fc.oneof(
    fc.double({ noNaN: true, noDefaultInfinity: true }),
    fc.double({ min: -50, max: 50, noNaN: true }),
    fc.integer({ min: -3, max: 3 }),
  ),
  { maxLength: 25 },
);

describe("every lib/stats result is free of NaN and Infinity for finite input", () => {
  test("one-sample functions", () => {
    fc.assert(
      fc.property(sample, fc.double({ min: -100, max: 100, noNaN: true }), (values, mu0) => {
        expect(nonFiniteNumbers(meanConfidenceInterval(values))).toEqual([]);
        expect(nonFiniteNumbers(oneSampleTTest(values, mu0, "two-sided"))).toEqual([]);
        expect(nonFiniteNumbers(oneSampleTTest(values, mu0, "greater"))).toEqual([]);
        expect(nonFiniteNumbers(bootstrapMeanCi(values, { seed: 3, resamples: 200 }))).toEqual([]);
      }),
      { numRuns: 300, seed: 11 },
    );
  });

  test("two-sample functions", () => {
    fc.assert(
      fc.property(sample, sample, (a, b) => {
        expect(nonFiniteNumbers(welchTTest(a, b))).toEqual([]);
        expect(nonFiniteNumbers(pooledTTest(a, b, "less"))).toEqual([]);
        expect(nonFiniteNumbers(hedgesG(a, b))).toEqual([]);
        expect(nonFiniteNumbers(mannWhitneyU(a, b))).toEqual([]);
      }),
      { numRuns: 300, seed: 12 },
    );
  });

  test("p-values lie in [0, 1]", () => {
    fc.assert(
      fc.property(sample, sample, (a, b) => {
        for (const p of [welchTTest(a, b).p, mannWhitneyU(a, b, "greater").p, oneSampleTTest(a, 0).p]) {
          if (p !== null) {
            expect(p).toBeGreaterThanOrEqual(0);
            expect(p).toBeLessThanOrEqual(1);
          }
        }
      }),
      { numRuns: 300, seed: 13 },
    );
  });
});
