import { DateTime } from "luxon";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import type { Viewer } from "../../lib/auth/visibility.ts";
import { createLayout, createSite, IngestFailure, ingestFlightFile, reprocessFlight, type LoggerLayoutSpec } from "../../lib/ingest/index.ts";
import { getClimatology } from "../../lib/query/climatology.ts";
import { parseClimatologyQuery } from "../../lib/query/climatology-params.ts";
import { COMMA_COUNTS_LAYOUT } from "../../seed/demo-files.ts";
import { makeFlightFile, setUpSchool } from "../support/flight-files.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";

// Zone rules used below (IANA tz database [P]): America/Chicago CDT = UTC−5 in summer, CST = UTC−6; clocks go
// forward 2025-03-09 02:00 CST and back 2025-11-02 02:00 CDT. Europe/Berlin CET = UTC+1, CEST = UTC+2; changes
// 2025-03-30 and 2025-10-26 at 01:00 UTC. Expected instants recomputed by hand from those offsets [D].

const LOCAL: Viewer = { kind: "local" };

function clockLayout(clockZone: string | undefined, name: string): LoggerLayoutSpec {
  return {
    ...COMMA_COUNTS_LAYOUT,
    name,
    columns: { ...COMMA_COUNTS_LAYOUT.columns, time: { column: "clock", format: "clock-time", ...(clockZone ? { clockZone } : {}) } },
  };
}

/**
 * An invented flight whose logger writes HH:MM:SS as a wall clock in `zone` would show it (a clock that follows
 * daylight saving), starting at `startLocal` (ISO with offset). Launch is `preLaunchS` after the first row.
 */
function clockFile(startLocal: string, zone: string, options: { seed: number; preLaunchS?: number }) {
  const base = makeFlightFile({ seed: options.seed, preLaunchS: options.preLaunchS });
  const startMs = DateTime.fromISO(startLocal, { setZone: true }).toMillis();
  const lines = base.text.split("\n").map((line) => {
    if (line.startsWith("#") || line === "") return line;
    const [first, ...rest] = line.split(",");
    if (first === "seconds") return ["clock", ...rest].join(",");
    return [DateTime.fromMillis(startMs + Number(first) * 1000, { zone }).toFormat("HH:mm:ss"), ...rest].join(",");
  });
  const text = lines.join("\n");
  return { text, bytes: new TextEncoder().encode(text), truth: base.truth };
}

