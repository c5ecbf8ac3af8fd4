/**
 * Read side of exports: which flights an export covers (Archive filter, one flight, Climatology
 * query or claim check — the latter through the climatology engine itself) and paged reads of
 * their rows. Every read re-applies the visibility rule of lib/auth. No whole-archive arrays: only
 * the list of flight ids is held; rows are read a page of flights at a time.
 * No server-only marker: the CLI and the benchmark (plain Node) use it too.
 */
import type { DbHandle, Db, Prisma } from "../db/index.ts";
import { flightVisibilityWhere, type Viewer } from "../auth/visibility.ts";
import { archiveFilterSchema, archiveFlightWhere, type ArchiveFilter } from "../query/archive-filter.ts";
import type { ExportOptions } from "./request.ts";
import type { LevelReader } from "./level-reader.ts";
import type { CalibrationExportRow, FlightExportRow, LayerExportRow, LevelExportRow, QueryValueRow } from "./tables.ts";

/** A request the archive cannot answer as asked; `status` is the HTTP status the API answers with. */
export class ExportRequestError extends Error {
  constructor(
    readonly status: 400 | 404 | 422,
    readonly code: string,
    message: string,
  ) {
    super(message);
    this.name = "ExportRequestError";
  }
}

/** What produced the export, as recorded in the package metadata and README. */
export interface QueryDescription {
  source: "archive" | "flight" | "climatology";
  /** One sentence a reader understands without Lapsebank. */
  summary: string;
  /** The search parameters that reproduce the selection (Archive or Climatology page and API). */
  parameters: Record<string, string>;
  /** Path of the page that shows the same selection, e.g. /climatology?metric=… */
  pagePath: string;
  metric?: { label: string; unit: string };
  groups?: Array<{ key: string; label: string; n: number; mean: number | null; sd: number | null; median: number | null; ci95Low: number | null; ci95High: number | null }>;
  claim?: unknown;
  excluded?: Array<{ reason: string; count: number }>;
}

export interface ExportScope {
  flightIds: string[];
  description: QueryDescription;
  /** Per-flight metric values of a climatology query (one per contributing flight), else null. */
  queryValues: QueryValueRow[] | null;
}

type DbLike = Pick<DbHandle, "db" | "engine">;


const ID_PAGE = 5000;

/** Ids of the flights matching a condition, by launch time then id, read in pages. */
async function idsWhere(db: Db, where: Prisma.FlightWhereInput): Promise<string[]> {
  const ids: string[] = [];
  for (let skip = 0; ; skip += ID_PAGE) {
    const page = await db.flight.findMany({ where, orderBy: [{ launchAtUtc: "asc" }, { id: "asc" }], skip, take: ID_PAGE, select: { id: true } });
    for (const f of page) ids.push(f.id);
    if (page.length < ID_PAGE) return ids;
  }
}

function describeArchiveFilter(filter: ArchiveFilter): string {
  const parts: string[] = [];
  if (filter.school) parts.push(`school ${filter.school}`);
  if (filter.site) parts.push(`site ${filter.site}`);
  if (filter.from) parts.push(`launched from ${filter.from.toISOString().slice(0, 10)}`);
  if (filter.to) parts.push(`launched to ${filter.to.toISOString().slice(0, 10)}`);
  if (filter.season) parts.push(`season ${filter.season}`);
  return parts.length ? `Archive flights filtered by ${parts.join(", ")}` : "Every Archive flight visible to the requester";
}

function archiveParameters(filter: ArchiveFilter): Record<string, string> {
  const out: Record<string, string> = {};
  if (filter.school) out.school = filter.school;
  if (filter.site) out.site = filter.site;
  if (filter.from) out.from = filter.from.toISOString().slice(0, 10);
  if (filter.to) out.to = filter.to.toISOString().slice(0, 10);
  if (filter.season) out.season = filter.season;
  return out;
}

function pathWithQuery(path: string, parameters: Record<string, string>): string {
  const search = new URLSearchParams(parameters).toString();
  return search ? `${path}?${search}` : path;
}

/**
 * Resolves which flights an export covers, for this viewer. A climatology source runs the
 * climatology engine (getClimatology) with the same parameters, so an export holds exactly the
 * flights that contributed to the query or claim check, with their metric values and groups.
 * @throws ExportRequestError for parameters that do not validate (422), an unknown or hidden flight (404), or a query with no flights (422).
 */
