import "server-only";
import { isDeepStrictEqual } from "node:util";
import { getDb, type Db } from "../db/index.ts";
import { can } from "../auth/permissions.ts";
import { flightVisibilityWhere, type Viewer } from "../auth/visibility.ts";
import { parameterRecordSchema, readStoredJson } from "./stored-json.ts";

const iso = (d: Date) => d.toISOString();
const isoOrNull = (d: Date | null) => (d ? d.toISOString() : null);

/** Schools with how much setup and how many flights each has, for the Setup overview. */
export async function listSetupSchools(db: Db = getDb()) {
  const schools = await db.school.findMany({
    orderBy: { name: "asc" },
    select: { id: true, name: true, _count: { select: { sites: true, payloads: true, sensors: true, layouts: true, flights: { where: { deletedAt: null } } } } },
  });
  return schools.map((s) => ({ id: s.id, name: s.name, counts: s._count }));
}

export type SetupSchool = Awaited<ReturnType<typeof listSetupSchools>>[number];

export async function listSetupSites(db: Db = getDb()) {
  const sites = await db.site.findMany({
    orderBy: [{ school: { name: "asc" } }, { name: "asc" }],
    include: { school: { select: { name: true } }, _count: { select: { flights: { where: { deletedAt: null } } } } },
  });
  return sites.map(({ school, _count, createdAt, ...s }) => ({ ...s, schoolName: school.name, flightCount: _count.flights, createdAt: iso(createdAt) }));
}

export async function getSetupSite(siteId: string, db: Db = getDb()) {
  const site = await db.site.findUnique({ where: { id: siteId }, include: { school: { select: { name: true } }, _count: { select: { flights: { where: { deletedAt: null } } } } } });
  if (!site) return null;
  const { school, createdAt, _count, ...rest } = site;
  return { ...rest, schoolName: school.name, createdAt: iso(createdAt), flightCount: _count.flights };
}

export async function listSetupPayloads(db: Db = getDb()) {
  const payloads = await db.payload.findMany({
    orderBy: [{ school: { name: "asc" } }, { name: "asc" }],
    include: {
      school: { select: { name: true } },
      mounts: { where: { toUtc: null }, include: { sensor: { select: { id: true, serial: true } } } },
      _count: { select: { flights: { where: { deletedAt: null } } } },
    },
  });
  return payloads.map((p) => ({
    id: p.id, schoolId: p.schoolId, schoolName: p.school.name, name: p.name, notes: p.notes, flightCount: p._count.flights,
    sensorsNow: p.mounts.map((m) => ({ id: m.sensor.id, serial: m.sensor.serial, sinceUtc: iso(m.fromUtc) })),
  }));
}

export async function getSetupPayload(payloadId: string, db: Db = getDb()) {
  const p = await db.payload.findUnique({
    where: { id: payloadId },
    include: { school: { select: { name: true } }, mounts: { orderBy: { fromUtc: "asc" }, include: { sensor: { select: { id: true, serial: true, kind: true } } } } },
  });
  if (!p) return null;
  return {
    id: p.id, schoolId: p.schoolId, schoolName: p.school.name, name: p.name, notes: p.notes,
    mounts: p.mounts.map((m) => ({ id: m.id, sensorId: m.sensor.id, serial: m.sensor.serial, kind: m.sensor.kind, fromUtc: iso(m.fromUtc), toUtc: isoOrNull(m.toUtc) })),
  };
}

export async function listSetupSensors(db: Db = getDb()) {
  const sensors = await db.sensor.findMany({
    orderBy: [{ school: { name: "asc" } }, { serial: "asc" }],
    include: {
      school: { select: { name: true } },
      mounts: { orderBy: { fromUtc: "desc" }, take: 1, include: { payload: { select: { name: true } } } },
      calibrations: { orderBy: { validFromUtc: "desc" }, select: { id: true, method: true, validFromUtc: true, validToUtc: true } },
    },
  });
  return sensors.map((s) => {
    const last = s.mounts[0];
    return {
      id: s.id, schoolId: s.schoolId, schoolName: s.school.name, serial: s.serial, kind: s.kind, timeConstantS: s.timeConstantS,
      latestMount: last ? { payloadName: last.payload.name, fromUtc: iso(last.fromUtc), toUtc: isoOrNull(last.toUtc) } : null,
      calibrations: s.calibrations.map((c) => ({ id: c.id, method: c.method, validFromUtc: iso(c.validFromUtc), validToUtc: isoOrNull(c.validToUtc) })),
    };
  });
}

