/**
 * Files that parse but carry a faulty sensor: a stuck or constant temperature, a temperature that
 * alternates by tens of kelvin, GPS altitudes far out of range replaced by pressure altitudes.
 * Each must be QC-flagged, and a tropopause found in a faulty temperature profile must not count.
 * Profiles are invented (test/support/synthetic-profiles.ts).
 */
import { describe, expect, test } from "vitest";
import { analyseFlight } from "../../lib/analysis/index";
import { detectAlternatingTemperature, detectStuckTemperature } from "../../lib/analysis/filters";
import type { FlightAnalysis, RawSample } from "../../lib/analysis/types";
import { KELVIN_DIRECT, SEA_LEVEL_SITE, piecewiseProfile, standardAtmosphereTemperatureK, syntheticFlight } from "../support/synthetic-profiles";

const run = (samples: readonly RawSample[]): FlightAnalysis => analyseFlight({ samples, calibration: KELVIN_DIRECT, site: SEA_LEVEL_SITE });
const SENSOR_FLAGS = ["temperature-stuck", "temperature-alternating", "implausible-altitudes"];

/** 6.5 K/km to 11 km, isothermal to 20 km, then +1 K/km: the USSA76 shape (REFERENCE.md §1). */
const noisyStandard = (seed: number, extra: Partial<Parameters<typeof syntheticFlight>[0]> = {}) =>
  syntheticFlight({ temperatureAtAltitudeK: standardAtmosphereTemperatureK, topM: 24000, noiseK: 0.15, seed, ...extra });

/** The sensor's reading frozen at the value it had when the balloon passed fromM (until untilM, if given). */
function freezeAbove(samples: readonly RawSample[], fromM: number, untilM = Number.POSITIVE_INFINITY): RawSample[] {
  let frozen: number | null = null;
  let climbed = false;
  return samples.map((s) => {
    const z = s.altitudeM ?? 0;
    if (!climbed && z >= fromM) {
      climbed = true;
      frozen = s.rawTemperature;
    }
    if (climbed && z >= untilM) climbed = false;
    return climbed && frozen !== null && z >= fromM ? { ...s, rawTemperature: frozen } : s;
  });
}

/** Rounds readings to a logger step (K). */
const quantise = (samples: readonly RawSample[], stepK: number): RawSample[] =>
  samples.map((s) => ({ ...s, rawTemperature: Math.round((s.rawTemperature as number) / stepK) * stepK }));

/** Longest run of identical readings in the input, with its altitude span. */
function longestRun(samples: readonly RawSample[]): { count: number; spanM: number } {
  let best = { count: 0, spanM: 0 };
  let start = 0;
  for (let i = 1; i <= samples.length; i++) {
    if (i < samples.length && samples[i]?.rawTemperature === samples[start]?.rawTemperature) continue;
    const spanM = Math.abs((samples[i - 1]?.altitudeM ?? 0) - (samples[start]?.altitudeM ?? 0));
    if (i - start > best.count) best = { count: i - start, spanM };
    start = i;
  }
  return best;
}

