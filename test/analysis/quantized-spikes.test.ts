import { describe, expect, test } from "vitest";
import { hampelSpikeMask } from "../../lib/analysis/filters.ts";

// A 10 mV/K sensor on a 10-bit ADC with a 5 V reference resolves 5/1024 V = 0.488 K per count
// (REFERENCE.md §7 [D]). Invented record: a slow cooling read through that quantiser.
function quantisedRecord(n: number, stepK: number): Float64Array {
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const trueK = 288 - 0.033 * i + 0.1 * Math.sin(i * 1.7); // 5 m/s in 6.5 K/km, with a small wiggle
    out[i] = Math.round(trueK / stepK) * stepK;
  }
  return out;
}

describe("Hampel filter on quantised records", () => {
  const stepK = 5 / 1024 / 0.01;

  test("one-count steps are not spikes", () => {
    const mask = hampelSpikeMask(quantisedRecord(2000, stepK), 7, 3, 0.3);
    expect(mask.reduce((a, b) => a + b, 0)).toBe(0);
  });

  test("a real 5 K spike is still removed", () => {
    const values = quantisedRecord(2000, stepK);
    values[1000] = (values[1000] as number) + 5;
    values[1500] = (values[1500] as number) - 4;
    const mask = hampelSpikeMask(values, 7, 3, 0.3);
    expect(mask[1000]).toBe(1);
    expect(mask[1500]).toBe(1);
    expect(mask.reduce((a, b) => a + b, 0)).toBe(2);
  });
});
