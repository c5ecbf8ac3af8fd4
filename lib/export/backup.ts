/**
 * Whole-archive backup and restore. A backup is one zip: every table as JSON lines
 * (tables/<Model>-<part>.ndjson, in foreign-key order), every raw file's bytes as raw/<rawFileId>,
 * and manifest.json (table order, parts, row counts, engine, version). Restore loads it into an
 * EMPTY database of either engine and checks every raw file's size and SHA-256 and every table's
 * row count. Sessions and login-attempt counters are not archive data and are left out.
 * Values keep full precision: numbers as JSON numbers (shortest round-trip text), times as ISO
 * 8601 UTC with milliseconds, JSON columns as JSON.
 */
import { createHash } from "node:crypto";
import fs from "node:fs";
import { once } from "node:events";
import packageJson from "../../package.json" with { type: "json" };
import { Prisma, type Db, type DbHandle } from "../db/index.ts";
import { ZipQueue } from "./zip-queue.ts";
import { ZipReader } from "./zip-reader.ts";

type Row = Record<string, unknown>;

interface ModelCodec {
  model: string;
  dates: readonly string[];
  /** Json columns; the nullable ones store SQL NULL for null. */
  json: readonly string[];
  nullableJson: readonly string[];
  count(db: Db): Promise<number>;
  page(db: Db, after: string | number | null, take: number): Promise<Row[]>;
  insert(db: Db, rows: Row[]): Promise<void>;
}

const afterString = (after: string | number | null) => (after === null ? {} : { id: { gt: String(after) } });

