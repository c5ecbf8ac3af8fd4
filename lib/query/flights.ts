import "server-only";
import { getDb, type Db, type Prisma } from "../db/index.ts";
import { runUsedSite } from "../db/site-snapshot.ts";
import { flightVisibilityWhere, type Viewer } from "../auth/visibility.ts";
import { archiveFlightWhere, type ArchiveFilter } from "./archive-filter.ts";
import { readStoredJson, removedCountsSchema, storedWarningsSchema } from "./stored-json.ts";

export interface FlightListRow {
  id: string;
  title: string;
  schoolId: string;
  schoolName: string;
  siteId: string;
  siteName: string;
  launchAtUtc: string;
  visibility: string;
  synthetic: boolean;
  season: string | null;
  seasonName: string | null;
  localHour: number | null;
  tropopauseAltitudeM: number | null;
  troposphericLapseRateKPerKm: number | null;
  maxAltitudeM: number | null;
  hasSurfaceInversion: boolean | null;
  qcFlagged: boolean;
}

const SORTS: Record<ArchiveFilter["sort"], Prisma.FlightOrderByWithRelationInput[]> = {
  "launch-desc": [{ launchAtUtc: "desc" }, { id: "asc" }],
  "launch-asc": [{ launchAtUtc: "asc" }, { id: "asc" }],
  title: [{ title: "asc" }, { id: "asc" }],
  // Summary-based sorts are applied on the summary relation below.
  "tropopause-desc": [{ launchAtUtc: "desc" }],
  "tropopause-asc": [{ launchAtUtc: "desc" }],
  "lapse-desc": [{ launchAtUtc: "desc" }],
  "lapse-asc": [{ launchAtUtc: "desc" }],
};


/** The Archive: filtered, sorted, paged flights with their current summary numbers. */
export async function listFlights(viewer: Viewer, filter: ArchiveFilter, db: Db = getDb()): Promise<{ total: number; rows: FlightListRow[]; page: number; pageSize: number }> {
  const where = archiveFlightWhere(viewer, filter);
  const summarySort = filter.sort.startsWith("tropopause") || filter.sort.startsWith("lapse");
  const skip = (filter.page - 1) * filter.pageSize;
  let ids: string[];
  let total: number;
  if (summarySort) {
    // Sort on the current summary in the database (nulls last), paging there too.
    const key = filter.sort.startsWith("tropopause") ? "tropopauseAltitudeM" : "troposphericLapseRateKPerKm";
    const direction = filter.sort.endsWith("asc") ? "asc" : "desc";
    const summaryWhere: Prisma.FlightSummaryWhereInput = { isCurrent: true, flight: where };
    const [count, summaries] = await Promise.all([
      db.flight.count({ where }),
      db.flightSummary.findMany({
        where: summaryWhere,
        orderBy: [{ [key]: { sort: direction, nulls: "last" } }, { flightId: "asc" }],
        skip,
        take: filter.pageSize,
        select: { flightId: true },
      }),
    ]);
    total = count;
    ids = summaries.map((s) => s.flightId);
  } else {
    const [count, flights] = await Promise.all([
      db.flight.count({ where }),
      db.flight.findMany({ where, orderBy: SORTS[filter.sort], skip, take: filter.pageSize, select: { id: true } }),
    ]);
    total = count;
    ids = flights.map((f) => f.id);
  }
  const include = {
    school: { select: { name: true } },
    site: { select: { name: true } },
    summaries: { where: { isCurrent: true }, take: 1 },
  } as const;
  const rows = await db.flight.findMany({ where: { id: { in: ids } }, include });
  const order = new Map(ids.map((id, i) => [id, i]));
  rows.sort((a, b) => (order.get(a.id) ?? 0) - (order.get(b.id) ?? 0));
  return {
    total,
    page: filter.page,
    pageSize: filter.pageSize,
    rows: rows.map((f) => {
      const s = f.summaries[0];
      return {
        id: f.id, title: f.title, schoolId: f.schoolId, schoolName: f.school.name, siteId: f.siteId, siteName: f.site.name,
        launchAtUtc: f.launchAtUtc.toISOString(), visibility: f.visibility, synthetic: f.synthetic,
        season: s?.season ?? null, seasonName: s?.seasonName ?? null, localHour: s?.localHour ?? null,
        tropopauseAltitudeM: s?.tropopauseAltitudeM ?? null, troposphericLapseRateKPerKm: s?.troposphericLapseRateKPerKm ?? null,
        maxAltitudeM: s?.maxAltitudeM ?? null, hasSurfaceInversion: s?.hasSurfaceInversion ?? null, qcFlagged: s?.qcFlagged ?? false,
      };
    }),
  };
}

export async function countFlights(viewer: Viewer, db: Db = getDb()): Promise<number> {
  return db.flight.count({ where: flightVisibilityWhere(viewer) });
}

/**
 * How many flights (not deleted) exist that this viewer may not see: the number only, so a visitor
 * facing an empty list learns that signing in would show more, and nothing about those flights.
 */
export async function countHiddenFlights(viewer: Viewer, db: Db = getDb()): Promise<number> {
  return db.flight.count({ where: { AND: [{ deletedAt: null }, { NOT: flightVisibilityWhere(viewer) }] } });
}