/** A sensor with its payload mounts over time and every calibration (spec, validity, readings). */
export async function getSetupSensor(sensorId: string, db: Db = getDb()) {
  const s = await db.sensor.findUnique({
    where: { id: sensorId },
    include: {
      school: { select: { name: true } },
      mounts: { orderBy: { fromUtc: "asc" }, include: { payload: { select: { id: true, name: true } } } },
      calibrations: { orderBy: { validFromUtc: "asc" } },
    },
  });
  if (!s) return null;
  const payloads = await db.payload.findMany({ where: { schoolId: s.schoolId }, orderBy: { name: "asc" }, select: { id: true, name: true } });
  return {
    id: s.id, schoolId: s.schoolId, schoolName: s.school.name, serial: s.serial, kind: s.kind, timeConstantS: s.timeConstantS, notes: s.notes,
    mounts: s.mounts.map((m) => ({ id: m.id, payloadId: m.payload.id, payloadName: m.payload.name, fromUtc: iso(m.fromUtc), toUtc: isoOrNull(m.toUtc) })),
    calibrations: s.calibrations.map((c) => ({
      id: c.id, spec: c.spec, method: c.method, notes: c.notes, validFromUtc: iso(c.validFromUtc), validToUtc: isoOrNull(c.validToUtc),
      referenceReadings: (c.referenceReadings ?? null) as Array<{ raw: number; temperatureK: number }> | null,
    })),
    payloads,
  };
}

/** One calibration with its sensor, for the edit page and the helper. */
export async function getSetupCalibration(calibrationId: string, db: Db = getDb()) {
  const c = await db.calibration.findUnique({
    where: { id: calibrationId },
    include: { sensor: { select: { id: true, serial: true, kind: true, schoolId: true, school: { select: { name: true } } } }, _count: { select: { runs: true } } },
  });
  if (!c) return null;
  return {
    id: c.id, spec: c.spec, method: c.method, notes: c.notes, validFromUtc: iso(c.validFromUtc), validToUtc: isoOrNull(c.validToUtc),
    referenceReadings: (c.referenceReadings ?? null) as Array<{ raw: number; temperatureK: number }> | null,
    runCount: c._count.runs,
    sensor: { id: c.sensor.id, serial: c.sensor.serial, kind: c.sensor.kind, schoolId: c.sensor.schoolId, schoolName: c.sensor.school.name },
  };
}

export type SetupCalibration = NonNullable<Awaited<ReturnType<typeof getSetupCalibration>>>;

export async function listSetupLayouts(db: Db = getDb()) {
  const layouts = await db.loggerLayout.findMany({
    orderBy: [{ school: { name: "asc" } }, { name: "asc" }],
    include: { school: { select: { name: true } }, _count: { select: { flights: { where: { deletedAt: null } } } } },
  });
  return layouts.map((l) => ({ id: l.id, schoolId: l.schoolId, schoolName: l.school.name, name: l.name, spec: l.spec, flightCount: l._count.flights, updatedAt: iso(l.updatedAt) }));
}

export async function getSetupLayout(layoutId: string, db: Db = getDb()) {
  const l = await db.loggerLayout.findUnique({ where: { id: layoutId }, include: { school: { select: { name: true } }, _count: { select: { flights: { where: { deletedAt: null } } } } } });
  if (!l) return null;
  return { id: l.id, schoolId: l.schoolId, schoolName: l.school.name, name: l.name, spec: l.spec, flightCount: l._count.flights, updatedAt: iso(l.updatedAt) };
}

/** Rows for the re-analysis list: the flights of a selection the viewer may see, with their current run's numbers. */
export async function listFlightsForReprocess(viewer: Viewer, flightIds: string[], db: Db = getDb()) {
  if (flightIds.length === 0) return [];
  const flights = await db.flight.findMany({
    where: { AND: [{ id: { in: flightIds } }, flightVisibilityWhere(viewer)] },
    include: { school: { select: { name: true } }, runs: { where: { isCurrent: true }, include: { summary: { select: { tropopauseAltitudeM: true, troposphericLapseRateKPerKm: true } } } } },
  });
  const order = new Map(flightIds.map((id, i) => [id, i]));
  flights.sort((a, b) => (order.get(a.id) ?? 0) - (order.get(b.id) ?? 0));
  return flights.map((f) => {
    const run = f.runs[0];
    return {
      id: f.id, title: f.title, schoolName: f.school.name, launchAtUtc: iso(f.launchAtUtc),
      currentRun: run ? { id: run.id, createdAt: iso(run.createdAt), reason: run.reason, tropopauseAltitudeM: run.summary?.tropopauseAltitudeM ?? null, troposphericLapseRateKPerKm: run.summary?.troposphericLapseRateKPerKm ?? null } : null,
    };
  });
}

export type ReprocessFlightRow = Awaited<ReturnType<typeof listFlightsForReprocess>>[number];

/** What differs between a run and the one before it, in the units users read. */
export interface RunDifference {
  tropopauseAltitudeDeltaM: number | null;
  troposphericLapseRateDeltaKPerKm: number | null;
  surfaceTemperatureDeltaK: number | null;
  tropopauseFoundChanged: boolean;
  analysisVersionChanged: { from: string; to: string } | null;
  calibrationChanged: boolean;
  layoutChanged: boolean;
  /** The site's latitude, longitude, elevation or time zone as analysed differ. */
  siteChanged: boolean;
  /** Names of the analysis parameters whose values differ. */
  changedParameters: string[];
  /** Stored snapshots that could not be read, in words (their comparison is left out). */
  unreadable: string[];
}

