/**
 * Deleting setup items entered by mistake: allowed only when no flight or analysis run refers to
 * the item (provenance stays intact), refused with what uses it otherwise, audited, and cascading
 * only to rows that belong to the item alone (a sensor's calibrations and mounts).
 */
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { ingestFlightFile } from "../../lib/ingest/index.ts";
import { deleteSetupItem, setupItemUses, SetupConflictError } from "../../lib/ingest/setup-more.ts";
import { makeFlightFile, setUpSchool } from "../support/flight-files.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";

describe.each(testEngines())("deleting setup items on %s", (engine) => {
  let database: TestDatabase;
  let used: Awaited<ReturnType<typeof setUpSchool>>;
  let unused: Awaited<ReturnType<typeof setUpSchool>>;

  beforeAll(async () => {
    database = await createTestDatabase(engine);
    used = await setUpSchool(database.db, "School With A Flight");
    unused = await setUpSchool(database.db, "School Without Flights");
    const f = makeFlightFile({ seed: 51 });
    await ingestFlightFile(database.db, {
      file: { name: "flight-51.csv", bytes: f.bytes },
      metadata: { schoolId: used.school.id, siteId: used.site.id, layoutId: used.layout.id, sensorId: used.sensor.id, payloadId: used.payload.id, launchAtUtc: f.launchAtUtc.toISOString() },
    });
  }, 120_000);

  afterAll(async () => {
    await database?.drop();
  });

  test("items a flight or run uses are refused, saying what uses them; nothing is deleted", async () => {
    const db = database.db;
    expect(await setupItemUses(db, "site", used.site.id)).toEqual(["1 flight"]);
    expect(await setupItemUses(db, "sensor", used.sensor.id)).toEqual(["1 flight", "1 analysis run"]);
    expect(await setupItemUses(db, "calibration", used.calibration.id)).toEqual(["1 analysis run"]);
    for (const [kind, id] of [["site", used.site.id], ["payload", used.payload.id], ["sensor", used.sensor.id], ["calibration", used.calibration.id], ["layout", used.layout.id]] as const) {
      const attempt = db.$transaction((tx) => deleteSetupItem(tx, kind, id));
      await expect(attempt).rejects.toBeInstanceOf(SetupConflictError);
      await expect(db.$transaction((tx) => deleteSetupItem(tx, kind, id))).rejects.toThrow(/is used by 1 (flight|analysis run).*cannot be deleted; correct it instead/);
    }
    expect(await db.site.count({ where: { id: used.site.id } })).toBe(1);
    expect(await db.calibration.count({ where: { id: used.calibration.id } })).toBe(1);
    expect(await db.auditEvent.count({ where: { action: { endsWith: ".delete" }, schoolId: used.school.id } })).toBe(0);
  });

  test("unused items are deleted and audited; a sensor takes its calibrations and mounts with it", async () => {
    const db = database.db;
    expect(await db.sensorMount.count({ where: { sensorId: unused.sensor.id } })).toBeGreaterThan(0);
    for (const [kind, id] of [["site", unused.site.id], ["layout", unused.layout.id], ["sensor", unused.sensor.id], ["payload", unused.payload.id]] as const) {
      expect(await setupItemUses(db, kind, id)).toEqual([]);
      const deleted = await db.$transaction((tx) => deleteSetupItem(tx, kind, id, { userId: null, label: "test" }));
      expect(deleted.schoolId).toBe(unused.school.id);
    }
    expect(await db.site.count({ where: { id: unused.site.id } })).toBe(0);
    expect(await db.loggerLayout.count({ where: { id: unused.layout.id } })).toBe(0);
    expect(await db.sensor.count({ where: { id: unused.sensor.id } })).toBe(0);
    expect(await db.calibration.count({ where: { id: unused.calibration.id } })).toBe(0);
    expect(await db.sensorMount.count({ where: { sensorId: unused.sensor.id } })).toBe(0);
    expect(await db.payload.count({ where: { id: unused.payload.id } })).toBe(0);
    const events = await db.auditEvent.findMany({ where: { action: { endsWith: ".delete" }, schoolId: unused.school.id }, orderBy: { id: "asc" } });
    expect(events.map((e) => [e.action, e.actorLabel])).toEqual([["site.delete", "test"], ["layout.delete", "test"], ["sensor.delete", "test"], ["payload.delete", "test"]]);
    // The school that has a flight keeps all of its setup.
    expect(await db.sensor.count({ where: { id: used.sensor.id } })).toBe(1);
  });

  test("a calibration no run used can go; deleting what is gone says so", async () => {
    const db = database.db;
    const spare = await db.calibration.create({
      data: { sensorId: used.sensor.id, spec: used.calibration.spec as object, validFromUtc: new Date("2010-01-01T00:00:00Z"), validToUtc: new Date("2011-01-01T00:00:00Z"), method: "datasheet" },
    });
    const deleted = await db.$transaction((tx) => deleteSetupItem(tx, "calibration", spare.id));
    expect(deleted.sensorId).toBe(used.sensor.id);
    await expect(db.$transaction((tx) => deleteSetupItem(tx, "calibration", spare.id))).rejects.toThrow("That calibration no longer exists");
  });
});
