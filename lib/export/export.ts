/**
 * Exports as byte streams: one CSV table, one JSON document with every table and its data
 * dictionary, a NetCDF-4/CF profile collection (netcdf.ts), or a zip data package (CSV tables, datapackage.json, CITATION.cff, README, optional
 * raw files). Validation and the choice of flights happen before the first byte, so callers can
 * answer 4xx; the body is then produced as the consumer reads it (pull-driven async generator),
 * a page of flights at a time, so memory stays flat however large the export.
 */
import { createHash } from "node:crypto";
import packageJson from "../../package.json" with { type: "json" };
import type { DbHandle, Db } from "../db/index.ts";
import type { Viewer } from "../auth/visibility.ts";
import { csvCell, csvLine, formatNumberCell } from "./csv.ts";
import { NativeDeflateEntry, ZipQueue } from "./zip-queue.ts";
import { openLevelReader } from "./level-reader.ts";
import { levelCsvPages, type CsvPage, type RunOfFlight } from "./level-csv.ts";
import { citationCff, dataPackageDescriptor, inventedDataSentence, readmeText, tableSchema, type PackageFacts, type ResourceFacts } from "./package-metadata.ts";
import {
  ExportRequestError,
  readCalibrations,
  readFlightPages,
  readLayers,
  readLevels,
  readRawBytes,
  readRunRefPages,
  resolveExportScope,
  type ExportScope,
} from "./read.ts";
import { exportOptionsSchema, licenceById, splitExportRecord, type ExportOptions } from "./request.ts";
import {
  CALIBRATIONS_TABLE,
  FLIGHTS_TABLE,
  LAYERS_TABLE,
  LEVELS_TABLE,
  RAW_FILES_TABLE,
  RUNS_TABLE,
  queryValuesTable,
  type ExportField,
  type ExportTable,
  type FlightExportRow,
  type RawFileExportRow,
  type TableName,
} from "./tables.ts";

export interface ExportOutput {
  fileName: string;
  contentType: string;
  options: ExportOptions;
  scope: ExportScope;
  body: AsyncIterable<Uint8Array>;
}

export interface ExportContext {
  /** The export's creation time (tests pass a fixed one). */
  now?: Date;
  /** Rows of this many flights are read at once (default 100; 25 saved some memory on PostgreSQL but cost time). */
  flightPageSize?: number;
  /**
   * The consumer is done with each chunk of `body` by the time it asks for the next one (the CLI
   * writes each chunk to its file first). The export may then reuse a chunk's memory for a later
   * one. Leave unset when chunks are queued, e.g. by an HTTP response.
   */
  chunksDoneOnNext?: boolean;
}

type DbLike = Pick<DbHandle, "db" | "engine" | "url">;

export const LAPSEBANK_VERSION: string = packageJson.version;

const encoder = new TextEncoder();

/** Facts gathered while the flights stream past, for the package metadata. */
interface Collected {
  schools: Map<string, string>;
  analysisVersions: Set<string>;
  parameterSets: Map<string, unknown>;
  calibrationIds: Set<string>;
  flightCount: number;
  /** Flights stored as invented (Flight.synthetic). */
  inventedFlightCount: number;
}

function newCollected(): Collected {
  return { schools: new Map(), analysisVersions: new Set(), parameterSets: new Map(), calibrationIds: new Set(), flightCount: 0, inventedFlightCount: 0 };
}

function collect(c: Collected, page: readonly FlightExportRow[]): void {
  for (const f of page) {
    c.flightCount++;
    if (f.synthetic) c.inventedFlightCount++;
    c.schools.set(f.schoolId, f.school.name);
    if (f.run) {
      c.analysisVersions.add(f.run.analysisVersion);
      const key = JSON.stringify(f.run.parameters);
      if (!c.parameterSets.has(key)) c.parameterSets.set(key, f.run.parameters);
      if (f.run.calibrationId) c.calibrationIds.add(f.run.calibrationId);
    }
  }
}

