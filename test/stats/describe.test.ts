import fc from "fast-check";
import { describe as suite, expect, test } from "vitest";
import { describe, quantile } from "@/lib/stats";

suite("describe", () => {
  // Hand-worked sample [D]: sorted 2 4 4 4 5 5 7 9, sum 40, squared deviations sum 32.
  const sample = [5, 2, 9, 4, 4, 7, 4, 5];

  test("summary of a hand-worked sample", () => {
    const d = describe(sample);
    expect(d.n).toBe(8);
    expect(d.nonFiniteDropped).toBe(0);
    expect(d.mean).toBe(40 / 8); // [D] 40 / 8
    expect(d.sd).toBeCloseTo(Math.sqrt(32 / 7), 12); // [D] Σ(x − 5)² = 32, n − 1 = 7
    expect(d.sem).toBeCloseTo(Math.sqrt(32 / 7) / Math.sqrt(8), 12); // [D] sd/√n
    // Type 7: h = (n − 1)p. p = 0.25 → h = 1.75 between x[1] = 4 and x[2] = 4 → 4 [D]
    expect(d.q1).toBe(4);
    // p = 0.5 → h = 3.5 between 4 and 5 → 4.5 [D]
    expect(d.median).toBe(4.5);
    // p = 0.75 → h = 5.25 between 5 and 7 → 5 + 0.25·2 = 5.5 [D]
    expect(d.q3).toBe(5.5);
    expect(d.iqr).toBe(1.5);
    expect(d.min).toBe(2);
    expect(d.max).toBe(9);
    // 95 % CI with t(0.975, 7) = 2.365 [S: Student t table, df 7]; 3-decimal table value → 2e-3 tolerance
    const half = (2.365 * Math.sqrt(32 / 7)) / Math.sqrt(8);
    expect(d.ci95Low).toBeCloseTo(5 - half, 2);
    expect(d.ci95High).toBeCloseTo(5 + half, 2);
    expect(d.warnings).toEqual([]);
  });

  test("does not mutate its input", () => {
    const input = [3, 1, 2];
    describe(input);
    expect(input).toEqual([3, 1, 2]);
  });

  test.each([
    // R: quantile(1:10) gives 1, 3.25, 5.5, 7.75, 10 with the default type 7 [P; recomputed by h = 9p [D]]
    { p: 0, expected: 1 },
    { p: 0.25, expected: 3.25 },
    { p: 0.5, expected: 5.5 },
    { p: 0.75, expected: 7.75 },
    { p: 1, expected: 10 },
    { p: 0.1, expected: 1.9 }, // [D] h = 0.9 → 1 + 0.9·(2 − 1)
  ])("type-7 quantile of 1..10 at p = $p", ({ p, expected }) => {
    const values = Array.from({ length: 10 }, (_, i) => 10 - i);
    expect(quantile(values, p)).toBeCloseTo(expected, 12);
  });

  test("ignores non-finite values and says so", () => {
    const d = describe([1, Number.NaN, 3, Number.POSITIVE_INFINITY, Number.NEGATIVE_INFINITY]);
    expect(d.n).toBe(2);
    expect(d.nonFiniteDropped).toBe(3);
    expect(d.mean).toBe(2);
    expect(d.warnings.some((w) => w.includes("3 non-finite"))).toBe(true);
  });

  test("undefined fields are null for n = 0 and n = 1", () => {
    const empty = describe([]);
    expect(empty.n).toBe(0);
    expect([empty.mean, empty.sd, empty.median, empty.q1, empty.min, empty.ci95Low]).toEqual([
      null,
      null,
      null,
      null,
      null,
      null,
    ]);
    const one = describe([7.5]);
    expect(one.mean).toBe(7.5);
    expect(one.median).toBe(7.5);
    expect(one.q1).toBe(7.5);
    expect(one.sd).toBeNull();
    expect(one.sem).toBeNull();
    expect(one.ci95Low).toBeNull();
    expect(one.ci95High).toBeNull();
    expect(one.warnings.length).toBeGreaterThan(0);
  });

  test("constant sample has zero spread and a degenerate interval", () => {
    const d = describe([4, 4, 4]);
    expect(d.sd).toBe(0);
    expect(d.ci95Low).toBe(4);
    expect(d.ci95High).toBe(4);
  });

  test("tiny values do not underflow when squared", () => {
    // [D] same shape as [1, 2, 3] scaled by 1e-200: sd = 1e-200
    const d = describe([1e-200, 2e-200, 3e-200]);
    expect(d.sd).not.toBe(0);
    expect((d.sd ?? 0) / 1e-200).toBeCloseTo(1, 10);
  });

  test("property: never NaN or Infinity for finite input, and order statistics are ordered", () => {
    fc.assert(
      fc.property(fc.array(fc.double({ noNaN: true, noDefaultInfinity: true }), { maxLength: 60 }), (values) => {
        const d = describe(values);
        for (const [key, value] of Object.entries(d)) {
          if (typeof value === "number") {
            expect(Number.isFinite(value), `${key} = ${value}`).toBe(true);
          }
        }
        if (d.n > 0) {
          const chain = [d.min, d.q1, d.median, d.q3, d.max];
          expect(chain.every((v) => v !== null)).toBe(true);
          for (let i = 1; i < chain.length; i++) expect(chain[i] ?? 0).toBeGreaterThanOrEqual(chain[i - 1] ?? 0);
          if (d.mean !== null) {
            expect(d.mean).toBeGreaterThanOrEqual(d.min ?? 0);
            expect(d.mean).toBeLessThanOrEqual(d.max ?? 0);
          }
        }
        if (d.sd !== null) expect(d.sd).toBeGreaterThanOrEqual(0);
      }),
      { numRuns: 1000, seed: 6_5 },
    );
  });
});
