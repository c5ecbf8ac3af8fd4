import { afterAll, beforeAll, describe, expect, test, vi } from "vitest";
import { DEFAULT_ANALYSIS_PARAMETERS } from "../../lib/analysis/types.ts";
import type { Viewer } from "../../lib/auth/visibility.ts";
import { ingestFlightFile } from "../../lib/ingest/index.ts";
import { LINEAR_10BIT_CALIBRATION } from "../../seed/demo-files.ts";
import { makeFlightFile, setUpSchool } from "../support/flight-files.ts";
import { createTestDatabase, type TestDatabase } from "../support/test-databases.ts";

// Server actions revalidate Next's cache; outside a request there is nothing to revalidate.
vi.mock("next/cache", () => ({ revalidatePath: vi.fn() }));
// Outside a request there are no cookies: the test chooses who is asking.
const asking = vi.hoisted(() => ({ viewer: { kind: "local" } as Viewer }));
vi.mock("@/app/_lib/viewer", () => ({
  getViewer: async () => asking.viewer,
  currentActor: async (label: string) => (asking.viewer.kind === "member" ? { userId: asking.viewer.userId, label: asking.viewer.email ?? asking.viewer.userId } : { userId: null, label }),
}));

const K0 = 273.15; // 0 °C in K, SI definition