/** A field's value in a JSON record (times as ISO 8601 UTC text). */
function jsonValueOf<R>(field: ExportField<R>, row: R): unknown {
  const value = field.get(row);
  if (value === undefined) return null;
  return value instanceof Date ? value.toISOString() : value;
}

function safeFileName(name: string): string {
  const cleaned = name.replace(/[^A-Za-z0-9._-]+/g, "_").replace(/^\.+/, "");
  return cleaned || "raw";
}

function rawPath(flightId: string, name: string): string {
  return `raw/${flightId}/${safeFileName(name)}`;
}

function rawFileRow(f: FlightExportRow): RawFileExportRow {
  return { flightId: f.id, synthetic: f.synthetic, rawFileId: f.rawFile.id, name: f.rawFile.name, sha256: f.rawFile.sha256, sizeBytes: f.rawFile.sizeBytes, path: rawPath(f.id, f.rawFile.name) };
}

/** The row pages of one table for an export scope. */
function tablePages(handle: DbLike, viewer: Viewer, scope: ExportScope, name: TableName, pageSize: number, collected: Collected | null): { table: ExportTable<never>; pages: () => AsyncGenerator<unknown[]> } {
  const db = handle.db;
  const flights = () => readFlightPages(db, viewer, scope.flightIds, pageSize);
  const runRefs = () => readRunRefPages(db, viewer, scope.flightIds, pageSize);
  const as = <R>(table: ExportTable<R>, pages: () => AsyncGenerator<R[]>) => ({ table: table as unknown as ExportTable<never>, pages: pages as () => AsyncGenerator<unknown[]> });
  switch (name) {
    case "flights":
      return as(FLIGHTS_TABLE, async function* () {
        for await (const page of flights()) {
          if (collected) collect(collected, page);
          yield page;
        }
      });
    case "runs":
      return as(RUNS_TABLE, async function* () {
        for await (const page of flights()) yield page.flatMap((f) => (f.run ? [{ ...f.run, synthetic: f.synthetic }] : []));
      });
    case "layers":
      return as(LAYERS_TABLE, async function* () {
        for await (const page of runRefs()) yield await readLayers(db, page);
      });
    case "levels":
      return as(LEVELS_TABLE, async function* () {
        const reader = openLevelReader(handle);
        try {
          for await (const page of runRefs()) yield await readLevels(reader, page);
        } finally {
          await reader.close();
        }
      });
    case "calibrations":
      return as(CALIBRATIONS_TABLE, async function* () {
        let ids: string[];
        if (collected) {
          ids = [...collected.calibrationIds].sort();
        } else {
          const set = new Set<string>();
          for await (const page of flights()) for (const f of page) if (f.run?.calibrationId) set.add(f.run.calibrationId);
          ids = [...set].sort();
        }
        for (let i = 0; i < ids.length; i += 500) yield await readCalibrations(db, ids.slice(i, i + 500));
      });
    case "raw-files":
      return as(RAW_FILES_TABLE, async function* () {
        for await (const page of flights()) yield page.map(rawFileRow);
      });
    case "query-values": {
      const metric = scope.description.metric ?? { label: "metric", unit: "" };
      const values = scope.queryValues ?? [];
      return as(queryValuesTable(metric.label, metric.unit), async function* () {
        for (let i = 0; i < values.length; i += 1000) yield values.slice(i, i + 1000);
      });
    }
  }
}

/** A cell writer per field type, chosen once per table (the hot loop of a large export). */
function cellWriter(type: ExportField<unknown>["type"]): (value: unknown) => string {
  switch (type) {
    case "number":
    case "integer":
      return (v) => (typeof v === "number" ? formatNumberCell(v) : v === null || v === undefined ? "" : csvCell(String(v)));
    case "object":
    case "array":
      return (v) => (v === null || v === undefined ? "" : csvCell({ json: v }));
    default:
      return (v) => (v === null || v === undefined ? "" : csvCell(v instanceof Date || typeof v === "boolean" || typeof v === "string" || typeof v === "number" ? v : String(v)));
  }
}