describe.each(testEngines())("clock zones on %s", (engine) => {
  let database: TestDatabase;
  let ids: Awaited<ReturnType<typeof setUpSchool>>;
  let chicago: Awaited<ReturnType<typeof createSite>>;
  let siteClock: Awaited<ReturnType<typeof createLayout>>;
  let utcClock: Awaited<ReturnType<typeof createLayout>>;

  beforeAll(async () => {
    database = await createTestDatabase(engine);
    ids = await setUpSchool(database.db);
    // Invented site in the America/Chicago zone.
    chicago = await createSite(database.db, { schoolId: ids.school.id, name: "Prairie Test Field", latitudeDeg: 41.6, longitudeDeg: -88.1, elevationM: 200, timeZone: "America/Chicago" });
    siteClock = await createLayout(database.db, { schoolId: ids.school.id, spec: clockLayout("site", "Local clock logger") });
    utcClock = await createLayout(database.db, { schoolId: ids.school.id, spec: clockLayout(undefined, "UTC clock logger") });
  });
  afterAll(async () => {
    await database?.drop();
  });

  const upload = (name: string, bytes: Uint8Array, metadata: Record<string, unknown>) =>
    ingestFlightFile(database.db, {
      file: { name, bytes },
      metadata: { schoolId: ids.school.id, siteId: chicago.id, layoutId: siteClock.id, sensorId: ids.sensor.id, ...metadata },
    });

  const minutesBetween = (a: Date, iso: string) => Math.abs(a.getTime() - Date.parse(iso)) / 60_000;

  test("Chicago dawn launch on a local clock: 06:41 CDT is stored as 11:41 UTC, in the 06–12 h local group", async () => {
    const file = clockFile("2025-07-14T06:40:00-05:00", "America/Chicago", { seed: 41 });
    const result = await upload("dawn-local.csv", file.bytes, { launchAtUtc: "2025-07-14T06:41:00-05:00" });
    // Launch detected about 60 s after the first row (06:40 local); the detector may be a sample or two off.
    expect(minutesBetween(result.launchAtUtc, "2025-07-14T11:41:00Z")).toBeLessThan(2);
    expect(result.warnings.map((w) => w.code)).not.toContain("launch-time-disagrees");
    const summary = await database.db.flightSummary.findFirstOrThrow({ where: { flightId: result.flightId, isCurrent: true } });
    expect(summary.localHour).toBeGreaterThan(6.6);
    expect(summary.localHour).toBeLessThan(6.75);
    // Sunrise near 41.6° N, 88.1° W on 14 July is about 05:30 CDT [Mem, NOAA solar calculator]: about an hour before.
    expect(summary.hoursAfterSunrise).toBeGreaterThan(1);
    expect(summary.hoursAfterSunrise).toBeLessThan(1.5);
    expect(summary.solarElevationDeg).toBeGreaterThan(0);
    const groupOf = async (record: Record<string, string>) => {
      const parsed = parseClimatologyQuery({ ...record, site: chicago.id });
      if (!parsed.ok) throw new Error(parsed.message);
      const climatology = await getClimatology(LOCAL, parsed.query, database);
      return climatology.groups.find((g) => g.flights.some((f) => f.flightId === result.flightId));
    };
    const byHour = await groupOf({ groupBy: "launch-hour", binHours: "6" });
    expect(byHour?.key).toBe("1");
    expect(byHour?.label).toMatch(/^06.*12.* local$/);
    const bySunrise = await groupOf({ groupBy: "hours-after-sunrise", binHours: "1" });
    expect(bySunrise?.key).toBe("1");
  });

  test.each([
    ["America/Chicago", "fall back", "2025-11-02T01:30:00-05:00", "2025-11-02T06:31:00Z", "clock-repeated-hour", 61],
    ["America/Chicago", "spring forward", "2025-03-09T01:30:00-06:00", "2025-03-09T07:31:00Z", null, 62],
    ["Europe/Berlin", "fall back", "2025-10-26T02:30:00+02:00", "2025-10-26T00:31:00Z", "clock-repeated-hour", 63],
    ["Europe/Berlin", "spring forward", "2025-03-30T01:30:00+01:00", "2025-03-30T00:31:00Z", null, 64],
  ])("%s %s: a clock that follows the change reads as one continuous flight", async (zone, _change, startLocal, launchUtc, note, seed) => {
    const site = zone === "Europe/Berlin" ? ids.site : chicago;
    const file = clockFile(startLocal, zone, { seed });
    const typed = new Date(Date.parse(startLocal) + 60_000).toISOString();
    const result = await upload(`dst-${zone.replace("/", "-")}-${startLocal.slice(5, 7)}.csv`, file.bytes, { siteId: site.id, launchAtUtc: typed });
    expect(minutesBetween(result.launchAtUtc, launchUtc)).toBeLessThan(2);
    // Continuous time: the tropopause comes out where the invented profile put it (11 km) in strict mode.
    expect(Math.abs((result.tropopauseAltitudeM ?? 0) - 11_000)).toBeLessThan(600);
    const codes = result.warnings.map((w) => w.code);
    if (note) expect(codes).toContain(note);
    expect(codes).not.toContain("clock-in-skipped-hour");
    expect(codes).not.toContain("launch-time-disagrees");
  });

  test("logger switched on at 23:50 UTC and launched at 00:10 UTC: the launch lands on the typed date", async () => {
    const file = clockFile("2025-01-14T23:50:00Z", "UTC", { seed: 50, preLaunchS: 1200 });
    const result = await upload("midnight.csv", file.bytes, { layoutId: utcClock.id, siteId: ids.site.id, launchAtUtc: "2025-01-15T00:10:00Z" });
    expect(minutesBetween(result.launchAtUtc, "2025-01-15T00:10:00Z")).toBeLessThan(2);
  });

  test("a typed launch time the file's clock disagrees with is a warning on the flight, kept on re-analysis", async () => {
    const file = clockFile("2025-07-15T06:40:00-05:00", "America/Chicago", { seed: 42 });
    // Typed an hour early (as if the offset were CST): the file's clock says 06:41 CDT.
    const result = await upload("disagree.csv", file.bytes, { launchAtUtc: "2025-07-15T05:41:00-05:00" });
    expect(minutesBetween(result.launchAtUtc, "2025-07-15T11:41:00Z")).toBeLessThan(2);
    const warning = result.warnings.find((w) => w.code === "launch-time-disagrees");
    expect(warning?.message).toMatch(/typed with the upload \(2025-07-15 10:41 UTC.*(59|60|61|62) min before the launch the file.s clock shows \(2025-07-15 11:4/);
    const run = await database.db.analysisRun.findFirstOrThrow({ where: { flightId: result.flightId, isCurrent: true } });
    expect(JSON.stringify(run.warnings)).toContain("launch-time-disagrees");
    const again = await reprocessFlight(database.db, result.flightId, { reason: "test", force: true });
    expect(again.status).toBe("reprocessed");
    const rerun = await database.db.analysisRun.findFirstOrThrow({ where: { flightId: result.flightId, isCurrent: true } });
    expect(rerun.id).not.toBe(run.id);
    expect(JSON.stringify(rerun.warnings)).toContain("launch-time-disagrees");
  });

  test.each(["strict", "lenient"])("a clock-time file without a launch time gets one file-level message (%s)", async (mode) => {
    const file = clockFile("2025-07-16T06:40:00-05:00", "America/Chicago", { seed: mode === "strict" ? 43 : 44 });
    const error = await upload(`dateless-${mode}.csv`, file.bytes, { mode }).then(() => null, (e: unknown) => e);
    expect(error).toBeInstanceOf(IngestFailure);
    const failure = error as IngestFailure;
    expect(failure.issues).toHaveLength(1);
    expect(failure.issues[0]?.line).toBeNull();
    expect(failure.issues[0]?.message).toMatch(/launch time/);
  });

  test('clockZone "site" with a site whose zone is not known is refused with a clear message', async () => {
    const site = await createSite(database.db, { schoolId: ids.school.id, name: "Zone-less Field", latitudeDeg: 41.6, longitudeDeg: -88.1, elevationM: 200, timeZone: "UTC" });
    await database.db.site.update({ where: { id: site.id }, data: { timeZone: "Nowhere/Unknown" } });
    const file = clockFile("2025-07-17T06:40:00-05:00", "America/Chicago", { seed: 45 });
    const error = await upload("no-zone.csv", file.bytes, { siteId: site.id, launchAtUtc: "2025-07-17T06:41:00-05:00" }).then(() => null, (e: unknown) => e);
    expect(error).toBeInstanceOf(IngestFailure);
    expect((error as IngestFailure).message).toMatch(/site's time zone "Nowhere\/Unknown" is not a known IANA zone/);
  });
});