/** Every archive table in foreign-key order (parents first). A unit test checks this list against prisma/schema.prisma. */
export const BACKUP_MODELS: readonly ModelCodec[] = [
  {
    model: "ProgramSettings", dates: ["updatedAt"], json: ["analysisParameters"], nullableJson: [],
    count: (db) => db.programSettings.count(),
    page: (db, after, take) => db.programSettings.findMany({ where: after === null ? {} : { id: { gt: Number(after) } }, orderBy: { id: "asc" }, take }),
    insert: async (db, rows) => void (await db.programSettings.createMany({ data: rows as Prisma.ProgramSettingsCreateManyInput[] })),
  },
  {
    model: "School", dates: ["createdAt"], json: [], nullableJson: [],
    count: (db) => db.school.count(),
    page: (db, after, take) => db.school.findMany({ where: afterString(after), orderBy: { id: "asc" }, take }),
    insert: async (db, rows) => void (await db.school.createMany({ data: rows as Prisma.SchoolCreateManyInput[] })),
  },
  {
    model: "User", dates: ["createdAt"], json: [], nullableJson: [],
    count: (db) => db.user.count(),
    page: (db, after, take) => db.user.findMany({ where: afterString(after), orderBy: { id: "asc" }, take }),
    insert: async (db, rows) => void (await db.user.createMany({ data: rows as Prisma.UserCreateManyInput[] })),
  },
  {
    model: "Membership", dates: ["createdAt"], json: [], nullableJson: [],
    count: (db) => db.membership.count(),
    page: (db, after, take) => db.membership.findMany({ where: afterString(after), orderBy: { id: "asc" }, take }),
    insert: async (db, rows) => void (await db.membership.createMany({ data: rows as Prisma.MembershipCreateManyInput[] })),
  },
  {
    model: "Invitation", dates: ["createdAt", "expiresAt", "usedAt"], json: [], nullableJson: [],
    count: (db) => db.invitation.count(),
    page: (db, after, take) => db.invitation.findMany({ where: afterString(after), orderBy: { id: "asc" }, take }),
    insert: async (db, rows) => void (await db.invitation.createMany({ data: rows as Prisma.InvitationCreateManyInput[] })),
  },
  {
    model: "ApiToken", dates: ["createdAt", "lastUsedAt", "revokedAt"], json: [], nullableJson: [],
    count: (db) => db.apiToken.count(),
    page: (db, after, take) => db.apiToken.findMany({ where: afterString(after), orderBy: { id: "asc" }, take }),
    insert: async (db, rows) => void (await db.apiToken.createMany({ data: rows as Prisma.ApiTokenCreateManyInput[] })),
  },
  {
    model: "Site", dates: ["createdAt"], json: [], nullableJson: [],
    count: (db) => db.site.count(),
    page: (db, after, take) => db.site.findMany({ where: afterString(after), orderBy: { id: "asc" }, take }),
    insert: async (db, rows) => void (await db.site.createMany({ data: rows as Prisma.SiteCreateManyInput[] })),
  },
  {
    model: "Payload", dates: ["createdAt"], json: [], nullableJson: [],
    count: (db) => db.payload.count(),
    page: (db, after, take) => db.payload.findMany({ where: afterString(after), orderBy: { id: "asc" }, take }),
    insert: async (db, rows) => void (await db.payload.createMany({ data: rows as Prisma.PayloadCreateManyInput[] })),
  },
  {
    model: "Sensor", dates: ["createdAt"], json: [], nullableJson: [],
    count: (db) => db.sensor.count(),
    page: (db, after, take) => db.sensor.findMany({ where: afterString(after), orderBy: { id: "asc" }, take }),
    insert: async (db, rows) => void (await db.sensor.createMany({ data: rows as Prisma.SensorCreateManyInput[] })),
  },
  {
    model: "SensorMount", dates: ["fromUtc", "toUtc"], json: [], nullableJson: [],
    count: (db) => db.sensorMount.count(),
    page: (db, after, take) => db.sensorMount.findMany({ where: afterString(after), orderBy: { id: "asc" }, take }),
    insert: async (db, rows) => void (await db.sensorMount.createMany({ data: rows as Prisma.SensorMountCreateManyInput[] })),
  },
  {
    model: "Calibration", dates: ["validFromUtc", "validToUtc", "createdAt"], json: ["spec", "referenceReadings"], nullableJson: ["referenceReadings"],
    count: (db) => db.calibration.count(),
    page: (db, after, take) => db.calibration.findMany({ where: afterString(after), orderBy: { id: "asc" }, take }),
    insert: async (db, rows) => void (await db.calibration.createMany({ data: rows as Prisma.CalibrationCreateManyInput[] })),
  },
  {
    model: "LoggerLayout", dates: ["createdAt", "updatedAt"], json: ["spec"], nullableJson: [],
    count: (db) => db.loggerLayout.count(),
    page: (db, after, take) => db.loggerLayout.findMany({ where: afterString(after), orderBy: { id: "asc" }, take }),
    insert: async (db, rows) => void (await db.loggerLayout.createMany({ data: rows as Prisma.LoggerLayoutCreateManyInput[] })),
  },
  {
    // The bytes travel as separate zip entries (raw/<id>); the row carries everything else.
    model: "RawFile", dates: ["uploadedAt"], json: [], nullableJson: [],
    count: (db) => db.rawFile.count(),
    page: (db, after, take) => db.rawFile.findMany({ where: afterString(after), orderBy: { id: "asc" }, take, omit: { bytes: true } }),
    insert: async (db, rows) => void (await db.rawFile.createMany({ data: rows as Prisma.RawFileCreateManyInput[] })),
  },
  {
    model: "Flight", dates: ["launchAtUtc", "createdAt", "updatedAt", "deletedAt"], json: [], nullableJson: [],
    count: (db) => db.flight.count(),
    page: (db, after, take) => db.flight.findMany({ where: afterString(after), orderBy: { id: "asc" }, take }),
    insert: async (db, rows) => void (await db.flight.createMany({ data: rows as Prisma.FlightCreateManyInput[] })),
  },
  {
    model: "AnalysisRun", dates: ["createdAt"], json: ["parameters", "calibrationSpec", "layoutSpec", "warnings", "removedCounts"], nullableJson: [],
    count: (db) => db.analysisRun.count(),
    page: (db, after, take) => db.analysisRun.findMany({ where: afterString(after), orderBy: { id: "asc" }, take }),
    insert: async (db, rows) => void (await db.analysisRun.createMany({ data: rows as Prisma.AnalysisRunCreateManyInput[] })),
  },
  {
    model: "ProfileLevel", dates: [], json: [], nullableJson: [],
    count: (db) => db.profileLevel.count(),
    page: (db, after, take) => db.profileLevel.findMany({ where: after === null ? {} : { id: { gt: Number(after) } }, orderBy: { id: "asc" }, take }),
    insert: insertLevelsWithIds,
  },
  {
    model: "LayerStat", dates: [], json: [], nullableJson: [],
    count: (db) => db.layerStat.count(),
    page: (db, after, take) => db.layerStat.findMany({ where: afterString(after), orderBy: { id: "asc" }, take }),
    insert: async (db, rows) => void (await db.layerStat.createMany({ data: rows as Prisma.LayerStatCreateManyInput[] })),
  },
  {
    model: "FlightSummary", dates: ["launchAtUtc"], json: [], nullableJson: [],
    count: (db) => db.flightSummary.count(),
    page: (db, after, take) => db.flightSummary.findMany({ where: afterString(after), orderBy: { id: "asc" }, take }),
    insert: async (db, rows) => void (await db.flightSummary.createMany({ data: rows as Prisma.FlightSummaryCreateManyInput[] })),
  },
  {
    model: "AuditEvent", dates: ["at"], json: ["details"], nullableJson: ["details"],
    count: (db) => db.auditEvent.count(),
    page: (db, after, take) => db.auditEvent.findMany({ where: afterString(after), orderBy: { id: "asc" }, take }),
    insert: async (db, rows) => void (await db.auditEvent.createMany({ data: rows as Prisma.AuditEventCreateManyInput[] })),
  },
];