interface RunForDifference {
  analysisVersion: string;
  parameters: unknown;
  calibrationSpec: unknown;
  layoutSpec: unknown;
  site: { latitudeDeg: number | null; longitudeDeg: number | null; elevationM: number | null; timeZone: string | null };
  tropopauseAltitudeM: number | null;
  troposphericLapseRateKPerKm: number | null;
  surfaceTemperatureK: number | null;
}

const delta = (after: number | null, before: number | null) => (after === null || before === null ? null : after - before);

/** Compares two runs of the same flight (`before` the older one). */
export function compareRuns(before: RunForDifference, after: RunForDifference): RunDifference {
  const readBefore = readStoredJson(parameterRecordSchema, before.parameters ?? {}, "parameters of the earlier run");
  const readAfter = readStoredJson(parameterRecordSchema, after.parameters ?? {}, "parameters");
  const paramsBefore = readBefore.value ?? {};
  const paramsAfter = readAfter.value ?? {};
  const names = [...new Set([...Object.keys(paramsBefore), ...Object.keys(paramsAfter)])].sort();
  return {
    tropopauseAltitudeDeltaM: delta(after.tropopauseAltitudeM, before.tropopauseAltitudeM),
    troposphericLapseRateDeltaKPerKm: delta(after.troposphericLapseRateKPerKm, before.troposphericLapseRateKPerKm),
    surfaceTemperatureDeltaK: delta(after.surfaceTemperatureK, before.surfaceTemperatureK),
    tropopauseFoundChanged: (after.tropopauseAltitudeM === null) !== (before.tropopauseAltitudeM === null),
    analysisVersionChanged: before.analysisVersion === after.analysisVersion ? null : { from: before.analysisVersion, to: after.analysisVersion },
    calibrationChanged: !isDeepStrictEqual(before.calibrationSpec, after.calibrationSpec),
    layoutChanged: !isDeepStrictEqual(before.layoutSpec, after.layoutSpec),
    siteChanged: !isDeepStrictEqual(before.site, after.site),
    changedParameters: readBefore.value && readAfter.value ? names.filter((n) => !isDeepStrictEqual(paramsBefore[n], paramsAfter[n])) : [],
    unreadable: [readBefore.problem, readAfter.problem].flatMap((problem) => (problem ? [problem.message] : [])),
  };
}

/**
 * A flight's analysis runs, newest first, each with what changed against the run before it, and
 * whether the viewer may re-analyse it. Null when the flight is not visible to the viewer.
 */
export async function getRunHistory(viewer: Viewer, flightId: string, db: Db = getDb()) {
  const flight = await db.flight.findFirst({ where: { AND: [{ id: flightId }, flightVisibilityWhere(viewer)] }, select: { id: true, schoolId: true } });
  if (!flight) return null;
  const runs = await db.analysisRun.findMany({
    where: { flightId },
    orderBy: [{ createdAt: "asc" }, { id: "asc" }],
    include: { summary: { select: { tropopauseAltitudeM: true, troposphericLapseRateKPerKm: true, surfaceTemperatureK: true } } },
  });
  const rows = runs.map((r) => ({
    analysisVersion: r.analysisVersion, parameters: r.parameters, calibrationSpec: r.calibrationSpec, layoutSpec: r.layoutSpec,
    site: { latitudeDeg: r.siteLatitudeDeg, longitudeDeg: r.siteLongitudeDeg, elevationM: r.siteElevationM, timeZone: r.siteTimeZone },
    tropopauseAltitudeM: r.summary?.tropopauseAltitudeM ?? null,
    troposphericLapseRateKPerKm: r.summary?.troposphericLapseRateKPerKm ?? null,
    surfaceTemperatureK: r.summary?.surfaceTemperatureK ?? null,
  }));
  const history = runs.map((r, i) => {
    const row = rows[i];
    const previous = i > 0 ? rows[i - 1] : undefined;
    return {
      id: r.id, createdAt: iso(r.createdAt), reason: r.reason, isCurrent: r.isCurrent, analysisVersion: r.analysisVersion, calibrationId: r.calibrationId,
      tropopauseAltitudeM: row?.tropopauseAltitudeM ?? null,
      troposphericLapseRateKPerKm: row?.troposphericLapseRateKPerKm ?? null,
      surfaceTemperatureK: row?.surfaceTemperatureK ?? null,
      change: previous && row ? compareRuns(previous, row) : null,
    };
  });
  return { flightId, mayReanalyse: can(viewer, "setup.edit", { schoolId: flight.schoolId }), runs: history.reverse() };
}

export type RunHistory = NonNullable<Awaited<ReturnType<typeof getRunHistory>>>;
export type RunHistoryEntry = RunHistory["runs"][number];