/** One CSV record per row for a table's fields (same cells as csvLine, without per-cell type dispatch). */
function rowFormatter(fields: ReadonlyArray<ExportField<unknown>>): (row: unknown) => string {
  const getters = fields.map((f) => f.get);
  const writers = fields.map((f) => cellWriter(f.type));
  const n = fields.length;
  return (row) => {
    let line = "";
    for (let i = 0; i < n; i++) {
      if (i) line += ",";
      line += (writers[i] as (v: unknown) => string)((getters[i] as (r: unknown) => unknown)(row));
    }
    return `${line}\r\n`;
  };
}

/** The current runs of the scope's flights, a page at a time, for the levels fast path. */
async function* runPages(handle: DbLike, viewer: Viewer, scope: ExportScope, pageSize: number): AsyncGenerator<RunOfFlight[]> {
  for await (const page of readRunRefPages(handle.db, viewer, scope.flightIds, pageSize)) {
    yield page.flatMap((f) => (f.run ? [{ flightId: f.id, runId: f.run.id, synthetic: f.synthetic }] : []));
  }
}

/** A table's CSV header line. */
function csvHeader(table: ExportTable<never>): Uint8Array {
  return encoder.encode(csvLine(table.fields.map((f) => f.name)));
}

/**
 * CSV of one table as pages of bytes: the header, then the records a page of flights at a time.
 * The levels table takes the fast path of level-csv.ts (same cells, formatted off the main thread).
 */
async function* tableCsvPages(handle: DbLike, viewer: Viewer, scope: ExportScope, name: TableName, pageSize: number, collected: Collected | null): AsyncGenerator<CsvPage> {
  const { table, pages } = tablePages(handle, viewer, scope, name, pageSize, collected);
  yield { bytes: csvHeader(table), rows: 0 };
  if (name === "levels") {
    yield* levelCsvPages(handle, runPages(handle, viewer, scope, pageSize));
    return;
  }
  const format = rowFormatter(table.fields as ReadonlyArray<ExportField<unknown>>);
  for await (const page of pages()) {
    let text = "";
    for (const row of page) text += format(row);
    if (text) yield { bytes: encoder.encode(text), rows: page.length };
  }
}

/** The pages' bytes; when the consumer is done with a chunk on asking for the next, the page's buffer goes back for reuse then. */
async function* bytesOf(pages: AsyncIterable<CsvPage>, chunksDoneOnNext: boolean): AsyncGenerator<Uint8Array> {
  for await (const page of pages) {
    yield page.bytes;
    if (chunksDoneOnNext) page.release?.();
  }
}

function timestampForName(date: Date): string {
  return date.toISOString().slice(0, 19).replace(/[-:]/g, "").replace("T", "-");
}

/**
 * Validates an export request (search-param record: the export's keys plus the source query's own
 * parameters), resolves its flights for the viewer and returns the stream to send.
 * @throws ExportRequestError (422 bad parameters, 404 hidden or unknown flight).
 */
