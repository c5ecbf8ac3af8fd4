/**
 * Whole-archive backup and restore. A backup is one zip: every table as JSON lines
 * (tables/<Model>-<part>.ndjson, in foreign-key order), every raw file's bytes as raw/<rawFileId>,
 * and manifest.json (table order, parts, row counts, version, a SHA-256 per entry). Restore loads it
 * into an EMPTY database of either engine, all or nothing: it checks every entry (CRC-32, SHA-256,
 * size, row counts, dates, raw files against their rows) before writing, then writes in one
 * transaction. Sessions and login-attempt counters are not archive data and are left out.
 * Values keep full precision: numbers as JSON numbers (shortest round-trip text), times as ISO
 * 8601 UTC with milliseconds, JSON columns as JSON.
 */
import { createHash, randomUUID, type Hash } from "node:crypto";
import fs from "node:fs";
import { once } from "node:events";
import path from "node:path";
import { z } from "zod";
import packageJson from "../../package.json" with { type: "json" };
import { Prisma, type Db, type DbHandle, type DbTransaction } from "../db/index.ts";
import { dialectFor, type Dialect } from "../db/dialect.ts";
import { isStorableInstant, launchTimeProblem } from "../ingest/time-bounds.ts";
import { ZipQueue } from "./zip-queue.ts";
import { ZipEntryError, ZipReader } from "./zip-reader.ts";

type Row = Record<string, unknown>;

