/**
 * Creating setup writes one audit row per created item (school, site, payload, sensor, calibration,
 * logger layout), in the same transaction as the item: a refused create leaves neither.
 */
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { createCalibration, createLayout, createPayload, createSchool, createSensor, createSite, OverlappingCalibrationError } from "../../lib/ingest/index.ts";
import { COMMA_COUNTS_LAYOUT, LINEAR_10BIT_CALIBRATION } from "../../seed/demo-files.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";

describe.each(testEngines())("audit rows for setup creation on %s", (engine) => {
  let database: TestDatabase;
  const actor = { userId: null, label: "audit test" };

  beforeAll(async () => {
    database = await createTestDatabase(engine);
  }, 120_000);

  afterAll(async () => {
    await database?.drop();
  });

  test("each create writes exactly one <kind>.create row naming the actor, the school and the item", async () => {
    const db = database.db;
    const school = await createSchool(db, { name: "Audit Test School" }, actor);
    const site = await createSite(db, { schoolId: school.id, name: "Audit Field", latitudeDeg: 48.1, longitudeDeg: 9.2, elevationM: 200, timeZone: "Europe/Berlin" }, actor);
    const payload = await createPayload(db, { schoolId: school.id, name: "Audit Box" }, actor);
    const sensor = await createSensor(db, { schoolId: school.id, serial: "AUD-1", kind: "10 mV/K", payloadId: payload.id }, actor);
    const calibration = await createCalibration(db, { sensorId: sensor.id, spec: LINEAR_10BIT_CALIBRATION, validFromUtc: new Date("2020-01-01T00:00:00Z"), method: "datasheet" }, actor);
    // Inside a caller's transaction the row joins that transaction.
    const layout = await db.$transaction((tx) => createLayout(tx, { schoolId: school.id, spec: COMMA_COUNTS_LAYOUT }, actor));
    const expected = [
      ["school.create", "school", school.id],
      ["site.create", "site", site.id],
      ["payload.create", "payload", payload.id],
      ["sensor.create", "sensor", sensor.id],
      ["calibration.create", "calibration", calibration.id],
      ["layout.create", "layout", layout.id],
    ];
    for (const [action, entityType, entityId] of expected) {
      const rows = await db.auditEvent.findMany({ where: { action, entityId } });
      expect(rows, action).toHaveLength(1);
      expect(rows[0]).toMatchObject({ entityType, actorLabel: "audit test", actorUserId: null, schoolId: school.id });
    }
    expect(await db.auditEvent.count({ where: { schoolId: school.id } })).toBe(6);
    const sensorRow = await db.auditEvent.findFirstOrThrow({ where: { action: "sensor.create" } });
    expect(sensorRow.details).toMatchObject({ serial: "AUD-1", payloadId: payload.id });
  });

  test("a refused create writes no audit row, and a rolled-back transaction takes its audit row with it", async () => {
    const db = database.db;
    const sensor = await db.sensor.findFirstOrThrow({ where: { serial: "AUD-1" } });
    const before = await db.auditEvent.count();
    await expect(createCalibration(db, { sensorId: sensor.id, spec: LINEAR_10BIT_CALIBRATION, validFromUtc: new Date("2021-01-01T00:00:00Z"), method: "datasheet" }, actor))
      .rejects.toBeInstanceOf(OverlappingCalibrationError);
    const school = await db.school.findFirstOrThrow({ where: { name: "Audit Test School" } });
    await expect(createSite(db, { schoolId: school.id, name: "Audit Field", latitudeDeg: 1, longitudeDeg: 1, elevationM: 1, timeZone: "UTC" }, actor)).rejects.toMatchObject({ code: "P2002" });
    await expect(
      db.$transaction(async (tx) => {
        await createPayload(tx, { schoolId: school.id, name: "Rolled Back" }, actor);
        throw new Error("roll back");
      }),
    ).rejects.toThrow("roll back");
    expect(await db.payload.count({ where: { name: "Rolled Back" } })).toBe(0);
    expect(await db.auditEvent.count()).toBe(before);
  });
});