export async function createExport(handle: DbLike, viewer: Viewer, record: Record<string, string>, context: ExportContext = {}): Promise<ExportOutput> {
  const { exportRecord, queryRecord } = splitExportRecord(record);
  const parsed = exportOptionsSchema.safeParse(exportRecord);
  if (!parsed.success) {
    throw new ExportRequestError(422, "invalid-request", parsed.error.issues.map((i) => `${i.path.join(".") || "request"}: ${i.message}`).join("; "));
  }
  const options = parsed.data;
  const scope = await resolveExportScope(handle, viewer, options, queryRecord);
  const now = context.now ?? new Date();
  const pageSize = context.flightPageSize ?? 100;
  const base = `lapsebank-${options.source}-${timestampForName(now)}`;
  switch (options.format) {
    case "csv": {
      const { table } = tablePages(handle, viewer, scope, options.table, pageSize, null);
      return { fileName: `${base}-${table.name}.csv`, contentType: "text/csv; charset=utf-8", options, scope, body: bytesOf(tableCsvPages(handle, viewer, scope, options.table, pageSize, null), context.chunksDoneOnNext ?? false) };
    }
    case "json": {
      const invented = await countInventedFlights(handle.db, scope.flightIds);
      return { fileName: `${base}.json`, contentType: "application/json; charset=utf-8", options, scope, body: jsonChunks(handle, viewer, scope, options, now, pageSize, invented) };
    }
    case "package":
      return { fileName: `${base}.zip`, contentType: "application/zip", options, scope, body: packageChunks(handle, viewer, scope, options, now, pageSize) };
    case "netcdf": {
      // Loaded on demand: the other formats (and the heap-capped CLI worker) never load the HDF5 module.
      const { netcdfChunks, writeNetcdfFile } = await import("./netcdf.ts");
      const write = async (filePath: string) => {
        const facts = { title: options.title ?? defaultTitle(scope, now), programName: await programName(handle.db), lapsebankVersion: LAPSEBANK_VERSION, createdAtUtc: now, licence: licenceById(options.licence) };
        return writeNetcdfFile(filePath, handle.db, viewer, scope, facts, openLevelReader(handle), pageSize);
      };
      return { fileName: `${base}.nc`, contentType: "application/x-netcdf", options, scope, body: netcdfChunks(write) };
    }
  }
}

function packageTables(scope: ExportScope, options: ExportOptions): TableName[] {
  const names: TableName[] = ["flights", "runs", "layers", "levels", "calibrations"];
  if (options.raw) names.push("raw-files");
  if (scope.queryValues) names.push("query-values");
  return names;
}

async function programName(db: Db): Promise<string> {
  const settings = await db.programSettings.findUnique({ where: { id: 1 }, select: { programName: true } });
  return settings?.programName ?? "Lapsebank program";
}

function defaultTitle(scope: ExportScope, now: Date): string {
  const what = scope.description.source === "climatology" ? "climatology query" : scope.description.source === "flight" ? "flight" : "archive selection";
  return `Lapsebank temperature soundings: ${what}, exported ${now.toISOString().slice(0, 10)}`;
}

function packageFacts(options: ExportOptions, scope: ExportScope, collected: Collected, now: Date, program: string, resources: ResourceFacts[]): PackageFacts {
  return {
    name: `lapsebank-${options.source}-${timestampForName(now)}`.toLowerCase(),
    title: options.title ?? defaultTitle(scope, now),
    createdAtUtc: now,
    lapsebankVersion: LAPSEBANK_VERSION,
    programName: program,
    licence: licenceById(options.licence),
    query: scope.description,
    schools: [...collected.schools.entries()].map(([id, name]) => ({ id, name })).sort((a, b) => a.name.localeCompare(b.name)),
    analysisVersions: [...collected.analysisVersions].sort(),
    analysisParameterSets: [...collected.parameterSets.values()],
    calibrationIds: [...collected.calibrationIds].sort(),
    flightCount: collected.flightCount,
    inventedFlightCount: collected.inventedFlightCount,
    includesRawFiles: options.raw,
    resources,
  };
}

/** How many of the scope's flights are invented (the scope already applies the viewer's visibility). */
async function countInventedFlights(db: Db, flightIds: readonly string[]): Promise<number> {
  let count = 0;
  for (let i = 0; i < flightIds.length; i += 5000) count += await db.flight.count({ where: { id: { in: flightIds.slice(i, i + 5000) }, synthetic: true } });
  return count;
}

/**
 * One JSON document: metadata (with how many flights are invented and, if any are, a sentence
 * saying so), the data dictionary (Table Schemas), then every table as an array of records.
 */