export async function resolveExportScope(handle: DbLike, viewer: Viewer, options: ExportOptions, queryRecord: Record<string, string>): Promise<ExportScope> {
  switch (options.source) {
    case "flight": {
      const id = options.flight ?? "";
      const flight = await handle.db.flight.findFirst({ where: { AND: [{ id }, flightVisibilityWhere(viewer)] }, select: { id: true, title: true } });
      if (!flight) throw new ExportRequestError(404, "not-found", "Flight not found, or not visible to you");
      return {
        flightIds: [flight.id],
        queryValues: null,
        description: { source: "flight", summary: `One flight: ${flight.title} (${flight.id})`, parameters: { flight: flight.id }, pagePath: `/flights/${flight.id}` },
      };
    }
    case "archive": {
      const parsed = archiveFilterSchema.safeParse(queryRecord);
      if (!parsed.success) {
        throw new ExportRequestError(422, "invalid-query", parsed.error.issues.map((i) => `${i.path.join(".") || "query"}: ${i.message}`).join("; "));
      }
      const filter = parsed.data;
      const flightIds = await idsWhere(handle.db, archiveFlightWhere(viewer, filter));
      const parameters = archiveParameters(filter);
      return { flightIds, queryValues: null, description: { source: "archive", summary: describeArchiveFilter(filter), parameters, pagePath: pathWithQuery("/flights", parameters) } };
    }
    case "climatology":
      return climatologyScope(handle, viewer, queryRecord);
  }
}

/**
 * Adapter from a Climatology query or claim check to an export: the climatology engine decides
 * the flights, the export writes them. Flights keep the engine's group order.
 */
export async function climatologyScope(handle: DbLike, viewer: Viewer, queryRecord: Record<string, string>): Promise<ExportScope> {
  // Loaded here, not at the top: archive and flight exports (and the CLI) need none of the statistics code.
  const [{ ClimatologyQueryError, getClimatology }, { climatologySearchParams, parseClimatologyQuery }] = await Promise.all([
    import("../query/climatology-core.ts"),
    import("../query/climatology-params.ts"),
  ]);
  const parsed = parseClimatologyQuery(queryRecord);
  if (!parsed.ok) throw new ExportRequestError(422, "invalid-query", parsed.message);
  let result;
  try {
    // The export needs the contributing flights even when the page asked for statistics only.
    result = await getClimatology(viewer, { ...parsed.query, flights: "all" }, handle, { profiles: false });
  } catch (error) {
    if (error instanceof ClimatologyQueryError) throw new ExportRequestError(422, error.code, error.field ? `${error.field}: ${error.message}` : error.message);
    throw error;
  }
  const parameters = Object.fromEntries(climatologySearchParams(parsed.query, queryRecord).entries());
  const queryValues: QueryValueRow[] = result.groups.flatMap((g) => g.flights.map((f) => ({ flightId: f.flightId, groupKey: g.key, groupLabel: g.label, value: f.value, synthetic: f.synthetic })));
  const claimWords = result.claim ? `; claim check: ${result.claim.verdict}` : "";
  return {
    flightIds: queryValues.map((v) => v.flightId),
    queryValues,
    description: {
      source: "climatology",
      summary: `Climatology query: ${result.metric.label} (${result.metric.unit}) of ${result.overall.n} flights in ${result.groups.length} group${result.groups.length === 1 ? "" : "s"}${claimWords}`,
      parameters,
      pagePath: pathWithQuery("/climatology", parameters),
      metric: { label: result.metric.label, unit: result.metric.unit },
      groups: result.groups.map((g) => ({ key: g.key, label: g.label, n: g.n, mean: g.mean, sd: g.sd, median: g.median, ci95Low: g.ci95Low, ci95High: g.ci95High })),
      claim: result.claim,
      excluded: result.excluded,
    },
  };
}

/** Flights per page when reading rows; levels of this many flights are held at once (~500 levels each). */
export const FLIGHT_PAGE = 100;