// The actions use the app's database handle (DATABASE_URL), so this file runs on SQLite, pointing
// DATABASE_URL at its own fresh database before the first action call.
describe("Setup server actions (SQLite)", () => {
  let database: TestDatabase;
  let ids: Awaited<ReturnType<typeof setUpSchool>>;
  let flightId: string;
  let actions: typeof import("../../app/setup/actions.ts");
  let pages: typeof import("../../lib/query/setup-pages.ts");

  beforeAll(async () => {
    database = await createTestDatabase("sqlite");
    process.env.DATABASE_URL = database.url;
    const { getDbHandle } = await import("../../lib/db/index.ts");
    expect(getDbHandle().url).toBe(database.url);
    ids = await setUpSchool(database.db, "Action Test School");
    const file = makeFlightFile({ seed: 41 });
    flightId = (await ingestFlightFile(database.db, {
      file: { name: "action-flight.csv", bytes: file.bytes },
      metadata: { schoolId: ids.school.id, siteId: ids.site.id, layoutId: ids.layout.id, sensorId: ids.sensor.id, launchAtUtc: file.launchAtUtc.toISOString() },
    })).flightId;
    actions = await import("../../app/setup/actions.ts");
    pages = await import("../../lib/query/setup-pages.ts");
  });
  afterAll(async () => {
    const { getDbHandle } = await import("../../lib/db/index.ts");
    await getDbHandle().db.$disconnect();
    await database?.drop();
  });

  test("an overlapping calibration comes back as a form error with the clear message; nothing is stored", async () => {
    const result = await actions.saveCalibration({
      calibration: { sensorId: ids.sensor.id, spec: LINEAR_10BIT_CALIBRATION, validFromUtc: "2024-01-01T00:00:00Z", validToUtc: null, method: "two-point", notes: "" },
    });
    expect(result.ok).toBe(false);
    if (result.ok) return;
    expect(result.message).toContain(`overlaps calibration ${ids.calibration.id}`);
    expect(result.message).toContain("Close that one first or choose other dates");
    expect(result.fieldErrors.validFromUtc?.[0]).toBe(result.message);
    expect(await database.db.calibration.count({ where: { sensorId: ids.sensor.id } })).toBe(1);
  });

  test("an incomplete calibration names the field", async () => {
    const result = await actions.saveCalibration({
      calibration: { sensorId: ids.sensor.id, spec: { ...LINEAR_10BIT_CALIBRATION, sensor: { kind: "linear-voltage", scaleMvPerK: 0, offsetV: 0 } }, validFromUtc: "2031-01-01T00:00:00Z", method: "two-point" },
    });
    expect(result.ok).toBe(false);
    if (!result.ok) expect(Object.keys(result.fieldErrors)).toContain("spec.sensor.scaleMvPerK");
  });

  test("fit two pairs, save as a correction of the calibration, re-analyse the affected flight, and see what changed in the run history", async () => {
    // [D] the nominal model reads 560 counts as 273.4375 K and 600 counts as 292.96875 K;
    // references 1.2 K colder at both points give gain 1 and offset −1.2 K
    const fit = await actions.fitCalibrationPairs({
      template: LINEAR_10BIT_CALIBRATION,
      points: [{ raw: 560, referenceC: 273.4375 - 1.2 - K0 }, { raw: 600, referenceC: 292.96875 - 1.2 - K0 }],
    });
    expect(fit.ok).toBe(true);
    if (!fit.ok) return;
    expect(fit.data.calibration.correction?.gain).toBeCloseTo(1, 9);
    expect(fit.data.calibration.correction?.offsetK).toBeCloseTo(-1.2, 9);

    const saved = await actions.saveCalibration({
      id: ids.calibration.id,
      calibration: {
        sensorId: ids.sensor.id, spec: fit.data.calibration, validFromUtc: "2020-01-01T00:00:00Z", validToUtc: null, method: fit.data.method,
        referenceReadings: fit.data.points.map((p) => ({ raw: p.raw, temperatureK: p.referenceC + K0 })), notes: "ice bath and room",
      },
    });
    expect(saved).toEqual({ ok: true, data: { id: ids.calibration.id, sensorId: ids.sensor.id, affectedFlightCount: 1 } });

    const before = await database.db.analysisRun.findFirstOrThrow({ where: { flightId, isCurrent: true }, include: { summary: true } });
    const outcome = await actions.reprocessOneFlight({ flightId, reason: "calibration corrected" });
    expect(outcome.ok && outcome.data.status).toBe("reprocessed");
    const again = await actions.reprocessOneFlight({ flightId, reason: "calibration corrected" });
    expect(again.ok && again.data.status).toBe("up-to-date");

    const history = await pages.getRunHistory({ kind: "local" }, flightId, database.db);
    expect(history?.runs.map((r) => [r.reason, r.isCurrent])).toEqual([["calibration corrected", true], ["upload", false]]);
    const change = history?.runs[0]?.change;
    expect(change?.calibrationChanged).toBe(true);
    expect(change?.changedParameters).toEqual([]);
    // [D] a −1.2 K offset moves the surface temperature by −1.2 K (gain 1); tolerance for the lenient float path
    expect(change?.surfaceTemperatureDeltaK).toBeCloseTo(-1.2, 6);
    expect(change?.surfaceTemperatureDeltaK).toBeCloseTo((history?.runs[0]?.surfaceTemperatureK ?? 0) - (before.summary?.surfaceTemperatureK ?? 0), 9);
    expect(history?.runs[1]?.change).toBeNull();
  });

  test("saved parameters are recorded in the next run and named in its change", async () => {
    const saved = await actions.saveProgramParameters({ ...DEFAULT_ANALYSIS_PARAMETERS, binSizeM: 200 });
    expect(saved).toEqual({ ok: true, data: { affectedFlightCount: 1 } });
    const refused = await actions.saveProgramParameters({ ...DEFAULT_ANALYSIS_PARAMETERS, binSizeM: 5 });
    expect(refused.ok).toBe(false);
    if (!refused.ok) expect(Object.keys(refused.fieldErrors)).toEqual(["binSizeM"]);

    const outcome = await actions.reprocessOneFlight({ flightId, reason: "parameters changed" });
    expect(outcome.ok && outcome.data.status).toBe("reprocessed");
    const run = await database.db.analysisRun.findFirstOrThrow({ where: { flightId, isCurrent: true } });
    expect(run.parameters).toEqual({ ...DEFAULT_ANALYSIS_PARAMETERS, binSizeM: 200 });
    const history = await pages.getRunHistory({ kind: "local" }, flightId, database.db);
    expect(history?.runs[0]?.change?.changedParameters).toEqual(["binSizeM"]);
    expect(history?.runs[0]?.change?.calibrationChanged).toBe(false);
    expect(history?.runs).toHaveLength(3);
  });

  test("a sensor moved to a payload of another school is refused; an unknown flight is not re-analysed", async () => {
    const other = await setUpSchool(database.db, "Elsewhere School");
    const moved = await actions.addSensorMount({ sensorId: ids.sensor.id, payloadId: other.payload.id, fromUtc: "2025-01-01T00:00:00Z", toUtc: null });
    expect(moved.ok).toBe(false);
    if (!moved.ok) expect(moved.message).toMatch(/does not belong/);
    const missing = await actions.reprocessOneFlight({ flightId: "no-such-flight", reason: "x" });
    expect(missing).toEqual({ ok: false, message: "That flight does not exist", fieldErrors: {} });
  });

  test("sites are validated by the shared schema; a good one is created and corrected", async () => {
    const bad = await actions.saveSite({ schoolId: ids.school.id, name: "Ridge", latitudeDeg: 12, longitudeDeg: 200, elevationM: 300, timeZone: "Mars/Olympus" });
    expect(bad.ok).toBe(false);
    if (!bad.ok) expect(Object.keys(bad.fieldErrors).sort()).toEqual(["longitudeDeg", "timeZone"]);
    const created = await actions.saveSite({ schoolId: ids.school.id, name: "Ridge", latitudeDeg: 12, longitudeDeg: 20, elevationM: 300, timeZone: "Africa/Cairo" });
    expect(created.ok).toBe(true);
    if (!created.ok) return;
    const updated = await actions.saveSite({ id: created.data.id, schoolId: ids.school.id, name: "Ridge North", latitudeDeg: 12.5, longitudeDeg: 20, elevationM: 310, timeZone: "Africa/Cairo" });
    expect(updated.ok).toBe(true);
    expect(await database.db.site.findUniqueOrThrow({ where: { id: created.data.id } })).toMatchObject({ name: "Ridge North", latitudeDeg: 12.5, elevationM: 310 });
  });

  test("who may change what: a reader of another school and an anonymous visitor are refused", async () => {
    const stranger: Viewer = { kind: "member", userId: "u-1", isProgramAdmin: false, schoolIds: ["elsewhere"], memberships: [{ schoolId: "elsewhere", role: "school-admin" }] };
    const reader: Viewer = { kind: "member", userId: "u-2", isProgramAdmin: false, schoolIds: [ids.school.id], memberships: [{ schoolId: ids.school.id, role: "reader" }] };
    const contributor: Viewer = { kind: "member", userId: "u-3", isProgramAdmin: false, schoolIds: [ids.school.id], memberships: [{ schoolId: ids.school.id, role: "contributor" }] };
    try {
      for (const viewer of [stranger, reader, { kind: "anonymous" } as Viewer]) {
        asking.viewer = viewer;
        expect(await actions.reprocessOneFlight({ flightId, reason: "not allowed", force: true })).toMatchObject({ ok: false });
        expect(await actions.saveSite({ schoolId: ids.school.id, name: "Nope", latitudeDeg: 1, longitudeDeg: 1, elevationM: 1, timeZone: "UTC" })).toMatchObject({ ok: false, message: "You may not change this school's setup" });
      }
      // [P] program-wide parameters are for program administrators only, not school staff
      asking.viewer = contributor;
      expect(await actions.saveProgramParameters(DEFAULT_ANALYSIS_PARAMETERS)).toMatchObject({ ok: false });
      expect(await actions.saveSite({ schoolId: ids.school.id, name: "Allowed Field", latitudeDeg: 1, longitudeDeg: 1, elevationM: 1, timeZone: "UTC" })).toMatchObject({ ok: true });
    } finally {
      asking.viewer = { kind: "local" };
    }
    expect(await database.db.site.count({ where: { name: "Nope" } })).toBe(0);
  });

  test("delete: refused for a site with flights and for a reader; an unused site goes and the page moves to the list", async () => {
    const inUse = await actions.deleteSetupItemAction({ kind: "site", id: ids.site.id });
    expect(inUse).toMatchObject({ ok: false });
    if (!inUse.ok) expect(inUse.message).toMatch(/is used by \d+ flights?, so it cannot be deleted/);
    const spare = await actions.saveSite({ schoolId: ids.school.id, name: "Typo Field", latitudeDeg: 1, longitudeDeg: 1, elevationM: 1, timeZone: "UTC" });
    if (!spare.ok) throw new Error(spare.message);
    try {
      asking.viewer = { kind: "member", userId: "u-2", isProgramAdmin: false, schoolIds: [ids.school.id], memberships: [{ schoolId: ids.school.id, role: "reader" }] };
      expect(await actions.deleteSetupItemAction({ kind: "site", id: spare.data.id })).toMatchObject({ ok: false, message: "You may not change this school's setup" });
    } finally {
      asking.viewer = { kind: "local" };
    }
    expect(await actions.deleteSetupItemAction({ kind: "site", id: spare.data.id })).toEqual({ ok: true, data: { nextPath: "/setup/sites" } });
    expect(await database.db.site.count({ where: { id: spare.data.id } })).toBe(0);
    expect(await actions.deleteSetupItemAction({ kind: "site", id: spare.data.id })).toMatchObject({ ok: false, message: "That site no longer exists" });
    expect(await actions.deleteSetupItemAction({ kind: "school" as never, id: "x" })).toMatchObject({ ok: false });
  });

  test("JSON API: overlap answers 409 in the one error shape; re-analysis streams one NDJSON line per flight and a summary", async () => {
    const calibrations = await import("../../app/api/v1/setup/calibrations/route.ts");
    const overlap = await calibrations.POST(new Request("http://local/api/v1/setup/calibrations", {
      method: "POST", headers: { "content-type": "application/json" },
      body: JSON.stringify({ sensorId: ids.sensor.id, spec: LINEAR_10BIT_CALIBRATION, validFromUtc: "2024-05-01T00:00:00Z", method: "two-point" }),
    }));
    expect(overlap.status).toBe(409);
    const body = (await overlap.json()) as { error: { code: string; message: string } };
    expect(body.error.code).toBe("overlapping-calibration");
    expect(body.error.message).toContain(`overlaps calibration ${ids.calibration.id}`);

    const invalid = await calibrations.POST(new Request("http://local/api/v1/setup/calibrations", { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ sensorId: ids.sensor.id }) }));
    expect(invalid.status).toBe(400);

    const reprocess = await import("../../app/api/v1/setup/reprocess/route.ts");
    const response = await reprocess.POST(new Request("http://local/api/v1/setup/reprocess", {
      method: "POST", headers: { "content-type": "application/json" },
      body: JSON.stringify({ selection: { calibrationId: ids.calibration.id }, reason: "api test", force: true }),
    }));
    expect(response.headers.get("content-type")).toContain("application/x-ndjson");
    const lines = (await response.text()).trim().split("\n").map((line) => JSON.parse(line) as { type: string; total?: number; done?: number; reprocessed?: number; outcome?: { flightId: string; status: string } });
    expect(lines.map((l) => l.type)).toEqual(["start", "progress", "summary"]);
    expect(lines[1]?.outcome).toMatchObject({ flightId, status: "reprocessed" });
    expect(lines[2]).toMatchObject({ total: 1, reprocessed: 1, failed: 0, interrupted: false });
    const current = await database.db.analysisRun.findFirstOrThrow({ where: { flightId, isCurrent: true } });
    expect(current.reason).toBe("api test");
  });

  test("correcting a site lists the flights it changes; the API selects and re-analyses a site's flights", async () => {
    const site = await database.db.site.findUniqueOrThrow({ where: { id: ids.site.id } });
    const same = { id: site.id, schoolId: site.schoolId, name: site.name, latitudeDeg: site.latitudeDeg, longitudeDeg: site.longitudeDeg, elevationM: site.elevationM, timeZone: site.timeZone };
    // A new name changes no analysis; moving the site south of the equator changes the flight's season name.
    expect(await actions.saveSite({ ...same, name: "Test Field West" })).toEqual({ ok: true, data: { id: site.id, affectedFlightCount: 0 } });
    expect(await actions.saveSite({ ...same, name: "Test Field West", latitudeDeg: -site.latitudeDeg })).toEqual({ ok: true, data: { id: site.id, affectedFlightCount: 1 } });

    const reprocess = await import("../../app/api/v1/setup/reprocess/route.ts");
    const listed = await reprocess.GET(new Request(`http://local/api/v1/setup/reprocess?site=${site.id}`));
    expect(listed.status).toBe(200);
    const body = (await listed.json()) as { selection: unknown; flights: Array<{ id: string }> };
    expect(body.selection).toEqual({ siteId: site.id });
    expect(body.flights.map((f) => f.id)).toEqual([flightId]);

    const sites = await import("../../app/api/v1/setup/sites/[id]/route.ts");
    const put = await sites.PUT(
      new Request(`http://local/api/v1/setup/sites/${site.id}`, { method: "PUT", headers: { "content-type": "application/json" }, body: JSON.stringify({ name: "Test Field West", latitudeDeg: -site.latitudeDeg, longitudeDeg: site.longitudeDeg, elevationM: site.elevationM + 10, timeZone: site.timeZone }) }),
      { params: Promise.resolve({ id: site.id }) },
    );
    expect(put.status).toBe(200);
    expect(await put.json()).toMatchObject({ affectedFlightIds: [flightId], reprocess: { siteId: site.id } });

    const response = await reprocess.POST(new Request("http://local/api/v1/setup/reprocess", {
      method: "POST", headers: { "content-type": "application/json" },
      body: JSON.stringify({ selection: { siteId: site.id }, reason: "site corrected via api" }),
    }));
    const lines = (await response.text()).trim().split("\n").map((line) => JSON.parse(line) as { type: string; reprocessed?: number; outcome?: { flightId: string; status: string; change?: { siteChanged: boolean } } });
    expect(lines.map((l) => l.type)).toEqual(["start", "progress", "summary"]);
    expect(lines[1]?.outcome).toMatchObject({ flightId, status: "reprocessed", change: { siteChanged: true } });
    const summary = await database.db.flightSummary.findFirstOrThrow({ where: { flightId, isCurrent: true } });
    // July launch at 48.1° S: meteorological JJA, winter in the southern hemisphere [P]
    expect(summary).toMatchObject({ season: "JJA", seasonName: "winter", latitudeDeg: -site.latitudeDeg });
    expect(await database.db.analysisRun.findFirstOrThrow({ where: { flightId, isCurrent: true } })).toMatchObject({ siteLatitudeDeg: -site.latitudeDeg, siteElevationM: site.elevationM + 10, reason: "site corrected via api" });

    const history = await pages.getRunHistory({ kind: "local" }, flightId);
    expect(history?.runs[0]?.change).toMatchObject({ siteChanged: true, calibrationChanged: false, layoutChanged: false });
    expect(history?.runs[1]?.change?.siteChanged).toBe(false);
  });
});