describe("stuck or constant temperature", () => {
  test("the noiseless 1976 standard atmosphere (9 km of one reading, 11–20 km) is not a stuck sensor", () => {
    const samples = syntheticFlight({ temperatureAtAltitudeK: standardAtmosphereTemperatureK, topM: 24000 });
    expect(longestRun(samples).spanM).toBeGreaterThan(8500); // [D] the isothermal layer 11–20 km (geopotential)
    const a = run(samples);
    expect(a.qc.flags).not.toContain("temperature-stuck");
    expect(a.tropopause.first.status).toBe("found");
    expect(Math.abs((a.summary.tropopauseAltitudeM ?? 0) - 11020)).toBeLessThan(150); // REFERENCE.md §2 [D] Z ≈ 11.02 km
  });

  test("a noisy standard atmosphere and a coarse logger's long stays on one count are not stuck either", () => {
    expect(run(noisyStandard(3)).qc.flags).not.toContain("temperature-stuck");
    // [P] a 0.8 K logger step with 0.15 K noise holds one count for hundreds of metres when the air sits mid-step
    // (216.65 K is count 271 of 216.65/271 K): the readings then move on by one step, as the air does.
    const coarse = quantise(noisyStandard(5), 216.65 / 271);
    const held = longestRun(coarse);
    expect(held.count).toBeGreaterThanOrEqual(30);
    expect(held.spanM).toBeGreaterThanOrEqual(500);
    const a = run(coarse);
    expect(a.qc.flags).not.toContain("temperature-stuck");
    expect(a.tropopause.first.status).toBe("found");
  });

  test("a sensor stuck above 6 km is flagged and its false 6 km tropopause does not count", () => {
    const a = run(freezeAbove(noisyStandard(7), 6000));
    expect(a.ok).toBe(true);
    expect(a.qc.flags).toContain("temperature-stuck");
    const warning = a.qc.warnings.find((w) => w.code === "temperature-stuck");
    expect(warning?.message).toMatch(/lines \d+–\d+/);
    expect(a.tropopause.first.status).toBe("undetermined");
    if (a.tropopause.first.status === "undetermined") {
      // [D] the frozen reading makes a 0 K/km layer from 6 km: the WMO test would take it as the tropopause
      expect(Math.abs((a.tropopause.first.candidateAltitudeM ?? 0) - 6000)).toBeLessThan(200);
    }
    expect(a.summary.tropopauseAltitudeM).toBeNull();
    expect(a.summary.tropopauseTemperatureK).toBeNull();
    expect(a.qc.flags).toContain("tropopause-undetermined");
  });

  test("a sensor stuck from 3 to 6 km that then recovers is flagged", () => {
    const a = run(freezeAbove(noisyStandard(9), 3000, 6000));
    expect(a.qc.flags).toContain("temperature-stuck");
  });

  test("one reading for the whole flight is flagged", () => {
    const samples = syntheticFlight({ temperatureAtAltitudeK: () => 251.3, topM: 15000 });
    const a = run(samples);
    expect(a.qc.flags).toContain("temperature-stuck");
    expect(a.summary.tropopauseAltitudeM).toBeNull();
  });

  test("detector: a short flat stretch (under 500 m) is not stuck", () => {
    const samples = freezeAbove(noisyStandard(11), 4000, 4400);
    const altitudeM = Float64Array.from(samples, (s) => s.altitudeM ?? 0);
    const temperatureK = Float64Array.from(samples, (s) => s.rawTemperature ?? 0);
    expect(detectStuckTemperature(altitudeM, temperatureK)).toBeNull();
    const longer = freezeAbove(noisyStandard(11), 4000, 4800);
    const span = detectStuckTemperature(Float64Array.from(longer, (s) => s.altitudeM ?? 0), Float64Array.from(longer, (s) => s.rawTemperature ?? 0));
    expect(span?.altitudeSpanM ?? 0).toBeGreaterThan(700);
    // [D] 6.5 K/km over the ~800 m the reading hid
    expect(span?.hiddenChangeK ?? 0).toBeGreaterThan(4);
  });
});

