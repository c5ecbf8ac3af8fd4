import { describe, expect, test } from "vitest";
import { hedgesG } from "@/lib/stats";

describe("hedgesG", () => {
  test("hand-worked example", () => {
    // [D] a = 1..5 (mean 3, var 2.5), b = 3..8 (mean 5.5, var 3.5); pooled var = (4·2.5 + 5·3.5)/9
    const r = hedgesG([1, 2, 3, 4, 5], [3, 4, 5, 6, 7, 8]);
    const sp = Math.sqrt((4 * 2.5 + 5 * 3.5) / 9);
    const d = (3 - 5.5) / sp;
    const j = 1 - 3 / (4 * 11 - 9); // Hedges & Olkin (1985) approximate correction
    expect(r.d).toBeCloseTo(d, 12);
    expect(r.correction).toBeCloseTo(j, 12);
    expect(r.g).toBeCloseTo(j * d, 12);
    // Borenstein et al. (2009) ch. 4: V_d = (nA+nB)/(nA·nB) + d²/(2(nA+nB)), SE_g = J·√V_d
    const se = j * Math.sqrt(11 / 30 + d ** 2 / 22);
    expect(r.standardError).toBeCloseTo(se, 12);
    expect(r.ci95.low).toBeCloseTo(j * d - 1.959964 * se, 5);
    expect(r.ci95.high).toBeCloseTo(j * d + 1.959964 * se, 5);
  });

  test("zero spread or too few values: nulls with warnings", () => {
    expect(hedgesG([1, 1], [1, 1]).g).toBeNull();
    expect(hedgesG([1], [1, 2]).g).toBeNull();
    expect(hedgesG([1], [1, 2]).warnings.length).toBeGreaterThan(0);
  });
});