/** The flights of an id list, a page at a time, in the list's order; hidden or deleted flights are skipped. */
export async function* readFlightPages(db: Db, viewer: Viewer, flightIds: readonly string[], pageSize = FLIGHT_PAGE): AsyncGenerator<FlightExportRow[]> {
  for (let start = 0; start < flightIds.length; start += pageSize) {
    const ids = flightIds.slice(start, start + pageSize);
    const flights = await db.flight.findMany({
      where: { AND: [{ id: { in: ids } }, flightVisibilityWhere(viewer)] },
      include: {
        school: { select: { name: true } },
        site: { select: { name: true, latitudeDeg: true, longitudeDeg: true, elevationM: true, timeZone: true } },
        sensor: { select: { serial: true } },
        rawFile: { select: { id: true, name: true, sha256: true, sizeBytes: true } },
        runs: { where: { isCurrent: true }, orderBy: { createdAt: "desc" }, take: 1, include: { summary: true } },
      },
    });
    const order = new Map(ids.map((id, i) => [id, i]));
    flights.sort((a, b) => (order.get(a.id) ?? 0) - (order.get(b.id) ?? 0));
    yield flights.map(({ runs, ...f }) => ({ ...f, run: runs[0] ?? null }));
  }
}

/** A flight's current run id, all the layer and level passes need (cheaper than reading whole flight rows). */
export interface FlightRunRef {
  id: string;
  /** The flight is invented (Flight.synthetic). */
  synthetic: boolean;
  run: { id: string } | null;
}

/** The current run ids of an id list's flights, a page at a time; hidden or deleted flights are skipped. */
export async function* readRunRefPages(db: Db, viewer: Viewer, flightIds: readonly string[], pageSize = FLIGHT_PAGE): AsyncGenerator<FlightRunRef[]> {
  for (let start = 0; start < flightIds.length; start += pageSize) {
    const ids = flightIds.slice(start, start + pageSize);
    const runs = await db.analysisRun.findMany({
      where: { isCurrent: true, flightId: { in: ids }, flight: flightVisibilityWhere(viewer) },
      select: { id: true, flightId: true, flight: { select: { synthetic: true } } },
    });
    const runOf = new Map(runs.map((r) => [r.flightId, r]));
    yield ids.flatMap((id) => {
      const run = runOf.get(id);
      return run ? [{ id, synthetic: run.flight.synthetic, run: { id: run.id } }] : [];
    });
  }
}

/** Layer statistics of the current runs of a page of flights. */
export async function readLayers(db: Db, page: readonly FlightRunRef[]): Promise<LayerExportRow[]> {
  const flightOfRun = new Map(page.flatMap((f) => (f.run ? [[f.run.id, f] as const] : [])));
  if (flightOfRun.size === 0) return [];
  const layers = await db.layerStat.findMany({ where: { runId: { in: [...flightOfRun.keys()] } }, orderBy: [{ runId: "asc" }, { phase: "asc" }, { baseM: "asc" }, { id: "asc" }] });
  return layers.map((l) => {
    const flight = flightOfRun.get(l.runId);
    return { ...l, flightId: flight?.id ?? "", synthetic: flight?.synthetic ?? false };
  });
}

/** Binned levels of the current runs of a page of flights, by run, phase and altitude. */
export async function readLevels(reader: LevelReader, page: readonly FlightRunRef[]): Promise<LevelExportRow[]> {
  const flightOfRun = new Map(page.flatMap((f) => (f.run ? [[f.run.id, f] as const] : [])));
  if (flightOfRun.size === 0) return [];
  const tuples = await reader.read([...flightOfRun.keys()]);
  return tuples.map((t) => ({
    flightId: flightOfRun.get(t[0])?.id ?? "", synthetic: flightOfRun.get(t[0])?.synthetic ?? false, runId: t[0], phase: t[1], altitudeM: t[2], baseM: t[3], topM: t[4], sampleCount: t[5],
    temperatureK: t[6], temperatureSdK: t[7], pressureHpa: t[8], relativeHumidityPct: t[9],
  }));
}

/** The calibration records with these ids, with their sensor. */
export async function readCalibrations(db: Db, ids: readonly string[]): Promise<CalibrationExportRow[]> {
  if (ids.length === 0) return [];
  return db.calibration.findMany({ where: { id: { in: [...ids] } }, include: { sensor: { select: { serial: true, kind: true, schoolId: true } } }, orderBy: { id: "asc" } });
}

/** Raw bytes of one raw file. */
export async function readRawBytes(db: Db, rawFileId: string): Promise<Uint8Array> {
  const file = await db.rawFile.findUniqueOrThrow({ where: { id: rawFileId }, select: { bytes: true } });
  return new Uint8Array(file.bytes);
}