describe("alternating temperature", () => {
  /** Every other reading from fromM up is off by offsetK. */
  const alternate = (samples: readonly RawSample[], fromM: number, offsetK: number): RawSample[] =>
    samples.map((s, i) => ((s.altitudeM ?? 0) >= fromM && i % 2 === 1 ? { ...s, rawTemperature: (s.rawTemperature as number) + offsetK } : s));

  test("readings alternating by 30 K from 3 km up are flagged and no tropopause counts", () => {
    const a = run(alternate(noisyStandard(13), 3000, 30));
    expect(a.qc.flags).toContain("temperature-alternating");
    expect(a.summary.tropopauseAltitudeM).toBeNull();
    expect(a.tropopause.first.status).not.toBe("found");
  });

  test("every other reading impossible (a loose contact reading 400 K) is flagged, not half-used", () => {
    const a = run(noisyStandard(14).map((s, i) => ((s.altitudeM ?? 0) >= 2000 && i % 2 === 1 ? { ...s, rawTemperature: 400 } : s)));
    expect(a.qc.removed.outOfRange).toBeGreaterThan(1000);
    expect(a.qc.flags).toContain("temperature-alternating");
    expect(a.summary.tropopauseAltitudeM).toBeNull();
  });

  test("a few isolated 30 K spikes are the spike filter's job, not a faulty sensor", () => {
    const samples = noisyStandard(15).map((s, i) => ([1500, 2600, 3900].includes(i) ? { ...s, rawTemperature: (s.rawTemperature as number) + 30 } : s));
    const a = run(samples);
    expect(a.qc.flags).not.toContain("temperature-alternating");
    expect(a.qc.removed.temperatureSpikes).toBeGreaterThanOrEqual(3);
    expect(a.tropopause.first.status).toBe("found");
  });

  test("detector: 10 K is the step, four zigzags in a row the run", () => {
    const base = Array.from({ length: 200 }, (_, i) => 280 - i * 0.03);
    const withZigzags = (count: number, stepK: number) => Float64Array.from(base, (t, i) => (i >= 50 && i < 50 + count && i % 2 === 0 ? t + stepK : t));
    expect(detectAlternatingTemperature(withZigzags(8, 12))?.longestRun).toBeGreaterThanOrEqual(4);
    expect(detectAlternatingTemperature(withZigzags(8, 8))).toBeNull(); // under 10 K [P]
    expect(detectAlternatingTemperature(withZigzags(2, 12))).toBeNull(); // one spike: a glitch
  });
});

describe("GPS altitudes replaced by pressure altitudes", () => {
  const withPressure = (seed: number) =>
    syntheticFlight({ temperatureAtAltitudeK: piecewiseProfile([[0, 288], [11000, 216.5], [20000, 216.5]]), topM: 20000, withPressure: true, noiseK: 0.1, seed });

  test.each([
    ["×400 (a wrong unit)", (z: number) => z * 400],
    ["negative", (z: number) => -z - 1000],
  ])("GPS altitudes %s: the pressure fallback is kept and the flight is flagged", (_name, corrupt) => {
    const samples = withPressure(17).map((s) => ({ ...s, altitudeM: s.altitudeM === null ? null : corrupt(s.altitudeM) }));
    const a = run(samples);
    expect(a.ok).toBe(true);
    expect(a.qc.flags).toContain("altitude-from-pressure");
    expect(a.qc.flags).toContain("implausible-altitudes");
    expect(Math.abs((a.summary.burstAltitudeM ?? 0) - 20000)).toBeLessThan(100); // [D] hydrostatic consistency
  });

  test("no altitude readings at all, or a few glitch rows, stay informational", () => {
    expect(run(withPressure(19).map((s) => ({ ...s, altitudeM: null }))).qc.flags).not.toContain("implausible-altitudes");
    const glitches = withPressure(19).map((s, i) => (i % 1000 === 500 ? { ...s, altitudeM: -5000 } : s));
    const a = run(glitches);
    expect(a.qc.flags).toContain("altitude-from-pressure");
    expect(a.qc.flags).not.toContain("implausible-altitudes");
  });
});

test("clean synthetic flights raise none of these flags", () => {
  for (const samples of [noisyStandard(21), withNoise(22), syntheticFlight({ temperatureAtAltitudeK: standardAtmosphereTemperatureK, topM: 30000, descentRateMPerS: 10 })]) {
    const flags = run(samples).qc.flags;
    for (const flag of SENSOR_FLAGS) expect(flags).not.toContain(flag);
  }
});

function withNoise(seed: number): RawSample[] {
  return syntheticFlight({ temperatureAtAltitudeK: standardAtmosphereTemperatureK, topM: 30000, noiseK: 0.3, seed, withPressure: true, descentRateMPerS: 12 });
}