describe("plain words for what changed", () => {
  test.each([
    { change: { tropopauseAltitudeDeltaM: 120.4, troposphericLapseRateDeltaKPerKm: -0.3, surfaceTemperatureDeltaK: null }, words: ["tropopause moved by +120 m", "lapse rate by −0.30 K/km"] },
    { change: { tropopauseAltitudeDeltaM: -0.2, troposphericLapseRateDeltaKPerKm: 0.001, surfaceTemperatureDeltaK: -1.234 }, words: ["tropopause moved by 0 m", "lapse rate by 0.00 K/km", "surface temperature by −1.23 K"] },
    { change: { tropopauseAltitudeDeltaM: null, troposphericLapseRateDeltaKPerKm: null, surfaceTemperatureDeltaK: null, tropopauseFoundChanged: true, calibrationChanged: true, layoutChanged: true, changedParameters: ["binSizeM"], analysisVersionChanged: { from: "1.0.0", to: "1.1.0" } }, words: ["tropopause found in one run only", "calibration changed", "logger layout changed", "parameters changed (binSizeM)", "analysis version 1.0.0 → 1.1.0"] },
    { change: { tropopauseAltitudeDeltaM: null, troposphericLapseRateDeltaKPerKm: null, surfaceTemperatureDeltaK: null, siteChanged: true }, words: ["site corrected"] },
  ])("$words", async ({ change, words }) => {
    const { describeChange } = await import("../../app/_components/setup/change-words.ts");
    // [D] signs and rounding as shown to users: whole metres, hundredths of K/km and K, no "−0"
    expect(describeChange({ calibrationChanged: false, analysisVersionChanged: null, ...change })).toEqual(words);
  });
});
