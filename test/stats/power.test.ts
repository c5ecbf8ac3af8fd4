import { describe, expect, test } from "vitest";
import { minimumDetectableDifference, normalQuantile } from "@/lib/stats";

describe("minimumDetectableDifference", () => {
  test("two-sample, α = 0.05 two-sided, power 0.8", () => {
    const r = minimumDetectableDifference({ sd: 1, nA: 63, nB: 63 });
    // [P] the familiar 1.96 + 0.84 ≈ 2.80 multiplier; n ≈ 63 per group detects d = 0.5 [D: 2·2.8²/0.25 ≈ 62.8]
    expect(r.zAlpha + r.zPower).toBeCloseTo(2.8, 1);
    expect(r.difference).toBeCloseTo(0.5, 2);
    expect(r.design).toBe("two-sample");
  });

  test("one-sample and one-sided cases", () => {
    const one = minimumDetectableDifference({ sd: 2, nA: 25, alternative: "greater", power: 0.9 });
    // [D] (z_0.95 + z_0.90)·2/√25 with z_0.95 = 1.645, z_0.90 = 1.2816 [S: standard normal table]
    expect(one.difference).toBeCloseTo((1.6449 + 1.2816) * 0.4, 3);
    expect(one.design).toBe("one-sample");
    expect(one.zAlpha).toBeCloseTo(normalQuantile(0.95), 12);
  });

  test("bad input is a typed error", () => {
    expect(() => minimumDetectableDifference({ sd: 0, nA: 10 })).toThrow(/sd/);
    expect(() => minimumDetectableDifference({ sd: 1, nA: 10, power: 1 })).toThrow(/power/);
  });
});