async function* jsonChunks(handle: DbLike, viewer: Viewer, scope: ExportScope, options: ExportOptions, now: Date, pageSize: number, inventedFlightCount: number): AsyncGenerator<Uint8Array> {
  const collected = newCollected();
  const names = packageTables(scope, { ...options, raw: false });
  const tables = names.map((name) => tablePages(handle, viewer, scope, name, pageSize, collected));
  const head = {
    format: "lapsebank-export",
    lapsebankVersion: LAPSEBANK_VERSION,
    created: now.toISOString(),
    title: options.title ?? defaultTitle(scope, now),
    licence: licenceById(options.licence),
    query: scope.description,
    inventedFlightCount,
    ...(inventedFlightCount > 0 ? { inventedData: inventedDataSentence(inventedFlightCount, scope.flightIds.length) } : {}),
    dataDictionary: Object.fromEntries(tables.map(({ table }) => [table.name, tableSchema(table)])),
  };
  yield encoder.encode(`{"lapsebank":${JSON.stringify(head)},"tables":{`);
  for (const [t, { table, pages }] of tables.entries()) {
    const fields = table.fields as ReadonlyArray<ExportField<unknown>>;
    yield encoder.encode(`${t ? "," : ""}${JSON.stringify(table.name)}:[`);
    let first = true;
    for await (const page of pages()) {
      let text = "";
      for (const row of page) {
        const record: Record<string, unknown> = {};
        for (const f of fields) record[f.name] = jsonValueOf(f, row);
        text += (first ? "" : ",") + JSON.stringify(record);
        first = false;
      }
      if (text) yield encoder.encode(text);
    }
    yield encoder.encode("]");
  }
  const provenance = {
    schools: [...collected.schools.entries()].map(([id, name]) => ({ id, name })),
    analysisVersions: [...collected.analysisVersions].sort(),
    analysisParameters: [...collected.parameterSets.values()],
    calibrationsUsed: [...collected.calibrationIds].sort(),
    flightCount: collected.flightCount,
    inventedFlightCount: collected.inventedFlightCount,
  };
  yield encoder.encode(`},"provenance":${JSON.stringify(provenance)}}\n`);
}

/** Zip offsets are 32-bit without ZIP64 (fflate writes none): stop with a clear message rather than write a broken zip. */
export const MAX_PACKAGE_BYTES = 0xffff_ffff;

async function* packageChunks(handle: DbLike, viewer: Viewer, scope: ExportScope, options: ExportOptions, now: Date, pageSize: number): AsyncGenerator<Uint8Array> {
  let bytes = 0;
  for await (const chunk of packageEntries(handle, viewer, scope, options, now, pageSize)) {
    bytes += chunk.length;
    if (bytes > MAX_PACKAGE_BYTES) throw new Error("the data package would exceed 4 GiB, the zip limit without ZIP64; export fewer flights or leave out the raw files");
    yield chunk;
  }
}

/** One CSV resource being written into the package: hashes and counts what passes through. */
class ResourceSink {
  private readonly hash = createHash("sha256");
  private readonly format: (row: unknown) => string;
  private bytes = 0;
  private rows = 0;
  readonly path: string;
  private readonly entry: NativeDeflateEntry;

  constructor(
    private readonly queue: ZipQueue,
    readonly table: ExportTable<never>,
  ) {
    this.path = `data/${table.name}.csv`;
    this.entry = queue.nativeEntry(this.path);
    this.format = rowFormatter(table.fields as ReadonlyArray<ExportField<unknown>>);
  }

  async header(): Promise<void> {
    await this.write(csvHeader(this.table), 0);
  }

  /** Formats and writes a page of rows. */
  async rowsOf(page: readonly unknown[]): Promise<void> {
    let text = "";
    for (const row of page) text += this.format(row);
    if (text) await this.write(encoder.encode(text), page.length);
  }

