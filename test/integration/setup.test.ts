import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { calibrateReading } from "../../lib/analysis/calibration.ts";
import { DEFAULT_ANALYSIS_PARAMETERS, type TemperatureCalibration } from "../../lib/analysis/types.ts";
import {
  createCalibration, createPayload, ingestFlightFile, OverlappingCalibrationError, reprocessFlights, selectFlights, updateCalibration,
} from "../../lib/ingest/index.ts";
import {
  CalibrationFitError, fitCalibrationPoints, mountSensor, SetupConflictError, setProgramParameters, updateLayout, updateSite,
} from "../../lib/ingest/setup-more.ts";
import { COMMA_COUNTS_LAYOUT, LINEAR_10BIT_CALIBRATION } from "../../seed/demo-files.ts";
import { makeFlightFile, setUpSchool } from "../support/flight-files.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";

const K0 = 273.15; // 0 °C in K, SI definition

/** [D] the nominal 10 mV/K sensor on a 10-bit 5 V ADC: T = counts·5/1024 V ÷ 10 mV/K. */
const nominalK = (counts: number) => ((counts * 5) / 1024) * 100;

describe("calibration helper fit (no database)", () => {
  test.each([
    { gain: 0.98, offsetK: -1.5, raws: [560, 600] },
    { gain: 1.012, offsetK: -5.05, raws: [540, 640] },
    { gain: 1, offsetK: 0.7, raws: [555, 590] },
  ])("two pairs give the exact gain/offset correction (gain $gain, offset $offsetK K)", ({ gain, offsetK, raws }) => {
    // [D] references made with T' = gain·T_nominal + offset, so the fit must recover gain and offset exactly
    const points = raws.map((raw) => ({ raw, referenceC: gain * nominalK(raw) + offsetK - K0 }));
    const fit = fitCalibrationPoints({ template: LINEAR_10BIT_CALIBRATION, points });
    expect(fit.method).toBe("two-point");
    expect(fit.fitted).toBe("correction");
    expect(fit.calibration.sensor).toEqual(LINEAR_10BIT_CALIBRATION.sensor);
    expect(fit.calibration.correction?.gain).toBeCloseTo(gain, 9);
    expect(fit.calibration.correction?.offsetK).toBeCloseTo(offsetK, 7);
    // [D] a line through two points leaves no residual
    for (const p of fit.points) expect(Math.abs(p.residualK ?? Number.NaN)).toBeLessThan(1e-9);
    expect(fit.coefficients.map((c) => c.name)).toEqual(["gain", "offset"]);
  });

  test("a correction on the template is replaced, not compounded", () => {
    const points = [{ raw: 560, referenceC: nominalK(560) - K0 }, { raw: 600, referenceC: nominalK(600) - K0 }];
    const fit = fitCalibrationPoints({ template: { ...LINEAR_10BIT_CALIBRATION, correction: { gain: 1.1, offsetK: 3 } }, points });
    // [D] references equal the nominal model, so the correction is the identity
    expect(fit.calibration.correction?.gain).toBeCloseTo(1, 9);
    expect(fit.calibration.correction?.offsetK).toBeCloseTo(0, 7);
  });

  test("three or more pairs refit the model by least squares", () => {
    const truth: TemperatureCalibration = { ...LINEAR_10BIT_CALIBRATION, sensor: { kind: "linear-voltage", scaleMvPerK: 10.2, offsetV: 0.01 } };
    // [D] references computed from a 10.2 mV/K, +10 mV sensor: least squares must return those values
    const points = [520, 560, 600, 640].map((raw) => {
      const t = calibrateReading(truth, raw);
      if (!t.ok) throw new Error("bad fixture");
      return { raw, referenceC: t.temperatureK - K0 };
    });
    const fit = fitCalibrationPoints({ template: LINEAR_10BIT_CALIBRATION, points });
    expect(fit.method).toBe("least-squares");
    expect(fit.fitted).toBe("model");
    expect(fit.calibration.sensor).toMatchObject({ kind: "linear-voltage" });
    if (fit.calibration.sensor.kind !== "linear-voltage") throw new Error("model kind changed");
    expect(fit.calibration.sensor.scaleMvPerK).toBeCloseTo(10.2, 8);
    expect(fit.calibration.sensor.offsetV).toBeCloseTo(0.01, 10);
    expect(fit.rmsResidualK).toBeLessThan(1e-8);
  });

  test("with noisy pairs the RMS residual is the root mean square of the residuals shown", () => {
    const points = [{ raw: 556, referenceC: 0.1 }, { raw: 597, referenceC: 19.6 }, { raw: 640, referenceC: 41.2 }, { raw: 520, referenceC: -18.3 }];
    const fit = fitCalibrationPoints({ template: LINEAR_10BIT_CALIBRATION, points, fit: "correction" });
    expect(fit.method).toBe("least-squares");
    const residuals = fit.points.map((p) => p.residualK ?? Number.NaN);
    // [D] recomputed from the residuals and from fitted − reference
    expect(fit.rmsResidualK).toBeCloseTo(Math.sqrt(residuals.reduce((s, r) => s + r * r, 0) / residuals.length), 12);
    for (const p of fit.points) expect(p.residualK).toBeCloseTo((p.fittedC ?? Number.NaN) - p.referenceC, 12);
    // [D] least squares: residuals of a fit with an intercept sum to zero
    expect(residuals.reduce((s, r) => s + r, 0)).toBeCloseTo(0, 8);
    expect(fit.rmsResidualK).toBeGreaterThan(0.01);
  });

  test("the curve spans the readings and passes through the fitted values", () => {
    const fit = fitCalibrationPoints({ template: LINEAR_10BIT_CALIBRATION, points: [{ raw: 560, referenceC: 0 }, { raw: 600, referenceC: 20 }] });
    const first = fit.curve[0];
    const last = fit.curve.at(-1);
    expect(first && first.raw).toBeLessThan(560);
    expect(last && last.raw).toBeGreaterThan(600);
    // [D] the curve is linear here: interpolate it at a point's reading and compare with that point's fitted value
    const slope = ((last?.temperatureC ?? 0) - (first?.temperatureC ?? 0)) / ((last?.raw ?? 1) - (first?.raw ?? 0));
    expect((first?.temperatureC ?? 0) + slope * (560 - (first?.raw ?? 0))).toBeCloseTo(0, 9);
  });

  test.each([
    { name: "model refit with two pairs", input: { points: [{ raw: 560, referenceC: 0 }, { raw: 600, referenceC: 20 }], fit: "model" as const } },
    { name: "the same reading twice", input: { points: [{ raw: 560, referenceC: 0 }, { raw: 560, referenceC: 20 }] } },
    { name: "a reading the model cannot convert", input: { points: [{ raw: -5000, referenceC: 0 }, { raw: 600, referenceC: 20 }] } },
  ])("refuses with a plain message: $name", ({ input }) => {
    expect(() => fitCalibrationPoints({ template: LINEAR_10BIT_CALIBRATION, ...input })).toThrow(CalibrationFitError);
  });

  test("fewer than two pairs fail validation", () => {
    expect(() => fitCalibrationPoints({ template: LINEAR_10BIT_CALIBRATION, points: [{ raw: 560, referenceC: 0 }] })).toThrow(/at least two/);
  });
});

