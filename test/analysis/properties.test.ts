import fc from "fast-check";
import { describe, expect, test } from "vitest";
import { analyseFlight } from "../../lib/analysis/index";
import type { RawSample } from "../../lib/analysis/types";
import { KELVIN_DIRECT, SEA_LEVEL_SITE } from "../support/synthetic-profiles";
import { assertAllFinite } from "./assert-finite";

const maybe = <T>(arb: fc.Arbitrary<T>) => fc.option(arb, { nil: null, freq: 5 });

/** Random rows: any finite values (including absurd ones), random gaps in every column. */
const rows = fc.array(
  fc.record({
    elapsedS: fc.double({ min: -1e4, max: 1e5, noNaN: true, noDefaultInfinity: true }),
    altitudeM: maybe(fc.double({ min: -2000, max: 80000, noNaN: true, noDefaultInfinity: true })),
    rawTemperature: maybe(fc.double({ min: 100, max: 400, noNaN: true, noDefaultInfinity: true })),
    pressureHpa: maybe(fc.double({ min: -10, max: 1200, noNaN: true, noDefaultInfinity: true })),
    relativeHumidityPct: maybe(fc.double({ min: -10, max: 120, noNaN: true, noDefaultInfinity: true })),
  }),
  { maxLength: 300 },
).map((rs): RawSample[] => rs.map((r, i) => ({ ...r, latitudeDeg: null, longitudeDeg: null, sourceLine: i + 2 })));

/** Plausible flights: a climb with random rates, lapse rates and noise, in shuffled order. */
const flights = fc
  .record({
    ascentRate: fc.double({ min: 1, max: 10, noNaN: true }),
    lapseKPerKm: fc.double({ min: -5, max: 12, noNaN: true }),
    topM: fc.integer({ min: 200, max: 8000 }),
    seed: fc.integer(),
  })
  .map(({ ascentRate, lapseKPerKm, topM, seed }) => {
    let s = seed >>> 0;
    const rnd = () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 4294967296);
    const out: RawSample[] = [];
    const n = Math.ceil(topM / ascentRate) + 30;
    for (let i = 0; i < n; i++) {
      const z = Math.max(0, (i - 30) * ascentRate) + (rnd() - 0.5) * 10;
      out.push({ elapsedS: i, altitudeM: z, rawTemperature: 288 - (lapseKPerKm * z) / 1000 + (rnd() - 0.5), pressureHpa: null, relativeHumidityPct: null, latitudeDeg: null, longitudeDeg: null, sourceLine: i + 2 });
    }
    return out;
  });

describe("property tests", () => {
  test("any finite random rows: no throw, no NaN/Infinity anywhere", () => {
    fc.assert(
      fc.property(rows, (samples) => {
        const a = analyseFlight({ samples, calibration: KELVIN_DIRECT, site: SEA_LEVEL_SITE });
        assertAllFinite(a);
        expect(a.qc.flags).not.toContain("internal-error");
      }),
      { numRuns: 200, seed: 424242 },
    );
  });

  test("plausible random flights: no NaN, and shuffling rows gives the same answer", () => {
    fc.assert(
      fc.property(flights, fc.integer(), (samples, shuffleSeed) => {
        const shuffled = samples.slice();
        let s = shuffleSeed >>> 0;
        for (let i = shuffled.length - 1; i > 0; i--) {
          s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
          const j = s % (i + 1);
          [shuffled[i], shuffled[j]] = [shuffled[j] as RawSample, shuffled[i] as RawSample];
        }
        const a = analyseFlight({ samples, calibration: KELVIN_DIRECT, site: SEA_LEVEL_SITE });
        const b = analyseFlight({ samples: shuffled, calibration: KELVIN_DIRECT, site: SEA_LEVEL_SITE });
        assertAllFinite(a);
        expect(a.qc.flags).not.toContain("internal-error");
        expect(b.ok).toBe(a.ok);
        expect(b.samples).toEqual(a.samples);
        expect(b.levels).toEqual(a.levels);
        expect(b.layers).toEqual(a.layers);
        expect(b.summary).toEqual(a.summary);
        expect(b.tropopause).toEqual(a.tropopause);
        expect(b.qc.removed).toEqual(a.qc.removed);
      }),
      { numRuns: 60, seed: 777 },
    );
  });

  test("the input array is never mutated", () => {
    fc.assert(
      fc.property(rows, (samples) => {
        const copy = structuredClone(samples);
        analyseFlight({ samples, calibration: KELVIN_DIRECT, site: SEA_LEVEL_SITE });
        expect(samples).toEqual(copy);
      }),
      { numRuns: 50, seed: 99 },
    );
  });
});