/** One flight with its current run, summary, layers, raw-file facts and run history. Null when not visible. */
export async function getFlight(viewer: Viewer, flightId: string, db: Db = getDb()) {
  const flight = await db.flight.findFirst({
    where: { AND: [{ id: flightId }, flightVisibilityWhere(viewer)] },
    include: {
      school: { select: { id: true, name: true } },
      site: true,
      payload: { select: { id: true, name: true } },
      sensor: { select: { id: true, serial: true, kind: true, timeConstantS: true } },
      layout: { select: { id: true, name: true } },
      rawFile: { select: { id: true, name: true, sizeBytes: true, sha256: true, uploadedAt: true } },
      runs: {
        orderBy: { createdAt: "desc" },
        include: { summary: true, layers: { orderBy: [{ phase: "asc" }, { baseM: "asc" }] } },
      },
    },
  });
  if (!flight) return null;
  const currentRun = flight.runs.find((r) => r.isCurrent) ?? flight.runs[0] ?? null;
  const warnings = currentRun && readStoredJson(storedWarningsSchema, currentRun.warnings ?? [], "QC notes");
  const removedCounts = currentRun && readStoredJson(removedCountsSchema, currentRun.removedCounts, "removed-row counts");
  return {
    id: flight.id,
    title: flight.title,
    notes: flight.notes,
    visibility: flight.visibility,
    synthetic: flight.synthetic,
    launchAtUtc: flight.launchAtUtc.toISOString(),
    createdAt: flight.createdAt.toISOString(),
    school: flight.school,
    site: { id: flight.site.id, name: flight.site.name, latitudeDeg: flight.site.latitudeDeg, longitudeDeg: flight.site.longitudeDeg, elevationM: flight.site.elevationM, timeZone: flight.site.timeZone },
    payload: flight.payload,
    sensor: flight.sensor,
    layout: flight.layout,
    rawFile: { ...flight.rawFile, uploadedAt: flight.rawFile.uploadedAt.toISOString() },
    currentRun: currentRun && {
      id: currentRun.id,
      analysisVersion: currentRun.analysisVersion,
      createdAt: currentRun.createdAt.toISOString(),
      reason: currentRun.reason,
      parameters: currentRun.parameters,
      calibrationId: currentRun.calibrationId,
      calibrationSpec: currentRun.calibrationSpec,
      site: { latitudeDeg: currentRun.siteLatitudeDeg, longitudeDeg: currentRun.siteLongitudeDeg, elevationM: currentRun.siteElevationM, timeZone: currentRun.siteTimeZone },
      siteCorrectedSince: !runUsedSite(currentRun, flight.site),
      warnings: [...(warnings?.value ?? []), ...[warnings?.problem, removedCounts?.problem].filter((p) => p != null)],
      qcFlags: currentRun.qcFlags ? currentRun.qcFlags.split(",") : [],
      removedCounts: removedCounts?.value ?? null,
      rowCount: currentRun.rowCount,
      skippedRowCount: currentRun.skippedRowCount,
      summary: currentRun.summary && { ...currentRun.summary, launchAtUtc: currentRun.summary.launchAtUtc.toISOString() },
      layers: currentRun.layers.map(({ id, runId, ...layer }) => layer),
    },
    runs: flight.runs.map((r) => ({
      id: r.id, analysisVersion: r.analysisVersion, createdAt: r.createdAt.toISOString(), reason: r.reason, isCurrent: r.isCurrent,
      calibrationId: r.calibrationId,
      tropopauseAltitudeM: r.summary?.tropopauseAltitudeM ?? null,
      troposphericLapseRateKPerKm: r.summary?.troposphericLapseRateKPerKm ?? null,
    })),
  };
}

export type FlightDetail = NonNullable<Awaited<ReturnType<typeof getFlight>>>;

/** Binned levels of a flight's current run (or a given run), ascent then descent, by altitude. */
export async function getFlightLevels(viewer: Viewer, flightId: string, runId?: string, db: Db = getDb()) {
  const flight = await db.flight.findFirst({ where: { AND: [{ id: flightId }, flightVisibilityWhere(viewer)] }, select: { id: true } });
  if (!flight) return null;
  const run = runId
    ? await db.analysisRun.findFirst({ where: { id: runId, flightId } })
    : await db.analysisRun.findFirst({ where: { flightId, isCurrent: true } });
  if (!run) return null;
  const levels = await db.profileLevel.findMany({ where: { runId: run.id }, orderBy: [{ phase: "asc" }, { altitudeM: "asc" }] });
  return { runId: run.id, levels: levels.map(({ id, runId: _r, ...level }) => level) };
}

export type FlightLevel = NonNullable<Awaited<ReturnType<typeof getFlightLevels>>>["levels"][number];

/** The stored raw bytes of a flight's file, exactly as uploaded. */
export async function getRawFile(viewer: Viewer, flightId: string, db: Db = getDb()) {
  const flight = await db.flight.findFirst({ where: { AND: [{ id: flightId }, flightVisibilityWhere(viewer)] }, include: { rawFile: true } });
  if (!flight) return null;
  return { name: flight.rawFile.name, sha256: flight.rawFile.sha256, bytes: new Uint8Array(flight.rawFile.bytes) };
}