describe.each(testEngines())("setup writers on %s", (engine) => {
  let database: TestDatabase;
  let ids: Awaited<ReturnType<typeof setUpSchool>>;
  let flightId: string;
  const file = makeFlightFile({ seed: 31 });

  beforeAll(async () => {
    database = await createTestDatabase(engine);
    ids = await setUpSchool(database.db, "Setup Test School");
    const result = await ingestFlightFile(database.db, {
      file: { name: "setup-flight.csv", bytes: file.bytes },
      metadata: { schoolId: ids.school.id, siteId: ids.site.id, layoutId: ids.layout.id, sensorId: ids.sensor.id, launchAtUtc: file.launchAtUtc.toISOString() },
    });
    flightId = result.flightId;
  });
  afterAll(async () => database?.drop());

  test("a site is corrected with the shared validation", async () => {
    const db = database.db;
    await expect(updateSite(db, ids.site.id, { name: "Test Field", latitudeDeg: 95, longitudeDeg: 9.2, elevationM: 200, timeZone: "Europe/Berlin" })).rejects.toThrow(/Latitude/);
    await expect(updateSite(db, ids.site.id, { name: "Test Field", latitudeDeg: 48.1, longitudeDeg: 9.2, elevationM: 200, timeZone: "Europe/Atlantis" })).rejects.toThrow(/IANA/);
    const site = await updateSite(db, ids.site.id, { name: "Test Field East", latitudeDeg: 48.15, longitudeDeg: 9.25, elevationM: 210, timeZone: "Europe/Berlin" });
    expect(site).toMatchObject({ name: "Test Field East", latitudeDeg: 48.15, elevationM: 210 });
    expect(await db.auditEvent.count({ where: { action: "site.update", entityId: ids.site.id } })).toBe(1);
  });

  test("a sensor sits in one payload at a time: moving closes the open mount, overlaps are refused", async () => {
    const db = database.db;
    const box2 = await createPayload(db, { schoolId: ids.school.id, name: "Box 2" });
    const movedAt = new Date("2024-01-01T00:00:00Z");
    await mountSensor(db, { sensorId: ids.sensor.id, payloadId: box2.id, fromUtc: movedAt });
    const mounts = await db.sensorMount.findMany({ where: { sensorId: ids.sensor.id }, orderBy: { fromUtc: "asc" } });
    expect(mounts.map((m) => [m.payloadId, m.toUtc?.toISOString() ?? null])).toEqual([[ids.payload.id, movedAt.toISOString()], [box2.id, null]]);

    const clash = mountSensor(db, { sensorId: ids.sensor.id, payloadId: ids.payload.id, fromUtc: "2023-06-01T00:00:00Z", toUtc: "2023-07-01T00:00:00Z" });
    await expect(clash).rejects.toThrow(SetupConflictError);
    await expect(clash).rejects.toThrow(/already in payload Box 1 from 1970-01-01 to 2024-01-01/);

    const otherSchool = await setUpSchool(db, "Other Setup School");
    await expect(mountSensor(db, { sensorId: ids.sensor.id, payloadId: otherSchool.payload.id, fromUtc: "2025-01-01T00:00:00Z" })).rejects.toThrow(/does not belong/);
    expect(await db.sensorMount.count({ where: { sensorId: ids.sensor.id } })).toBe(2);
  });

  test("an overlapping calibration is refused with a message naming the other one; adjacent periods are fine", async () => {
    const db = database.db;
    const attempt = createCalibration(db, { sensorId: ids.sensor.id, spec: LINEAR_10BIT_CALIBRATION, validFromUtc: new Date("2024-03-01T00:00:00Z"), method: "two-point" });
    await expect(attempt).rejects.toThrow(OverlappingCalibrationError);
    await expect(attempt).rejects.toThrow(`overlaps calibration ${ids.calibration.id} (valid 2020-01-01 to open end)`);
    expect(await db.calibration.count({ where: { sensorId: ids.sensor.id } })).toBe(1);

    // [D] validity is half-open [from, to): a period starting where the other ends does not overlap
    const far = new Date("2030-01-01T00:00:00Z");
    await updateCalibration(db, ids.calibration.id, { sensorId: ids.sensor.id, spec: LINEAR_10BIT_CALIBRATION, validFromUtc: new Date("2020-01-01T00:00:00Z"), validToUtc: far, method: "datasheet" });
    const next = await createCalibration(db, { sensorId: ids.sensor.id, spec: LINEAR_10BIT_CALIBRATION, validFromUtc: far, method: "two-point" });
    expect(next.validFromUtc.toISOString()).toBe(far.toISOString());
  });

  test("a changed layout lists its flights for re-analysis, and the stored run keeps the old spec", async () => {
    const db = database.db;
    const renamed = { ...COMMA_COUNTS_LAYOUT, name: "Comma logger, counts (v2)" };
    const layout = await updateLayout(db, ids.layout.id, { spec: renamed });
    expect(layout.name).toBe("Comma logger, counts (v2)");
    expect(await selectFlights(db, { layoutId: ids.layout.id })).toEqual([flightId]);
    const run = await db.analysisRun.findFirstOrThrow({ where: { flightId, isCurrent: true } });
    expect(run.layoutSpec).toEqual(COMMA_COUNTS_LAYOUT);
    await expect(updateLayout(db, ids.layout.id, { spec: { ...renamed, columns: { ...renamed.columns, altitude: undefined } } })).rejects.toThrow(/altitude column or a pressure column/);
  });

  test("program parameters are validated, saved, and recorded in the next run", async () => {
    const db = database.db;
    await expect(setProgramParameters(db, { ...DEFAULT_ANALYSIS_PARAMETERS, binSizeM: 5 })).rejects.toThrow();
    const chosen = { ...DEFAULT_ANALYSIS_PARAMETERS, binSizeM: 250, tropopauseSearchFloorM: 6000 };
    await setProgramParameters(db, chosen);
    const before = await db.analysisRun.findFirstOrThrow({ where: { flightId, isCurrent: true } });
    expect((before.parameters as { binSizeM: number }).binSizeM).toBe(DEFAULT_ANALYSIS_PARAMETERS.binSizeM);

    const result = await reprocessFlights(db, { flightIds: [flightId] }, { reason: "parameters changed" });
    expect(result.outcomes[0]?.status).toBe("reprocessed");
    expect(result.outcomes[0]?.change?.parametersChanged).toBe(true);
    const after = await db.analysisRun.findFirstOrThrow({ where: { flightId, isCurrent: true }, include: { levels: { where: { phase: "ascent" }, take: 3, orderBy: { altitudeM: "asc" } } } });
    expect(after.parameters).toEqual(chosen);
    // [D] bins are binSizeM thick
    for (const level of after.levels) expect(level.topM - level.baseM).toBeCloseTo(250, 6);
    // The old run is intact and keeps the parameters it was made with.
    const old = await db.analysisRun.findUniqueOrThrow({ where: { id: before.id } });
    expect(old.isCurrent).toBe(false);
    expect(old.parameters).toEqual(before.parameters);
    expect(await db.auditEvent.count({ where: { action: "program.parameters" } })).toBe(1);
  });
});
