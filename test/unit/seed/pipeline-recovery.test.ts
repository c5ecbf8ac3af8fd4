/**
 * The demo files go through the real parser and analysis core and come back out close to
 * the truth they were built from. Tolerances are what the generator's own error sources
 * allow [D]: sensor lag τ·w (≤ 8 s · 5.5 m/s ≈ 45 m) plus 100 m binning and 2 s rows for the
 * tropopause; noise and ADC steps for the lapse rate.
 */
import { describe, expect, test } from "vitest";
import { analyseFlight } from "@/lib/analysis";
import { loggerLayoutSpecSchema } from "@/lib/ingest/layout";
import { parseLoggerFile } from "@/lib/ingest/parse";
import { generateDemoProgram } from "@/seed/demo-program";

const program = generateDemoProgram();

test.each(program.layouts)("layout $key passes the ingest layout schema", ({ spec }) => {
  expect(loggerLayoutSpecSchema.safeParse(spec).success).toBe(true);
});

describe("analysis of demo flights recovers their truth", () => {
  const sampled = program.flights.filter((_, i) => i % 5 === 0);

  test.each(sampled.map((flight) => ({ key: flight.key, flight })))("$key", async ({ flight }) => {
    const layout = program.layouts.find((l) => l.key === flight.layoutKey)?.spec;
    const sensor = program.sensors.find((s) => s.key === flight.sensorKey);
    const site = program.sites.find((s) => s.key === flight.siteKey);
    const launchMs = Date.parse(flight.launchAtUtc);
    const calibration = sensor?.calibrations.find(
      (c) => Date.parse(c.validFromUtc) <= launchMs && (c.validToUtc === null || launchMs < Date.parse(c.validToUtc)),
    );
    if (!layout || !site || !calibration) throw new Error(`incomplete demo flight ${flight.key}`);

    const parsed = await parseLoggerFile(flight.content, layout, { fileName: flight.fileName, mode: "strict" });
    expect(parsed.skippedRows).toEqual([]);
    if (layout.columns.time.format === "iso-datetime") {
      expect(parsed.fileStartUtc?.toISOString().replace(".000Z", "Z")).toBe(flight.fileStartUtc);
    }

    const analysis = analyseFlight({ samples: parsed.samples, calibration: calibration.spec, site });
    const summary = analysis.summary;
    expect(analysis.ok).toBe(true);
    expect(summary.hasDescent).toBe(flight.truth.hasDescent);
    expect(Math.abs((summary.tropopauseAltitudeM ?? Infinity) - flight.truth.tropopauseAltitudeM)).toBeLessThan(300);
    expect(Math.abs((summary.troposphericLapseRateKPerKm ?? Infinity) - flight.truth.lapseRateKPerKm)).toBeLessThan(0.3);
    expect(Math.abs((summary.burstAltitudeM ?? Infinity) - flight.truth.burstAltitudeM)).toBeLessThan(100);
    if (flight.truth.surfaceInversionStrengthK >= 2) expect(summary.hasSurfaceInversion).toBe(true);
    if (flight.truth.surfaceInversionDepthM === 0) expect(summary.hasSurfaceInversion).toBe(false);
  });
});

test("no demo flight looks like a faulty sensor or an implausible altitude column", async () => {
  // The demo's quantised thermistors hold one count for up to ~70 rows near a cold tropopause, and a few
  // GPS spikes fall below −500 m: neither may be taken for a fault (the demo must stay unflagged).
  const faultFlags = ["temperature-stuck", "temperature-alternating", "implausible-altitudes"];
  const flagged: string[] = [];
  for (const flight of program.flights) {
    const layout = program.layouts.find((l) => l.key === flight.layoutKey)?.spec;
    const sensor = program.sensors.find((s) => s.key === flight.sensorKey);
    const site = program.sites.find((s) => s.key === flight.siteKey);
    const launchMs = Date.parse(flight.launchAtUtc);
    const calibration = sensor?.calibrations.find(
      (c) => Date.parse(c.validFromUtc) <= launchMs && (c.validToUtc === null || launchMs < Date.parse(c.validToUtc)),
    );
    if (!layout || !site || !calibration) throw new Error(`incomplete demo flight ${flight.key}`);
    const parsed = await parseLoggerFile(flight.content, layout, { fileName: flight.fileName, mode: "strict", clockAnchorUtc: new Date(launchMs) });
    const analysis = analyseFlight({ samples: parsed.samples, calibration: calibration.spec, site });
    for (const flag of analysis.qc.flags) if (faultFlags.includes(flag)) flagged.push(`${flight.key}: ${flag}`);
  }
  expect(program.flights.length).toBeGreaterThanOrEqual(120);
  expect(flagged).toEqual([]);
}, 120_000);