  /** Writes CSV records formatted elsewhere; `release` runs once the bytes are compressed. */
  async write(bytes: Uint8Array, rows: number, release?: () => void): Promise<void> {
    this.hash.update(bytes);
    this.bytes += bytes.length;
    this.rows += rows;
    await this.queue.room();
    await this.entry.write(bytes, release);
  }

  async end(): Promise<ResourceFacts> {
    await this.entry.end();
    return { table: this.table, path: this.path, bytes: this.bytes, sha256: this.hash.digest("hex"), rowCount: this.rows };
  }
}

/**
 * The zip data package, streamed. The levels table (millions of rows, formatted by worker threads)
 * is the first entry; the other tables are written at the same time on this thread, and fflate
 * places their compressed bytes after it. Flights and runs come from one pass over the flights.
 * Then the raw files, the descriptor, citation and README.
 */
async function* packageEntries(handle: DbLike, viewer: Viewer, scope: ExportScope, options: ExportOptions, now: Date, pageSize: number): AsyncGenerator<Uint8Array> {
  const db = handle.db;
  const queue = new ZipQueue(now);
  const collected = newCollected();
  const names = packageTables(scope, options);
  const written = new Map<TableName, ResourceFacts>();
  let stopped = false;
  const tableOf = (name: TableName) => tablePages(handle, viewer, scope, name, pageSize, collected);

  // Entries in zip order: levels first, then the rest in the package's resource order.
  const zipOrder: TableName[] = ["levels", ...names.filter((n) => n !== "levels")];
  const sinks = new Map<TableName, ResourceSink>(zipOrder.map((name) => [name, new ResourceSink(queue, tableOf(name).table)]));
  const sinkOf = (name: TableName) => sinks.get(name) as ResourceSink;

  const writeFlightsAndRuns = async () => {
    const flights = sinkOf("flights");
    const runs = sinkOf("runs");
    await flights.header();
    await runs.header();
    for await (const page of readFlightPages(db, viewer, scope.flightIds, pageSize)) {
      if (stopped) return;
      collect(collected, page);
      await flights.rowsOf(page);
      await runs.rowsOf(page.flatMap((f) => (f.run ? [{ ...f.run, synthetic: f.synthetic }] : [])));
    }
    written.set("flights", await flights.end());
    written.set("runs", await runs.end());
  };
  const writeTable = async (name: TableName) => {
    const sink = sinkOf(name);
    for await (const page of tableCsvPages(handle, viewer, scope, name, pageSize, collected)) {
      if (stopped) return;
      await sink.write(page.bytes, page.rows, page.release);
    }
    written.set(name, await sink.end());
  };
  const writeRawFiles = async () => {
    for await (const page of readFlightPages(db, viewer, scope.flightIds, pageSize)) {
      for (const f of page) {
        if (stopped) return;
        await queue.room();
        queue.entry(`${rawPath(f.id, f.rawFile.name)}`, 1).push(await readRawBytes(db, f.rawFile.id), true);
      }
    }
  };

  let done = false;
  const work = Promise.all([
    writeTable("levels"),
    (async () => {
      await writeFlightsAndRuns();
      for (const name of names) if (name !== "levels" && name !== "flights" && name !== "runs") await writeTable(name);
      if (options.raw) await writeRawFiles();
    })(),
  ]).finally(() => {
    done = true;
  });
  work.catch(() => {
    stopped = true;
  });
  try {
    while (!done) {
      await Promise.race([queue.output(), work]);
      yield* queue.take();
    }
    await work;
  } finally {
    stopped = true;
  }

  const resources = names.map((name) => written.get(name) as ResourceFacts);
  const facts = packageFacts(options, scope, collected, now, await programName(db), resources);
  queue.text(`datapackage.json`, `${JSON.stringify(dataPackageDescriptor(facts), null, 2)}\n`);
  queue.text(`CITATION.cff`, citationCff(facts));
  queue.text(`README.md`, readmeText(facts));
  queue.end();
  yield* queue.take();
}

export { ExportRequestError };