/** Tables deliberately not in a backup: sign-in state, and the change counter the triggers keep (a restore bumps it anyway). */
export const NOT_BACKED_UP = ["Session", "LoginAttempt", "ArchiveRevision"] as const;

/** Levels keep their ids (multi-row INSERTs, as lib/db/bulk.ts does, 5–8× faster than createMany). */
async function insertLevelsWithIds(db: Db, rows: Row[]): Promise<void> {
  for (let start = 0; start < rows.length; start += 1000) {
    const values = rows.slice(start, start + 1000).map(
      (l) => Prisma.sql`(${l.id}, ${l.runId}, ${l.phase}, ${l.altitudeM}, ${l.baseM}, ${l.topM}, ${l.sampleCount}, ${l.temperatureK}, ${l.temperatureSdK}, ${l.pressureHpa}, ${l.relativeHumidityPct})`,
    );
    await db.$executeRaw`INSERT INTO "ProfileLevel" ("id", "runId", "phase", "altitudeM", "baseM", "topM", "sampleCount", "temperatureK", "temperatureSdK", "pressureHpa", "relativeHumidityPct") VALUES ${Prisma.join(values)}`;
  }
}

export const BACKUP_FORMAT = "lapsebank-backup";
export const BACKUP_FORMAT_VERSION = 1;
const ROWS_PER_PART = 250_000;
const PAGE_ROWS = 2000;
const INSERT_ROWS = 500;

export interface BackupManifest {
  format: typeof BACKUP_FORMAT;
  formatVersion: number;
  lapsebankVersion: string;
  createdAtUtc: string;
  tables: Array<{ model: string; rows: number; parts: string[] }>;
  rawFiles: number;
  /** Flights stored as invented (Flight.synthetic, e.g. the demo program), with a sentence saying so when there are any. */
  inventedFlights?: number;
  inventedData?: string;
}

export interface BackupReport {
  rowCounts: Record<string, number>;
  rawFiles: number;
}

/** A restore that would not be lossless or would mix archives: not-empty target, unknown format, failed check. */
export class RestoreRefused extends Error {
  constructor(message: string) {
    super(message);
    this.name = "RestoreRefused";
  }
}

function encodeRow(row: Row): string {
  const out: Row = {};
  for (const [key, value] of Object.entries(row)) out[key] = value instanceof Date ? value.toISOString() : value;
  return JSON.stringify(out);
}

function decodeRow(codec: ModelCodec, row: Row): Row {
  const out: Row = { ...row };
  for (const key of codec.dates) {
    const value = out[key];
    if (typeof value === "string") out[key] = new Date(value);
  }
  for (const key of codec.json) {
    if (out[key] === null || out[key] === undefined) out[key] = codec.nullableJson.includes(key) ? Prisma.DbNull : Prisma.JsonNull;
  }
  return out;
}