interface ModelCodec {
  model: string;
  dates: readonly string[];
  /** Json columns; the nullable ones store SQL NULL for null. */
  json: readonly string[];
  nullableJson: readonly string[];
  count(db: Db | DbTransaction): Promise<number>;
  page(db: Db, after: string | number | null, take: number): Promise<Row[]>;
  insert(db: DbTransaction, rows: Row[]): Promise<void>;
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
    model: "Flight", dates: ["launchAtUtc", "typedLaunchAtUtc", "createdAt", "updatedAt", "deletedAt"], json: [], nullableJson: [],
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

/** Tables deliberately not in a backup: sign-in state and throttles, the change counter the triggers keep (a restore bumps it anyway) and the interrupted-restore marker. */
export const NOT_BACKED_UP = ["Session", "LoginThrottle", "SignInAddress", "ArchiveRevision", "RestoreMarker"] as const;

/** Levels keep their ids (multi-row INSERTs, as lib/db/bulk.ts does, 5–8× faster than createMany). */
async function insertLevelsWithIds(db: DbTransaction, rows: Row[]): Promise<void> {
  for (let start = 0; start < rows.length; start += 1000) {
    const values = rows.slice(start, start + 1000).map(
      (l) => Prisma.sql`(${l.id}, ${l.runId}, ${l.phase}, ${l.altitudeM}, ${l.baseM}, ${l.topM}, ${l.sampleCount}, ${l.temperatureK}, ${l.temperatureSdK}, ${l.pressureHpa}, ${l.relativeHumidityPct})`,
    );
    await db.$executeRaw`INSERT INTO "ProfileLevel" ("id", "runId", "phase", "altitudeM", "baseM", "topM", "sampleCount", "temperatureK", "temperatureSdK", "pressureHpa", "relativeHumidityPct") VALUES ${Prisma.join(values)}`;
  }
}

export const BACKUP_FORMAT = "lapsebank-backup";
/** 2 adds a SHA-256 per entry to the manifest; version 1 backups still restore, checked by CRC-32 alone. */
export const BACKUP_FORMAT_VERSION = 2;
const READABLE_FORMAT_VERSIONS = [1, 2];
const ROWS_PER_PART = 250_000;
const PAGE_ROWS = 2000;
const INSERT_ROWS = 500;

/** The manifest names the entries; it stays small (about 100 bytes per raw file). */
const MAX_MANIFEST_BYTES = 32 * 1048576;
/** One row of one table; real rows are a few kilobytes at most. */
const MAX_ROW_CHARS = 16 * 1048576;
/** One table part; it streams line by line, so this only bounds time. */
const MAX_TABLE_PART_BYTES = 0xffff_ffff;
/** One raw file, read whole: uploads are capped far below (LAPSEBANK_MAX_UPLOAD_MB is at most 2048). */
const MAX_RAW_FILE_BYTES = 2048 * 1048576;
/** A restore runs in one transaction however long it takes (Prisma's default would end it after 5 s). */
const RESTORE_TRANSACTION_TIMEOUT_MS = 24 * 3600 * 1000;

/** What manifest.json holds; the one schema restore reads it with. */
const BackupManifestSchema = z.object({
  format: z.literal(BACKUP_FORMAT),
  formatVersion: z.number().int(),
  lapsebankVersion: z.string(),
  createdAtUtc: z.string(),
  tables: z.array(z.object({ model: z.string(), rows: z.number().int().nonnegative(), parts: z.array(z.string()) })),
  rawFiles: z.number().int().nonnegative(),
  /** Entry name → SHA-256 (hex) of its bytes, for every entry but the manifest itself (format 2). */
  sha256: z.record(z.string(), z.string().regex(/^[0-9a-f]{64}$/)).optional(),
  /** Flights stored as invented (Flight.synthetic, e.g. the demo program), with a sentence saying so when there are any. */
  inventedFlights: z.number().int().nonnegative().optional(),
  inventedData: z.string().optional(),
});
export type BackupManifest = z.infer<typeof BackupManifestSchema>;

export interface BackupReport {
  rowCounts: Record<string, number>;
  rawFiles: number;
}

export interface RestoreReport extends BackupReport {
  /** The backup's format: 1 had no per-entry SHA-256, so its entries were checked by CRC-32 alone. */
  formatVersion: number;
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

/** ISO 8601 as the backup writes it (toISOString: six-digit signed years outside 0000–9999), or with an offset. */
const ISO_INSTANT = /^(?:\d{4}|[+-]\d{6})-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}(?:\.\d{1,3})?(?:Z|[+-]\d{2}:\d{2})$/;

/**
 * One backed-up row as Prisma takes it. Every date must be one the app can store and read back
 * (lib/ingest/time-bounds.ts), and a launch time must pass the same rule as an upload's; otherwise the
 * restore is refused, naming the entry, line and field.
 */
function decodeRow(codec: ModelCodec, row: Row, where: string, now: Date): Row {
  const out: Row = { ...row };
  for (const key of codec.dates) {
    const value = out[key];
    if (value === null || value === undefined) continue;
    const date = typeof value === "string" && ISO_INSTANT.test(value) ? new Date(value) : null;
    if (date === null || Number.isNaN(date.getTime())) throw new RestoreRefused(`${where}: ${key} ${JSON.stringify(value)} is not an ISO 8601 date-time`);
    if (!isStorableInstant(date)) throw new RestoreRefused(`${where}: ${key} ${JSON.stringify(value)} is outside the years 0001–9999 that the archive can store and read back`);
    const launchProblem = key === "launchAtUtc" ? launchTimeProblem(date, now) : null;
    if (launchProblem) throw new RestoreRefused(`${where}: launchAtUtc: ${launchProblem}`);
    out[key] = date;
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
 * The manifest records every entry's SHA-256. Run it while nobody uploads: rows added during a backup
 * may or may not be in it.
 */
export async function backupArchive(db: Db, file: string, options: { now?: Date; onProgress?: (model: string, rows: number) => void } = {}): Promise<BackupReport> {
  const now = options.now ?? new Date();
  const queue = new ZipQueue(now);
  const stream = fs.createWriteStream(file);
  const sha256: Record<string, string> = {};
  const manifest: BackupManifest = { format: BACKUP_FORMAT, formatVersion: BACKUP_FORMAT_VERSION, lapsebankVersion: packageJson.version, createdAtUtc: now.toISOString(), tables: [], rawFiles: 0, sha256 };
  manifest.inventedFlights = await db.flight.count({ where: { synthetic: true } });
  if (manifest.inventedFlights > 0) manifest.inventedData = `${manifest.inventedFlights} flight${manifest.inventedFlights === 1 ? " is" : "s are"} INVENTED (Flight.synthetic = true: demo or test data generated by code, not measurements).`;
  const encoder = new TextEncoder();
  const written = { bytes: 0 };
  try {
    for (const codec of BACKUP_MODELS) {
      const entry = { model: codec.model, rows: 0, parts: [] as string[] };
      let part = null as { name: string; zip: ReturnType<ZipQueue["entry"]>; hash: Hash } | null;
      const push = (bytes: Uint8Array, last: boolean) => {
        if (!part) return;
        part.hash.update(bytes);
        part.zip.push(bytes, last);
        if (last) sha256[part.name] = part.hash.digest("hex");
      };
      let after: string | number | null = null;
      for (;;) {
        const rows = await codec.page(db, after, PAGE_ROWS);
        if (rows.length === 0) break;
        let text = "";
        for (const row of rows) {
          if (entry.rows % ROWS_PER_PART === 0) {
            if (text) push(encoder.encode(text), false);
            text = "";
            push(new Uint8Array(0), true);
            const name = `tables/${codec.model}-${String(entry.parts.length + 1).padStart(4, "0")}.ndjson`;
            entry.parts.push(name);
            part = { name, zip: queue.entry(name, 1), hash: createHash("sha256") };
          }
          text += `${encodeRow(row)}\n`;
          entry.rows++;
        }
        push(encoder.encode(text), false);
        await writeChunks(stream, queue.take(), written);
        after = rows[rows.length - 1]?.id as string | number;
        options.onProgress?.(codec.model, entry.rows);
      }
      push(new Uint8Array(0), true);
      await writeChunks(stream, queue.take(), written);
      manifest.tables.push(entry);
    }
    let after: string | null = null;
    for (;;) {
      const page: Array<{ id: string; bytes: Uint8Array }> = await db.rawFile.findMany({ where: after === null ? {} : { id: { gt: after } }, orderBy: { id: "asc" }, take: 20, select: { id: true, bytes: true } });
      if (page.length === 0) break;
      for (const raw of page) {
        const bytes = new Uint8Array(raw.bytes);
        sha256[`raw/${raw.id}`] = createHash("sha256").update(bytes).digest("hex");
        queue.entry(`raw/${raw.id}`, 1).push(bytes, true);
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
export async function archiveRowCounts(db: Db | DbTransaction): Promise<Record<string, number>> {
  const out: Record<string, number> = {};
  for (const codec of BACKUP_MODELS) out[codec.model] = await codec.count(db);
  return out;
}

async function refuseIfOccupied(db: Db | DbTransaction): Promise<void> {
  const occupied = Object.entries(await archiveRowCounts(db)).filter(([, n]) => n > 0);
  if (occupied.length) {
    throw new RestoreRefused(`the database is not empty (${occupied.map(([t, n]) => `${t}: ${n}`).join(", ")}); restore only loads into an empty, migrated database`);
  }
}

/** Moves the serial id counters past the restored rows (PostgreSQL keeps them apart from the rows). */
async function resetSequences(db: DbTransaction, dialect: Dialect): Promise<void> {
  for (const table of ["ProfileLevel", "ProgramSettings"]) {
    for (const statement of dialect.resetIdSequence(table)) await db.$executeRaw(statement);
  }
}

/** Which pass a restore's progress belongs to: every entry is checked before the first row is written. */
export type RestoreStep = "check" | "write";

export interface RestoreOptions {
  onProgress?: (step: RestoreStep, model: string, rows: number) => void;
  /** The clock launch times are judged against (default: now). */
  now?: Date;
}

/** The backup file opened for restore: its manifest and how each entry is read and checked. */
class BackupFile {
  private constructor(
    readonly zip: ZipReader,
    readonly manifest: BackupManifest,
  ) {}

  static async open(file: string): Promise<BackupFile> {
    let zip: ZipReader;
    try {
      zip = await ZipReader.open(file);
    } catch (error) {
      throw new RestoreRefused(`${file} is not a readable backup: ${(error as Error).message}`);
    }
    try {
      if (!zip.has("manifest.json")) throw new RestoreRefused(`${file} is not a Lapsebank backup (no manifest.json)`);
      const text = (await zip.read("manifest.json", { maxBytes: MAX_MANIFEST_BYTES })).toString("utf8");
      let json: unknown;
      try {
        json = JSON.parse(text);
      } catch {
        throw new RestoreRefused(`${file}: manifest.json is not JSON`);
      }
      const head = z.object({ format: z.unknown(), formatVersion: z.unknown() }).safeParse(json);
      if (!head.success || head.data.format !== BACKUP_FORMAT || !READABLE_FORMAT_VERSIONS.includes(Number(head.data.formatVersion))) {
        const what = head.success ? `a ${String(head.data.format)} v${String(head.data.formatVersion)} file` : "not a Lapsebank backup";
        throw new RestoreRefused(`${file} is ${what}; this Lapsebank reads ${BACKUP_FORMAT} v${READABLE_FORMAT_VERSIONS.join(" and v")}`);
      }
      const parsed = BackupManifestSchema.safeParse(json);
      if (!parsed.success) throw new RestoreRefused(`${file}: manifest.json is malformed (${parsed.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`).join("; ")})`);
      if (parsed.data.formatVersion >= 2 && !parsed.data.sha256) throw new RestoreRefused(`${file}: manifest.json of format ${parsed.data.formatVersion} has no SHA-256 list`);
      return new BackupFile(zip, parsed.data);
    } catch (error) {
      await zip.close();
      throw error instanceof ZipEntryError ? new RestoreRefused(`${file}: ${error.message}`) : error;
    }
  }

  /** The SHA-256 the manifest records for an entry; undefined for format 1, which records none. */
  private sha256(name: string): string | undefined {
    if (!this.manifest.sha256) return undefined;
    const sha256 = this.manifest.sha256[name];
    if (sha256 === undefined) throw new RestoreRefused(`${name}: the manifest records no SHA-256 for this entry`);
    return sha256;
  }

  /** The rows of one table part, decoded and checked; the entry's CRC-32 and SHA-256 are checked at its end. */
  async *rows(codec: ModelCodec, part: string, now: Date): AsyncGenerator<Row> {
    try {
      for await (const line of this.zip.lines(part, { maxBytes: MAX_TABLE_PART_BYTES, maxLineChars: MAX_ROW_CHARS, sha256: this.sha256(part) })) {
        const where = `${part}, line ${line.lineNumber}`;
        let record: unknown;
        try {
          record = JSON.parse(line.text);
        } catch {
          throw new RestoreRefused(`${where}: not a JSON record; the backup is damaged`);
        }
        if (typeof record !== "object" || record === null || Array.isArray(record)) throw new RestoreRefused(`${where}: not a JSON object`);
        yield decodeRow(codec, record as Row, where, now);
      }
    } catch (error) {
      throw error instanceof ZipEntryError ? new RestoreRefused(error.message) : error;
    }
  }

  /** One raw file's bytes, checked against its row's size and SHA-256 (and the manifest's, in format 2). */
  async rawBytes(row: Row): Promise<Buffer> {
    const id = String(row.id);
    const name = `raw/${id}`;
    if (!this.zip.has(name)) throw new RestoreRefused(`raw file ${id} is missing from the backup`);
    const sizeBytes = typeof row.sizeBytes === "number" ? row.sizeBytes : -1;
    if (sizeBytes < 0 || sizeBytes > MAX_RAW_FILE_BYTES) throw new RestoreRefused(`raw file ${id}: recorded size ${String(row.sizeBytes)} is not one a restore reads`);
    let bytes: Buffer;
    try {
      bytes = await this.zip.read(name, { maxBytes: sizeBytes, sha256: this.sha256(name) });
    } catch (error) {
      if (error instanceof ZipEntryError) throw new RestoreRefused(`raw file ${id} (${String(row.name)}) does not match its recorded size and SHA-256; the backup is damaged (${error.message})`);
      throw error;
    }
    const sha256 = createHash("sha256").update(bytes).digest("hex");
    if (bytes.length !== sizeBytes || sha256 !== row.sha256) {
      throw new RestoreRefused(`raw file ${id} (${String(row.name)}) does not match its recorded size and SHA-256; the backup is damaged`);
    }
    return bytes;
  }

  table(codec: ModelCodec): BackupManifest["tables"][number] {
    const table = this.manifest.tables.find((t) => t.model === codec.model);
    if (!table) throw new RestoreRefused(`the backup has no ${codec.model} table`);
    return table;
  }

  async close(): Promise<void> {
    await this.zip.close();
  }
}

/**
 * A backup written before runs recorded their site (migration run_site_snapshot) restores with those
 * columns empty: fill them in the way that migration does (latitude from the run's own summary, the
 * rest from the site), so the restored archive matches one that was migrated. Runs that have them keep them.
 */
async function fillRunSiteSnapshots(db: DbTransaction): Promise<void> {
  await db.$executeRaw`
    UPDATE "AnalysisRun" SET
      "siteLatitudeDeg" = COALESCE("siteLatitudeDeg",
        (SELECT fs."latitudeDeg" FROM "FlightSummary" fs WHERE fs."runId" = "AnalysisRun"."id"),
        (SELECT s."latitudeDeg" FROM "Flight" f JOIN "Site" s ON s."id" = f."siteId" WHERE f."id" = "AnalysisRun"."flightId")),
      "siteLongitudeDeg" = COALESCE("siteLongitudeDeg", (SELECT s."longitudeDeg" FROM "Flight" f JOIN "Site" s ON s."id" = f."siteId" WHERE f."id" = "AnalysisRun"."flightId")),
      "siteElevationM" = COALESCE("siteElevationM", (SELECT s."elevationM" FROM "Flight" f JOIN "Site" s ON s."id" = f."siteId" WHERE f."id" = "AnalysisRun"."flightId")),
      "siteTimeZone" = COALESCE("siteTimeZone", (SELECT s."timeZone" FROM "Flight" f JOIN "Site" s ON s."id" = f."siteId" WHERE f."id" = "AnalysisRun"."flightId"))
    WHERE "siteLatitudeDeg" IS NULL OR "siteLongitudeDeg" IS NULL OR "siteElevationM" IS NULL OR "siteTimeZone" IS NULL`;
}

/**
 * The first pass: reads every entry to its end without writing anything. Every row must decode (dates
 * included), every table must hold the rows the manifest lists, every entry's CRC-32 (and SHA-256,
 * format 2) must match and every raw file its row.
 */
async function checkBackup(backup: BackupFile, now: Date, onProgress: RestoreOptions["onProgress"]): Promise<void> {
  const rawRows: Row[] = [];
  for (const codec of BACKUP_MODELS) {
    const table = backup.table(codec);
    let rows = 0;
    for (const part of table.parts) {
      for await (const row of backup.rows(codec, part, now)) {
        rows++;
        if (codec.model === "RawFile") rawRows.push({ id: row.id, name: row.name, sizeBytes: row.sizeBytes, sha256: row.sha256 });
        if (rows % 10_000 === 0) onProgress?.("check", codec.model, rows);
      }
    }
    if (rows !== table.rows) throw new RestoreRefused(`${codec.model}: the backup lists ${table.rows} rows but holds ${rows}`);
    onProgress?.("check", codec.model, rows);
  }
  if (rawRows.length !== backup.manifest.rawFiles) throw new RestoreRefused(`the backup lists ${backup.manifest.rawFiles} raw files but its RawFile table has ${rawRows.length} rows`);
  for (const [index, row] of rawRows.entries()) {
    await backup.rawBytes(row);
    if ((index + 1) % 100 === 0 || index + 1 === rawRows.length) onProgress?.("check", "raw files", index + 1);
  }
}

/** The second pass, inside the restore's transaction. */
async function writeBackup(tx: DbTransaction, backup: BackupFile, now: Date, onProgress: RestoreOptions["onProgress"]): Promise<BackupReport> {
  const report: BackupReport = { rowCounts: {}, rawFiles: 0 };
  for (const codec of BACKUP_MODELS) {
    const table = backup.table(codec);
    let batch: Row[] = [];
    let rows = 0;
    const flush = async () => {
      if (batch.length === 0) return;
      if (codec.model === "RawFile") batch = await Promise.all(batch.map(async (row) => ({ ...row, bytes: await backup.rawBytes(row) })));
      await codec.insert(tx, batch);
      rows += batch.length;
      batch = [];
      onProgress?.("write", codec.model, rows);
    };
    for (const part of table.parts) {
      for await (const row of backup.rows(codec, part, now)) {
        batch.push(row);
        if (batch.length >= (codec.model === "ProfileLevel" ? 5000 : codec.model === "RawFile" ? 20 : INSERT_ROWS)) await flush();
      }
    }
    await flush();
    if (rows !== table.rows) throw new RestoreRefused(`${codec.model}: the backup lists ${table.rows} rows but holds ${rows}`);
    report.rowCounts[codec.model] = rows;
    if (codec.model === "RawFile") report.rawFiles = rows;
  }
  return report;
}

/**
 * Loads a backup into an empty database, all or nothing. A first pass reads and checks every entry
 * (see checkBackup) and writes nothing; the second loads the rows in ONE transaction, so a failure or a
 * killed process leaves the database as it was. A RestoreMarker row, committed before that transaction
 * and deleted inside it, tells `npm start` and the CLI that a restore was interrupted
 * (lib/cli/preflight.ts); restoring again, or `reset`, clears it.
 * @throws RestoreRefused when the database holds archive rows, the file is not a Lapsebank backup, or a check fails.
 */
export async function restoreArchive(handle: Pick<DbHandle, "db" | "engine">, file: string, options: RestoreOptions = {}): Promise<RestoreReport> {
  const { db } = handle;
  const now = options.now ?? new Date();
  await refuseIfOccupied(db);
  const backup = await BackupFile.open(file);
  try {
    await checkBackup(backup, now, options.onProgress);
    const markerId = randomUUID();
    await db.restoreMarker.create({ data: { id: markerId, backupFile: path.resolve(file), startedAtUtc: new Date() } });
    try {
      return await db.$transaction(
        async (tx) => {
          await refuseIfOccupied(tx);
          const report = await writeBackup(tx, backup, now, options.onProgress);
          await fillRunSiteSnapshots(tx);
          await resetSequences(tx, dialectFor(handle.engine));
          // Every marker: an older interrupted restore is settled by this complete one.
          await tx.restoreMarker.deleteMany({});
          return { ...report, formatVersion: backup.manifest.formatVersion };
        },
        { maxWait: 60_000, timeout: RESTORE_TRANSACTION_TIMEOUT_MS },
      );
    } catch (error) {
      // The transaction rolled back: the database is as it was, so this restore leaves no marker.
      await db.restoreMarker.deleteMany({ where: { id: markerId } }).catch(() => undefined);
      throw error;
    }
  } finally {
    await backup.close();
  }
}
