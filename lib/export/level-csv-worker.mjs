/**
 * Worker thread for the levels table of SQLite exports: returns the binned levels of a page of
 * runs as CSV bytes. Levels are by far the largest table (3 M rows for a 10,000-flight archive) and
 * handing each value to JavaScript costs more than everything else, so SQLite writes the numbers
 * as text itself and joins each run's rows (one value per run and phase crosses into JavaScript).
 * The export spreads pages over two of these threads; the main thread only zips.
 * Plain JavaScript (no TypeScript) so the Next.js server and the CLI can both start it from disk.
 *
 * The cells come out exactly as lib/export/csv.ts writes them (a test compares the two paths):
 * - SQLite's REAL → TEXT is round-trip exact (15 significant digits when they suffice, else 17);
 *   integral values under 1e15 are written as integers ("100", not "100.0");
 * - any number SQLite wrote with 17 digits, or in exponent form, is rewritten as ECMAScript's
 *   shortest round-trip text (String(Number(text))), the form csv.ts uses; text with 15 digits
 *   or fewer is already that form;
 * - missing and infinite values are empty (SQLite stores NaN as NULL); text cells are guarded against formula injection and quoted per
 *   RFC 4180. SQLite stores −0.0 as 0, so there is no negative zero to keep.
 */
import { parentPort, workerData } from "node:worker_threads";
import Database from "better-sqlite3";

const FORMULA_TRIGGERS = new Set(["=", "+", "-", "@", "\t", "\r", "'"]);

/** Same as csvCell for a string (guardTextCell, then quoteCell). */
function textCell(text) {
  const guarded = FORMULA_TRIGGERS.has(text.charAt(0)) ? `'${text}` : text;
  return /[",\r\n]/.test(guarded) ? `"${guarded.replace(/"/g, '""')}"` : guarded;
}

/** A numeric column as CSV text in SQL: empty when missing or infinite (9e999 is SQLite's infinity), integers without ".0", else SQLite's round-trip text. */
function numberText(column) {
  const c = `"${column}"`;
  return `CASE WHEN ${c} IS NULL OR abs(${c}) >= 9e999 THEN '' WHEN ${c} = CAST(${c} AS INTEGER) AND abs(${c}) < 1e15 THEN CAST(CAST(${c} AS INTEGER) AS TEXT) ELSE CAST(${c} AS TEXT) END`;
}

const NUMBER_COLUMNS = ["altitudeM", "baseM", "topM", "sampleCount", "temperatureK", "temperatureSdK", "pressureHpa", "relativeHumidityPct"];

/** Numbers SQLite wrote in a longer form than ECMAScript's shortest: 17+ digits (18+ characters with the point) or an exponent. */
const NOT_SHORTEST = /-?[0-9.]{18,}(?:e[-+]\d+)?|-?[0-9.]+e[-+]\d+/g;

const shortest = (text) => String(Number(text));

/** Whether the text holds a number NOT_SHORTEST would rewrite; a plain scan, several times faster than running the regex over every run. */
function hasLongNumber(text) {
  let run = 0;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if ((c >= 48 && c <= 57) || c === 46) {
      if (++run >= 18) return true;
    } else if (c === 101) return true;
    else run = 0;
  }
  return false;
}

const database = new Database(workerData.path, { readonly: true, fileMustExist: true });
// Each page is read once, in index order: a small page cache does as well as better-sqlite3's 16 MB default.
database.pragma("cache_size = -2000");
const levelsOfRuns = database
  .prepare(
    `SELECT "runId", "phase", count(*), group_concat(${NUMBER_COLUMNS.map(numberText).join(" || ',' || ")}, char(10) ORDER BY "altitudeM")
     FROM "ProfileLevel" WHERE "runId" IN (SELECT value FROM json_each(?)) GROUP BY "runId", "phase"`,
  )
  .raw(true);

/** CSV records of the runs' levels (flightId, synthetic, runId, phase, then the numbers), run by run in the given order, each by phase then altitude. */
function pageCsv(runs) {
  const byRun = new Map();
  for (const row of levelsOfRuns.all(JSON.stringify(runs.map((r) => r[1])))) {
    const list = byRun.get(row[0]);
    if (list) list.push(row);
    else byRun.set(row[0], [row]);
  }
  let text = "";
  let rows = 0;
  for (const [flightId, runId, synthetic] of runs) {
    const phases = byRun.get(runId);
    if (!phases) continue;
    phases.sort((a, b) => (a[1] < b[1] ? -1 : a[1] > b[1] ? 1 : 0));
    for (const [, phase, count, numbers] of phases) {
      const prefix = `${textCell(flightId)},${synthetic ? "true" : "false"},${textCell(runId)},${textCell(String(phase))},`;
      text += `${prefix}${(hasLongNumber(numbers) ? numbers.replace(NOT_SHORTEST, shortest) : numbers).replaceAll("\n", `\r\n${prefix}`)}\r\n`;
      rows += count;
    }
  }
  return { bytes: encodeIntoSpare(text), rows };
}

/**
 * Page buffers the main thread has finished with and sent back. Reusing them matters: a buffer the
 * main thread merely drops lives until its next garbage collection, which a small heap runs
 * rarely, so dropped pages would pile up by the tens of megabytes.
 */
const spare = [];
const MAX_SPARE = 4;

function encodeIntoSpare(text) {
  const length = Buffer.byteLength(text, "utf8");
  const index = spare.findIndex((buffer) => buffer.byteLength >= length);
  const target = index >= 0 ? spare.splice(index, 1)[0] : new ArrayBuffer(Math.max(length + (length >> 2), 1 << 20));
  const written = Buffer.from(target).write(text, 0, "utf8");
  return new Uint8Array(target, 0, written);
}

parentPort.on("message", (message) => {
  if (message.recycle) {
    if (spare.length < MAX_SPARE) spare.push(message.recycle);
    return;
  }
  try {
    const { bytes, rows } = pageCsv(message.runs);
    parentPort.postMessage({ seq: message.seq, bytes, rows }, [bytes.buffer]);
  } catch (error) {
    parentPort.postMessage({ seq: message.seq, error: error instanceof Error ? error.message : String(error) });
  }
});
