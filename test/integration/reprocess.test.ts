import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { analyseFlight } from "../../lib/analysis/index.ts";
import { ingestFlightFile, parseLoggerFile, reprocessFlights, updateCalibration } from "../../lib/ingest/index.ts";
import { getProgramParameters } from "../../lib/ingest/store.ts";
import { COMMA_COUNTS_LAYOUT, LINEAR_10BIT_CALIBRATION } from "../../seed/demo-files.ts";
import { makeFlightFile, setUpSchool } from "../support/flight-files.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";

describe.each(testEngines())("reprocessing on %s", (engine) => {
  let database: TestDatabase;
  let ids: Awaited<ReturnType<typeof setUpSchool>>;
  const files = [makeFlightFile({ seed: 11 }), makeFlightFile({ seed: 12 }), makeFlightFile({ seed: 13 })];
  const flightIds: string[] = [];

  beforeAll(async () => {
    database = await createTestDatabase(engine);
    ids = await setUpSchool(database.db);
    for (const [i, f] of files.entries()) {
      const result = await ingestFlightFile(database.db, {
        file: { name: `flight-${i}.csv`, bytes: f.bytes },
        metadata: { schoolId: ids.school.id, siteId: ids.site.id, layoutId: ids.layout.id, sensorId: ids.sensor.id, launchAtUtc: new Date(f.launchAtUtc.getTime() + i * 86_400_000).toISOString() },
      });
      flightIds.push(result.flightId);
    }
  });
  afterAll(async () => database?.drop());

  test("a flight stored in lenient mode (rows sorted, none skipped) is re-analysed in lenient mode, not stranded", async () => {
    const db = database.db;
    const text = makeFlightFile({ seed: 14 }).text.split("\n");
    const header = text.findIndex((l) => l.startsWith("seconds"));
    // Swap two data rows: time goes backwards once, which strict mode refuses and lenient mode sorts.
    const [a, b] = [header + 5, header + 6];
    [text[a], text[b]] = [text[b] as string, text[a] as string];
    const stored = await ingestFlightFile(db, {
      file: { name: "swapped.csv", bytes: new TextEncoder().encode(text.join("\n")) },
      metadata: { schoolId: ids.school.id, siteId: ids.site.id, layoutId: ids.layout.id, sensorId: ids.sensor.id, launchAtUtc: "2024-08-01T06:00:00Z", mode: "lenient" },
    });
    try {
      expect((await db.analysisRun.findFirstOrThrow({ where: { flightId: stored.flightId } })).skippedRowCount).toBe(0);
      const again = await reprocessFlights(db, { flightIds: [stored.flightId] }, { reason: "test", force: true });
      expect(again.outcomes.map((o) => o.status)).toEqual(["reprocessed"]);
      expect(await db.analysisRun.count({ where: { flightId: stored.flightId, isCurrent: true } })).toBe(1);
    } finally {
      await db.flight.delete({ where: { id: stored.flightId } });
      await db.rawFile.deleteMany({ where: { name: "swapped.csv" } });
    }
  });

  test("nothing changed: every flight is already up to date", async () => {
    const result = await reprocessFlights(database.db, { all: true }, { reason: "test" });
    expect(result.outcomes.map((o) => o.status)).toEqual(["up-to-date", "up-to-date", "up-to-date"]);
    expect(await database.db.analysisRun.count()).toBe(3);
  });

  test("a corrected calibration, reprocessed, equals a direct analysis with it; the old run is intact", async () => {
    const db = database.db;
    const oldRun = await db.analysisRun.findFirstOrThrow({ where: { flightId: flightIds[0], isCurrent: true }, include: { summary: true, levels: true } });
    // A field correction found after the season: readings were 1.5 K warm with a 2 % gain error.
    const corrected = { ...LINEAR_10BIT_CALIBRATION, correction: { gain: 0.98, offsetK: -1.5 } };
    await updateCalibration(db, ids.calibration.id, { sensorId: ids.sensor.id, spec: corrected, validFromUtc: new Date("2020-01-01T00:00:00Z"), method: "two-point" });

    const result = await reprocessFlights(db, { calibrationId: ids.calibration.id }, { reason: "calibration corrected" });
    expect(result.outcomes.map((o) => o.status)).toEqual(["reprocessed", "reprocessed", "reprocessed"]);
    const change = result.outcomes[0]!.change!;
    expect(change.calibrationChanged).toBe(true);
    expect(change.surfaceTemperatureDeltaK).not.toBeNull();

    const newRun = await db.analysisRun.findFirstOrThrow({ where: { flightId: flightIds[0], isCurrent: true }, include: { summary: true } });
    expect(newRun.id).not.toBe(oldRun.id);
    // Direct analysis of the same bytes with the new calibration, outside the database.
    const parsed = await parseLoggerFile(files[0]!.bytes, COMMA_COUNTS_LAYOUT, { fileName: "direct.csv", mode: "strict" });
    const direct = analyseFlight({ samples: parsed.samples, calibration: corrected, site: { latitudeDeg: 48.1, longitudeDeg: 9.2, elevationM: 200 }, parameters: await getProgramParameters(db) });
    expect(newRun.summary?.surfaceTemperatureK).toBe(direct.summary.surfaceTemperatureK);
    expect(newRun.summary?.troposphericLapseRateKPerKm).toBe(direct.summary.troposphericLapseRateKPerKm);
    expect(newRun.summary?.tropopauseAltitudeM).toBe(direct.summary.tropopauseAltitudeM);
    expect(await db.profileLevel.count({ where: { runId: newRun.id } })).toBe(direct.levels.length);

    // The old run and its levels and summary are still there, no longer current.
    const oldAgain = await db.analysisRun.findUniqueOrThrow({ where: { id: oldRun.id }, include: { summary: true, levels: true } });
    expect(oldAgain.isCurrent).toBe(false);
    expect(oldAgain.summary?.isCurrent).toBe(false);
    expect(oldAgain.summary?.surfaceTemperatureK).toBe(oldRun.summary?.surfaceTemperatureK);
    expect(oldAgain.levels.length).toBe(oldRun.levels.length);
    expect(oldAgain.calibrationSpec).toEqual(LINEAR_10BIT_CALIBRATION);
    expect(await db.flightSummary.count({ where: { flightId: flightIds[0], isCurrent: true } })).toBe(1);
  });

  test("an interrupted batch loses nothing and resumes where it stopped", async () => {
    const db = database.db;
    await updateCalibration(db, ids.calibration.id, { sensorId: ids.sensor.id, spec: { ...LINEAR_10BIT_CALIBRATION, correction: { gain: 1, offsetK: 0.7 } }, validFromUtc: new Date("2020-01-01T00:00:00Z"), method: "two-point" });
    const controller = new AbortController();
    const first = await reprocessFlights(db, { all: true }, {
      reason: "interrupted", signal: controller.signal,
      onProgress: (done) => { if (done === 1) controller.abort(); },
    });
    expect(first.interrupted).toBe(true);
    expect(first.outcomes).toHaveLength(1);
    for (const id of flightIds) expect(await db.analysisRun.count({ where: { flightId: id, isCurrent: true } })).toBe(1);
    const resumed = await reprocessFlights(db, { all: true }, { reason: "resume" });
    expect(resumed.outcomes.map((o) => o.status)).toEqual(["up-to-date", "reprocessed", "reprocessed"]);
  });

  test("a failure on one flight leaves it on its previous run and the others go on", async () => {
    const db = database.db;
    const before = await db.analysisRun.findFirstOrThrow({ where: { flightId: flightIds[1], isCurrent: true } });
    // Break that flight's stored layout reference by pointing it at a layout whose column does not exist.
    const broken = await db.loggerLayout.create({ data: { schoolId: ids.school.id, name: "Broken", spec: { ...COMMA_COUNTS_LAYOUT, name: "Broken", columns: { ...COMMA_COUNTS_LAYOUT.columns, temperature: { column: "nope", unit: "counts" } } } } });
    await db.flight.update({ where: { id: flightIds[1] }, data: { layoutId: broken.id } });
    const result = await reprocessFlights(db, { all: true }, { reason: "with failure", force: true });
    expect(result.outcomes.map((o) => o.status)).toEqual(["reprocessed", "failed", "reprocessed"]);
    expect(result.outcomes[1]!.message).toContain("nope");
    const after = await db.analysisRun.findFirstOrThrow({ where: { flightId: flightIds[1], isCurrent: true } });
    expect(after.id).toBe(before.id);
  });

  test("with lag correction on, each flight uses its own sensor's time constant", async () => {
    const db = database.db;
    const parameters = { ...(await getProgramParameters(db)), lagCorrection: { enabled: true, timeConstantS: 3 } };
    await db.programSettings.upsert({ where: { id: 1 }, update: { analysisParameters: parameters }, create: { id: 1, analysisParameters: parameters } });
    const result = await reprocessFlights(db, { flightIds: [flightIds[0]!] }, { reason: "lag on" });
    expect(result.outcomes[0]!.status).toBe("reprocessed");
    const run = await db.analysisRun.findFirstOrThrow({ where: { flightId: flightIds[0], isCurrent: true } });
    // setUpSchool's sensor has τ = 1 s; the program's 3 s is only the fallback.
    expect((run.parameters as { lagCorrection: { timeConstantS: number } }).lagCorrection).toEqual({ enabled: true, timeConstantS: 1 });
  });

  test("parallel re-analyses of one flight leave exactly one current run and one current summary", async () => {
    const db = database.db;
    const flightId = flightIds[2] as string;
    const outcomes = await Promise.all(Array.from({ length: 4 }, (_, i) => reprocessFlights(db, { flightIds: [flightId] }, { reason: `parallel ${i}`, force: true })));
    expect(outcomes.flatMap((o) => o.outcomes.map((x) => x.status))).toEqual(["reprocessed", "reprocessed", "reprocessed", "reprocessed"]);
    expect(await db.analysisRun.count({ where: { flightId, isCurrent: true } })).toBe(1);
    expect(await db.flightSummary.count({ where: { flightId, isCurrent: true } })).toBe(1);
    const current = await db.analysisRun.findFirstOrThrow({ where: { flightId, isCurrent: true }, include: { summary: true } });
    expect(current.summary?.isCurrent).toBe(true);
  });

  test("the database itself refuses a second current run for a flight", async () => {
    const db = database.db;
    const flightId = flightIds[2] as string;
    const current = await db.analysisRun.findFirstOrThrow({ where: { flightId, isCurrent: true } });
    const { id: _id, createdAt: _createdAt, ...copy } = current;
    await expect(db.analysisRun.create({ data: { ...copy, parameters: copy.parameters ?? {}, calibrationSpec: copy.calibrationSpec ?? {}, layoutSpec: copy.layoutSpec ?? {}, warnings: copy.warnings ?? [], removedCounts: copy.removedCounts ?? {} } as never })).rejects.toThrow();
    expect(await db.analysisRun.count({ where: { flightId, isCurrent: true } })).toBe(1);
  });
});
