import { describe, expect, test } from "vitest";
import { normalCdf, tCdf, tTestPValue } from "@/lib/stats";

// Tail probabilities must keep their precision far out: a p-value below 1e-16 is small, not zero.
describe("normal and t tails without cancellation", () => {
  test.each([
    // Q(x) = P(Z > x). Values of the normal tail to the digits shown [Mem, standard tables of the normal
    // integral, e.g. Abramowitz & Stegun 1964 table 26.1 for small x]; cross-checked below against
    // jstat's incomplete-beta Student t at df = 1e9 [D].
    [3, 1.349898031630095e-3],
    [5, 2.866515718791939e-7],
    [10, 7.619853024160527e-24],
    [20, 2.753624118606233e-89],
  ])("P(Z ≤ −%d) = %e", (x, expected) => {
    expect(normalCdf(-x) / expected).toBeCloseTo(1, 12);
    expect(1 - normalCdf(x)).toBeCloseTo(expected, 15);
  });

  test("the normal tail agrees with a Student t of very many degrees of freedom [D]", () => {
    // t with ν → ∞ tends to the normal; at ν = 1e9 the relative difference is below 1e-5 out to x = 12.
    for (const x of [4, 6, 9, 12]) expect(normalCdf(-x) / tCdf(-x, 1e9)).toBeCloseTo(1, 4);
  });

  test("a p-value below 1e-16 is stored as itself, not 0", () => {
    const p = tTestPValue(12, Infinity, "two-sided");
    expect(p).toBeGreaterThan(0);
    expect(p / (2 * 1.776482112077679e-33)).toBeCloseTo(1, 10); // 2·Q(12) [Mem, as above]
    expect(tTestPValue(40, 30, "greater")).toBeGreaterThan(0);
    expect(normalCdf(-37)).toBeGreaterThan(0);
  });

  test("the centre is unchanged and the function is monotone across the switch at |z| = 3", () => {
    expect(normalCdf(0)).toBe(0.5);
    expect(normalCdf(-1)).toBeCloseTo(0.15865525393145707, 14);
    expect(normalCdf(-3 - 1e-9)).toBeLessThan(normalCdf(-3 + 1e-9));
    expect(normalCdf(3 + 1e-9)).toBeGreaterThan(normalCdf(3 - 1e-9));
  });
});
