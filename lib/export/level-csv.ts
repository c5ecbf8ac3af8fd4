/**
 * The levels table as CSV bytes, fast: the one table of an export that holds millions of rows.
 * - SQLite: pages of runs go to two worker threads (level-csv-worker.mjs) that read and format
 *   them in parallel; pages come back in order, a few ahead at most, so memory stays flat.
 * - PostgreSQL: the server formats the numbers (float8 output is the shortest text that reads back
 *   to the same double, PostgreSQL ≥ 12) and joins each run's rows into one text value, so only
 *   one value per run and phase crosses the wire. The digits are ECMAScript's; only the exponent
 *   style differs (1e-05 where ECMAScript writes 0.00001), so numbers with an exponent are
 *   rewritten as String(Number(text)).
 * Both write the cells exactly as csv.ts does for the levels table's fields, in the order of the
 * runs given, each run by phase then altitude. Callers pass runs already checked for visibility.
 */
import fs from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { Worker } from "node:worker_threads";
import pg from "pg";
import { Prisma, type DbHandle } from "../db/index.ts";
import { postgresDialect } from "../db/dialect.ts";
import { csvCell } from "./csv.ts";
import { pgPoolConfig, sqlitePath } from "./level-reader.ts";

/** A flight and its current run, in export order. */
export interface RunOfFlight {
  flightId: string;
  runId: string;
  /** The flight is invented (Flight.synthetic): the levels table's synthetic column. */
  synthetic: boolean;
}

export interface CsvPage {
  bytes: Uint8Array;
  rows: number;
  /** Call when nothing reads `bytes` any more: hands the buffer back for the next page (optional; detaches `bytes`). */
  release?: () => void;
}

const WORKER_FILE = "level-csv-worker.mjs";

/** The worker script on disk: beside this module when run from source, else under the project root (the Next.js server bundles this module elsewhere). */
function workerPath(): string {
  const candidates: string[] = [];
  try {
    candidates.push(path.join(path.dirname(fileURLToPath(import.meta.url)), WORKER_FILE));
  } catch {
    // import.meta.url is not a file URL inside some bundles.
  }
  candidates.push(path.join(process.cwd(), "lib", "export", WORKER_FILE));
  const found = candidates.find((file) => fs.existsSync(file));
  if (!found) throw new Error(`export: ${WORKER_FILE} not found (looked in ${candidates.join(", ")})`);
  return found;
}

type WorkerReply = { seq: number; bytes: Uint8Array; rows: number } | { seq: number; error: string };

/** Runs per worker message: small enough that a page of long flights stays a few megabytes in a worker's heap. */
const RUNS_PER_MESSAGE = 25;

/** The pages' items again, in pages of exactly `size` (the last may be shorter), whatever size they came in. */
async function* inPiecesOf<T>(size: number, pages: AsyncIterable<T[]>): AsyncGenerator<T[]> {
  let piece: T[] = [];
  for await (const page of pages) {
    for (const item of page) {
      piece.push(item);
      if (piece.length === size) {
        yield piece;
        piece = [];
      }
    }
  }
  if (piece.length) yield piece;
}

/** Levels CSV of SQLite runs, page by page, formatted by worker threads. */
async function* sqliteLevelPages(url: string, pages: AsyncIterable<RunOfFlight[]>, workerCount: number): AsyncGenerator<CsvPage> {
  const file = workerPath();
  const workers: Worker[] = [];
  const waiting = new Map<number, { resolve: (page: CsvPage) => void; reject: (error: Error) => void }>();
  const settled = new Map<number, Promise<CsvPage>>();
  let finished = false;
  /** Started on first use, so a one-flight export starts one thread, not two. */
  const workerFor = (seq: number): Worker => {
    const index = seq % workerCount;
    const existing = workers[index];
    if (existing) return existing;
    // execArgv: []: the worker is plain JavaScript and needs none of the parent's loader flags (tsx would cost ~20 MB a thread).
    const worker = new Worker(file, { workerData: { path: sqlitePath(url) }, execArgv: [], resourceLimits: { maxOldGenerationSizeMb: 64, maxYoungGenerationSizeMb: 4 } });
    worker.on("message", (reply: WorkerReply) => {
      const entry = waiting.get(reply.seq);
      waiting.delete(reply.seq);
      if ("error" in reply) entry?.reject(new Error(`export: reading levels failed: ${reply.error}`));
      else {
        const buffer = reply.bytes.buffer as ArrayBuffer;
        const release = () => {
          if (!finished && buffer.byteLength > 0) worker.postMessage({ recycle: buffer }, [buffer]);
        };
        entry?.resolve({ bytes: reply.bytes, rows: reply.rows, release });
      }
    });
    worker.on("error", (error) => {
      for (const entry of waiting.values()) entry.reject(error);
      waiting.clear();
    });
    workers[index] = worker;
    return worker;
  };
  const submit = (seq: number, runs: RunOfFlight[]) => {
    const promise = new Promise<CsvPage>((resolve, reject) => waiting.set(seq, { resolve, reject }));
    promise.catch(() => undefined); // observed when its turn comes
    settled.set(seq, promise);
    workerFor(seq).postMessage({ seq, runs: runs.map((r) => [r.flightId, r.runId, r.synthetic]) });
  };
  // Keep each worker two pages ahead of the consumer, no more: memory stays a few pages.
  const ahead = workerCount * 2;
  const source = inPiecesOf(RUNS_PER_MESSAGE, pages)[Symbol.asyncIterator]();
  let submitted = 0;
  let next = 0;
  let exhausted = false;
  try {
    for (;;) {
      while (!exhausted && submitted - next < ahead) {
        const step = await source.next();
        if (step.done) exhausted = true;
        else submit(submitted++, step.value);
      }
      if (next === submitted) return;
      const page = await (settled.get(next) as Promise<CsvPage>);
      settled.delete(next++);
      yield page;
    }
  } finally {
    finished = true;
    await Promise.all(workers.map((w) => w.terminate()));
  }
}

