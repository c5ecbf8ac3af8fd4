import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { z } from "zod";
import { createCalibration, createSensor } from "../../lib/ingest/index.ts";
import { mountSensor } from "../../lib/ingest/setup-more.ts";
import { LINEAR_10BIT_CALIBRATION } from "../../seed/demo-files.ts";
import { setUpSchool } from "../support/flight-files.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";

// Setup dates (calibration validity, sensor mounts) come from forms, the API and code alike; each must be one
// both engines store and read back (years 0001–9999, lib/ingest/time-bounds.ts), or nothing is written.
describe.each(testEngines())("setup dates on %s", (engine) => {
  let database: TestDatabase;
  let ids: Awaited<ReturnType<typeof setUpSchool>>;

  beforeAll(async () => {
    database = await createTestDatabase(engine);
    ids = await setUpSchool(database.db);
  });
  afterAll(async () => {
    await database?.drop();
  });

  async function expectRefused(write: Promise<unknown>, field: string) {
    const error = await write.then(() => null, (e: unknown) => e);
    expect(error).toBeInstanceOf(z.ZodError);
    const issue = (error as z.ZodError).issues.find((i) => i.path.join(".") === field);
    expect(issue?.message).toMatch(/years 0001–9999/);
  }

  test.each(["+010000-01-01T00:00:00Z", "-000001-06-01T00:00:00Z"])("a calibration valid from %s is refused and not stored", async (value) => {
    // A sensor of its own, with no calibration that an accepted period could overlap.
    const sensor = await createSensor(database.db, { schoolId: ids.school.id, serial: `C${value.slice(0, 3)}`, kind: "10 mV/K voltage sensor" });
    await expectRefused(createCalibration(database.db, { sensorId: sensor.id, spec: LINEAR_10BIT_CALIBRATION, validFromUtc: value, method: "datasheet" }), "validFromUtc");
    await expectRefused(createCalibration(database.db, { sensorId: sensor.id, spec: LINEAR_10BIT_CALIBRATION, validFromUtc: "2030-01-01T00:00:00Z", validToUtc: value, method: "datasheet" }), "validToUtc");
    expect(await database.db.calibration.count({ where: { sensorId: sensor.id } })).toBe(0);
  });

  test("a sensor mounted from year 10000, or a mount ending then, is refused and not stored", async () => {
    const sensors = await database.db.sensor.count();
    const mounts = await database.db.sensorMount.count();
    await expectRefused(createSensor(database.db, { schoolId: ids.school.id, serial: "T-9", kind: "thermistor", payloadId: ids.payload.id, mountedFromUtc: "+010000-01-01T00:00:00Z" }), "mountedFromUtc");
    await expectRefused(mountSensor(database.db, { sensorId: ids.sensor.id, payloadId: ids.payload.id, fromUtc: "2031-01-01T00:00:00Z", toUtc: "+010000-01-01T00:00:00Z" }), "toUtc");
    expect(await database.db.sensor.count()).toBe(sensors);
    expect(await database.db.sensorMount.count()).toBe(mounts);
  });
});