/** Zip offsets are 32-bit without ZIP64, which fflate does not write; a larger backup must stop, not corrupt. */
export const MAX_BACKUP_BYTES = 0xffff_ffff;

async function writeChunks(stream: fs.WriteStream, chunks: Uint8Array[], written: { bytes: number }): Promise<void> {
  for (const chunk of chunks) {
    written.bytes += chunk.length;
    if (written.bytes > MAX_BACKUP_BYTES) throw new Error("the backup would exceed 4 GiB, the zip limit without ZIP64; back up with the database's own tools (pg_dump, sqlite3 .backup) instead");
    if (!stream.write(chunk)) await once(stream, "drain");
  }
}

/**
 * Writes the whole archive into one zip file at `file`, table by table in pages (memory stays flat).
 * Run it while nobody uploads: rows added during a backup may or may not be in it.
 */
export async function backupArchive(db: Db, file: string, options: { now?: Date; onProgress?: (model: string, rows: number) => void } = {}): Promise<BackupReport> {
  const now = options.now ?? new Date();
  const queue = new ZipQueue(now);
  const stream = fs.createWriteStream(file);
  const manifest: BackupManifest = { format: BACKUP_FORMAT, formatVersion: BACKUP_FORMAT_VERSION, lapsebankVersion: packageJson.version, createdAtUtc: now.toISOString(), tables: [], rawFiles: 0 };
  manifest.inventedFlights = await db.flight.count({ where: { synthetic: true } });
  if (manifest.inventedFlights > 0) manifest.inventedData = `${manifest.inventedFlights} flight${manifest.inventedFlights === 1 ? " is" : "s are"} INVENTED (Flight.synthetic = true: demo or test data generated by code, not measurements).`;
  const encoder = new TextEncoder();
  const written = { bytes: 0 };
  try {
    for (const codec of BACKUP_MODELS) {
      const entry = { model: codec.model, rows: 0, parts: [] as string[] };
      let part = null as ReturnType<ZipQueue["entry"]> | null;
      let after: string | number | null = null;
      for (;;) {
        const rows = await codec.page(db, after, PAGE_ROWS);
        if (rows.length === 0) break;
        let text = "";
        for (const row of rows) {
          if (entry.rows % ROWS_PER_PART === 0) {
            if (text) part?.push(encoder.encode(text), false);
            text = "";
            part?.push(new Uint8Array(0), true);
            const name = `tables/${codec.model}-${String(entry.parts.length + 1).padStart(4, "0")}.ndjson`;
            entry.parts.push(name);
            part = queue.entry(name, 1);
          }
          text += `${encodeRow(row)}\n`;
          entry.rows++;
        }
        part?.push(encoder.encode(text), false);
        await writeChunks(stream, queue.take(), written);
        after = rows[rows.length - 1]?.id as string | number;
        options.onProgress?.(codec.model, entry.rows);
      }
      part?.push(new Uint8Array(0), true);
      await writeChunks(stream, queue.take(), written);
      manifest.tables.push(entry);
    }
    let after: string | null = null;
    for (;;) {
      const page: Array<{ id: string; bytes: Uint8Array }> = await db.rawFile.findMany({ where: after === null ? {} : { id: { gt: after } }, orderBy: { id: "asc" }, take: 20, select: { id: true, bytes: true } });
      if (page.length === 0) break;
      for (const raw of page) {
        queue.entry(`raw/${raw.id}`, 1).push(new Uint8Array(raw.bytes), true);
        await writeChunks(stream, queue.take(), written);
        manifest.rawFiles++;
      }
      after = page[page.length - 1]?.id ?? null;
      options.onProgress?.("raw files", manifest.rawFiles);
    }
    queue.text("manifest.json", `${JSON.stringify(manifest, null, 2)}\n`);
    queue.end();
    await writeChunks(stream, queue.take(), written);
    stream.end();
    await once(stream, "finish");
  } catch (error) {
    stream.destroy();
    fs.rmSync(file, { force: true });
    throw error;
  }
  return { rowCounts: Object.fromEntries(manifest.tables.map((t) => [t.model, t.rows])), rawFiles: manifest.rawFiles };
}

/** Rows in every archive table of the target; restore needs them all at zero. */
export async function archiveRowCounts(db: Db): Promise<Record<string, number>> {
  const out: Record<string, number> = {};
  for (const codec of BACKUP_MODELS) out[codec.model] = await codec.count(db);
  return out;
}