/** Each numeric cell as float8/int text, empty when missing: the same cells csv.ts writes. */
const PG_LEVEL_NUMBERS = Prisma.sql`concat("altitudeM", ',', "baseM", ',', "topM", ',', "sampleCount", ',', "temperatureK", ',', "temperatureSdK", ',', "pressureHpa", ',', "relativeHumidityPct")`;

/** Numbers PostgreSQL wrote with an exponent. */
const EXPONENT_NUMBER = /-?[0-9.]+e[-+]\d+/g;
const shortest = (text: string) => String(Number(text));

type PgLevelRow = [string, string, string, string];

/** One page's rows as CSV: runs in the given order, each by phase. */
function pgPageCsv(runs: readonly RunOfFlight[], result: readonly PgLevelRow[]): { text: string; rows: number } {
  const byRun = new Map<string, PgLevelRow[]>();
  for (const row of result) {
    const list = byRun.get(row[0]);
    if (list) list.push(row);
    else byRun.set(row[0], [row]);
  }
  let text = "";
  let rows = 0;
  for (const { flightId, runId, synthetic } of runs) {
    const phases = (byRun.get(runId) ?? []).sort((a, b) => (a[1] < b[1] ? -1 : a[1] > b[1] ? 1 : 0));
    for (const [, phase, count, lines] of phases) {
      const prefix = `${csvCell(flightId)},${csvCell(synthetic)},${csvCell(runId)},${csvCell(phase)},`;
      const numbers = lines.includes("e") ? lines.replace(EXPONENT_NUMBER, shortest) : lines;
      text += `${prefix}${numbers.replaceAll("\n", `\r\n${prefix}`)}\r\n`;
      rows += Number(count);
    }
  }
  return { text, rows };
}

/**
 * Levels CSV of PostgreSQL runs, page by page, formatted by the database server. Two connections
 * work on consecutive pages at once (each server process formats on its own core).
 */
async function* postgresLevelPages(url: string, pages: AsyncIterable<RunOfFlight[]>, connections: number): AsyncGenerator<CsvPage> {
  const pool = new pg.Pool({ ...pgPoolConfig(url, ["-c extra_float_digits=1"]), max: connections });
  const encoder = new TextEncoder();
  const lines = postgresDialect.stringAgg(PG_LEVEL_NUMBERS, "\n", Prisma.sql`l."altitudeM"`);
  const query = (runs: RunOfFlight[]) => {
    // One index range scan per run (LATERAL, equality on the index's first column): the plan stays
    // right even before the planner has statistics, e.g. just after a restore or a bulk load.
    const statement = Prisma.sql`SELECT r.id, x."phase", x.n, x.lines FROM unnest(CAST(${runs.map((r) => r.runId)} AS text[])) AS r(id)
             CROSS JOIN LATERAL (
               SELECT l."phase", count(*)::text AS n, ${lines} AS lines
               FROM "ProfileLevel" l WHERE l."runId" = r.id GROUP BY l."phase"
             ) x`;
    return pool.query<PgLevelRow>({ text: statement.text, values: statement.values, rowMode: "array" });
  };
  const inFlight: Array<{ runs: RunOfFlight[]; result: ReturnType<typeof query> }> = [];
  // A hundred runs per query: fewer round trips, a couple of megabytes of text per answer.
  const source = inPiecesOf(100, pages)[Symbol.asyncIterator]();
  let exhausted = false;
  try {
    for (;;) {
      while (!exhausted && inFlight.length < connections) {
        const step = await source.next();
        if (step.done) exhausted = true;
        else if (step.value.length) {
          const result = query(step.value);
          result.catch(() => undefined); // observed below, in order
          inFlight.push({ runs: step.value, result });
        }
      }
      const next = inFlight.shift();
      if (!next) return;
      const { text, rows } = pgPageCsv(next.runs, (await next.result).rows);
      if (rows) yield { bytes: encoder.encode(text), rows };
    }
  } finally {
    await Promise.allSettled(inFlight.map((f) => f.result));
    await pool.end();
  }
}

/** The levels table's records (no header) for these pages of runs, as CSV bytes a page at a time; `parallel` worker threads (SQLite) or connections (PostgreSQL) share the work. */
export function levelCsvPages(handle: Pick<DbHandle, "engine" | "url">, pages: AsyncIterable<RunOfFlight[]>, options: { parallel?: number } = {}): AsyncGenerator<CsvPage> {
  return handle.engine === "sqlite" ? sqliteLevelPages(handle.url, pages, options.parallel ?? 2) : postgresLevelPages(handle.url, pages, options.parallel ?? 2);
}