async function resetSequences(db: Db): Promise<void> {
  // PostgreSQL keeps serial counters apart from the rows; SQLite's AUTOINCREMENT follows inserted ids.
  for (const table of ["ProfileLevel", "ProgramSettings"]) {
    await db.$executeRawUnsafe(`SELECT setval(pg_get_serial_sequence('"${table}"', 'id'), COALESCE((SELECT MAX("id") FROM "${table}"), 0) + 1, false)`);
  }
}

/**
 * Loads a backup into an empty database. Checks the manifest, every table's row count and every
 * raw file's size and SHA-256 against its row.
 * @throws RestoreRefused when the database holds archive rows, the file is not a Lapsebank backup, or a check fails.
 */
export async function restoreArchive(handle: Pick<DbHandle, "db" | "engine">, file: string, options: { onProgress?: (model: string, rows: number) => void } = {}): Promise<BackupReport> {
  const { db } = handle;
  const counts = await archiveRowCounts(db);
  const occupied = Object.entries(counts).filter(([, n]) => n > 0);
  if (occupied.length) {
    throw new RestoreRefused(`the database is not empty (${occupied.map(([t, n]) => `${t}: ${n}`).join(", ")}); restore only loads into an empty, migrated database`);
  }
  let zip: ZipReader;
  try {
    zip = await ZipReader.open(file);
  } catch (error) {
    throw new RestoreRefused(`${file} is not a readable backup: ${(error as Error).message}`);
  }
  try {
    if (!zip.entries.has("manifest.json")) throw new RestoreRefused(`${file} is not a Lapsebank backup (no manifest.json)`);
    const manifest = JSON.parse(new TextDecoder().decode(await zip.read("manifest.json"))) as BackupManifest;
    if (manifest.format !== BACKUP_FORMAT || manifest.formatVersion !== BACKUP_FORMAT_VERSION) {
      throw new RestoreRefused(`${file} is a ${manifest.format} v${manifest.formatVersion} file; this Lapsebank reads ${BACKUP_FORMAT} v${BACKUP_FORMAT_VERSION}`);
    }
    const report: BackupReport = { rowCounts: {}, rawFiles: 0 };
    for (const codec of BACKUP_MODELS) {
      const table = manifest.tables.find((t) => t.model === codec.model);
      if (!table) throw new RestoreRefused(`the backup has no ${codec.model} table`);
      let batch: Row[] = [];
      let rows = 0;
      const flush = async () => {
        if (batch.length === 0) return;
        if (codec.model === "RawFile") batch = await Promise.all(batch.map((row) => withRawBytes(zip, row)));
        await codec.insert(db, batch);
        rows += batch.length;
        batch = [];
        options.onProgress?.(codec.model, rows);
      };
      for (const part of table.parts) {
        for await (const line of zip.lines(part)) {
          batch.push(decodeRow(codec, JSON.parse(line) as Row));
          if (batch.length >= (codec.model === "ProfileLevel" ? 5000 : codec.model === "RawFile" ? 20 : INSERT_ROWS)) await flush();
        }
      }
      await flush();
      if (rows !== table.rows) throw new RestoreRefused(`${codec.model}: the backup lists ${table.rows} rows but holds ${rows}`);
      report.rowCounts[codec.model] = rows;
      if (codec.model === "RawFile") report.rawFiles = rows;
    }
    if (handle.engine === "postgres") await resetSequences(db);
    return report;
  } finally {
    await zip.close();
  }
}

async function withRawBytes(zip: ZipReader, row: Row): Promise<Row> {
  const id = String(row.id);
  if (!zip.entries.has(`raw/${id}`)) throw new RestoreRefused(`raw file ${id} is missing from the backup`);
  const bytes = await zip.read(`raw/${id}`);
  const sha256 = createHash("sha256").update(bytes).digest("hex");
  if (bytes.length !== row.sizeBytes || sha256 !== row.sha256) {
    throw new RestoreRefused(`raw file ${id} (${String(row.name)}) does not match its recorded size and SHA-256; the backup is damaged`);
  }
  return { ...row, bytes };
}
