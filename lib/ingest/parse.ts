import { Readable } from "node:stream";
import { parse as createCsvParser } from "csv-parse";
import type { RawSample } from "../analysis/types.ts";
import { feetToMetres, pascalToHectopascal } from "../analysis/units.ts";
import { fileIssue, IngestFailure, type IngestIssue } from "./errors.ts";
import { WallClockReader } from "./clock-zone.ts";
import { DELIMITER_CHARACTERS, describeColumn, type LayoutColumnKey, type LoggerLayoutSpec } from "./layout.ts";

export type ParseMode = "strict" | "lenient";

export interface ParseOptions {
  fileName: string;
  mode: ParseMode;
  /**
   * The instant a clock-time file's first row is dated nearest to, normally the launch time typed with the
   * upload (HH:MM:SS has no date of its own; see clock-zone.ts for the rules).
   */
  clockAnchorUtc?: Date | null;
  /** IANA zone the file's clock keeps, for clock times and date-times without an offset; default "UTC". */
  clockZone?: string;
  /** Issues reported before giving up in strict mode. */
  maxIssues?: number;
}

export interface ParsedLoggerFile {
  samples: RawSample[];
  /** Absolute time of the first data row, when the time column carries a date. */
  fileStartUtc: Date | null;
  header: string[] | null;
  dataRowCount: number;
  /** Rows skipped in lenient mode, each with the reason. */
  skippedRows: IngestIssue[];
  /** File-level notes on how the clock was read (readings in a skipped or repeated daylight-saving hour). */
  clockNotes: Array<{ code: string; message: string }>;
}

interface ResolvedColumn {
  key: LayoutColumnKey;
  index: number; // 0-based
  name: string;
}

const FIELD_ORDER: LayoutColumnKey[] = ["time", "altitude", "temperature", "pressure", "humidity", "latitude", "longitude"];
const TEXT_DECODER = new TextDecoder("utf-8", { fatal: true });

/** Decodes bytes as UTF-8 text, refusing binary files and invalid encodings with a clear message. */
export function decodeLoggerText(bytes: Uint8Array, fileName: string): string {
  if (bytes.byteLength === 0) throw new IngestFailure("empty-file", [fileIssue(fileName, "empty-file", "The file is empty")]);
  const head = bytes.subarray(0, Math.min(bytes.byteLength, 8192));
  if (head.includes(0)) {
    throw new IngestFailure("binary-file", [fileIssue(fileName, "binary-file", "This looks like a binary file, not a text logger file (it contains NUL bytes)")]);
  }
  let text: string;
  try {
    text = TEXT_DECODER.decode(bytes);
  } catch {
    throw new IngestFailure("not-utf8", [fileIssue(fileName, "not-utf8", "The file is not valid UTF-8 text; save it as UTF-8 (or plain ASCII) and upload it again")]);
  }
  return text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
}

/** Whitespace-separated files: collapse runs of blanks to one tab so the CSV parser can read them. */
function normaliseWhitespace(text: string, commentPrefix: string | null): string {
  return text
    .split(/\r?\n/)
    .map((line) => (commentPrefix && line.trimStart().startsWith(commentPrefix) ? line : line.trim().split(/[ \t]+/).join("\t")))
    .join("\n");
}

function resolveColumns(layout: LoggerLayoutSpec, header: string[] | null, fileName: string, headerLine: number): ResolvedColumn[] {
  const issues: IngestIssue[] = [];
  const resolved: ResolvedColumn[] = [];
  const normalisedHeader = header?.map((h) => h.trim().toLowerCase()) ?? null;
  for (const key of FIELD_ORDER) {
    const mapping = layout.columns[key];
    if (!mapping) continue;
    const ref = mapping.column;
    if (typeof ref === "number") {
      resolved.push({ key, index: ref - 1, name: header?.[ref - 1]?.trim() ?? `column ${ref}` });
      continue;
    }
    if (!normalisedHeader) {
      issues.push({ ...fileIssue(fileName, "missing-header", `The layout names column "${ref}" but says the file has no header row`), line: 1 });
      continue;
    }
    const index = normalisedHeader.indexOf(ref.trim().toLowerCase());
    if (index < 0) {
      const hint =
        normalisedHeader.length === 1
          ? ` The header row has only one field ("${header?.[0] ?? ""}"): is the delimiter (${layout.delimiter}) right?`
          : ` The header has: ${header?.map((h) => `"${h.trim()}"`).join(", ")}.`;
      issues.push({
        code: "missing-column",
        message: `Column ${describeColumn(ref)} for ${key} is not in the header row.${hint}`,
        file: fileName,
        line: headerLine,
        column: null,
        columnName: ref,
      });
      continue;
    }
    resolved.push({ key, index, name: header?.[index]?.trim() ?? ref });
  }
  if (issues.length) throw new IngestFailure("missing-column", issues);
  return resolved;
}

const CLOCK_TIME = /^(\d{1,2}):(\d{2})(?::(\d{2}(?:\.\d+)?))?$/;
const HAS_ZONE = /(Z|[+-]\d{2}:?\d{2})$/i;

function parseNumber(raw: string, decimalComma: boolean): number | null | "invalid" {
  const text = raw.trim();
  if (text === "" || /^(nan|na|n\/a|null|-)$/i.test(text)) return null;
  const normalised = decimalComma ? text.replace(",", ".") : text;
  if (!/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(normalised)) return "invalid";
  return Number(normalised);
}

/**
 * Reads a logger file with a layout into raw samples, streaming rows through csv-parse.
 * Altitude is converted to metres and pressure to hPa here (the edge); temperature stays raw
 * for the calibration. Errors name the file, line and column. Strict mode refuses any bad
 * row; lenient mode skips bad rows and lists them.
 */
export async function parseLoggerFile(bytes: Uint8Array, layout: LoggerLayoutSpec, options: ParseOptions): Promise<ParsedLoggerFile> {
  const { fileName, mode } = options;
  const maxIssues = options.maxIssues ?? 20;
  let text = decodeLoggerText(bytes, fileName);
  if (layout.delimiter === "whitespace") text = normaliseWhitespace(text, layout.commentPrefix);
  const delimiter = layout.delimiter === "whitespace" ? "\t" : DELIMITER_CHARACTERS[layout.delimiter];
  const decimalComma = layout.decimalSeparator === ",";

  const samples: RawSample[] = [];
  const issues: IngestIssue[] = [];
  const skippedRows: IngestIssue[] = [];
  let header: string[] | null = null;
  let columns: ResolvedColumn[] | null = layout.hasHeader ? null : resolveColumns(layout, null, fileName, 1);
  let firstAbsoluteMs: number | null = null;
  let previousElapsedS: number | null = null;
  let dataRowCount = 0;
  // Fields a row may have: the header's count, or the first data row's when there is no header.
  let expectedFieldCount: number | null = null;
  let stopped = false;
  const timeFormat = layout.columns.time.format;
  const clockZone = options.clockZone ?? "UTC";
  const clock = new WallClockReader(clockZone, options.clockAnchorUtc ? options.clockAnchorUtc.getTime() : null);
  if (timeFormat === "clock-time" && !clock.hasAnchor) {
    // One message for the file: every row would otherwise repeat it.
    throw new IngestFailure("launch-time-needed", [
      fileIssue(fileName, "launch-time-needed", "The file's time column holds clock times (HH:MM:SS) without a date, so give the launch time with the upload; it dates the file"),
    ]);
  }

  const reject = (issue: IngestIssue) => {
    if (mode === "lenient") skippedRows.push(issue);
    else issues.push(issue);
  };

  const handleRecord = (record: string[], line: number): void => {
    if (stopped) return;
    if (!columns) {
      header = record;
      expectedFieldCount = record.length;
      columns = resolveColumns(layout, header, fileName, line);
      return;
    }
    dataRowCount++;
    expectedFieldCount ??= record.length;
    const values: Partial<Record<LayoutColumnKey, number | null>> = {};
    let rowIssue: IngestIssue | null = longRowIssue(record, expectedFieldCount, layout, header !== null, fileName, line);
    for (const column of rowIssue ? [] : columns) {
      const field = record[column.index];
      if (field === undefined) {
        rowIssue = {
          code: "short-row",
          message: `The row has ${record.length} field${record.length === 1 ? "" : "s"} but ${column.key} is in column ${column.index + 1} (truncated or wrongly delimited line?)`,
          file: fileName, line, column: column.index + 1, columnName: column.name,
        };
        break;
      }
      if (column.key === "time" && timeFormat !== "elapsed-seconds") {
        const reading = parseTimeField(field, timeFormat);
        if (reading === null) {
          rowIssue = {
            code: "bad-time",
            message: `"${field}" is not a ${timeFormat === "clock-time" ? "clock time (HH:MM:SS)" : "ISO 8601 date-time"}`,
            file: fileName, line, column: column.index + 1, columnName: column.name,
          };
          break;
        }
        // Readings without a zone are the logger's clock, read in the layout's clock zone (clock-zone.ts).
        const absoluteMs =
          reading.kind === "instant" ? reading.utcMs
          : reading.kind === "time-of-day" ? clock.readTimeOfDay(reading.secondsOfDay)
          : clock.readLocalDateTime(reading.wallMs);
        firstAbsoluteMs ??= absoluteMs;
        values.time = (absoluteMs - firstAbsoluteMs) / 1000;
        continue;
      }
      const parsed = parseNumber(field, decimalComma);
      if (parsed === "invalid") {
        rowIssue = {
          code: "not-a-number",
          message: `"${field.trim().slice(0, 40)}" is not a number (expected ${column.key}${decimalComma ? ", decimal comma" : ""})`,
          file: fileName, line, column: column.index + 1, columnName: column.name,
        };
        break;
      }
      values[column.key] = parsed;
    }
    if (!rowIssue && (values.time === null || values.time === undefined)) {
      const timeColumn = columns.find((c) => c.key === "time");
      rowIssue = { code: "missing-time", message: "The time field is empty", file: fileName, line, column: (timeColumn?.index ?? 0) + 1, columnName: timeColumn?.name ?? null };
    }
    if (!rowIssue && mode === "strict" && previousElapsedS !== null && (values.time as number) < previousElapsedS) {
      const timeColumn = columns.find((c) => c.key === "time");
      rowIssue = {
        code: "time-backwards",
        message: `Time goes backwards here (${values.time} s after ${previousElapsedS} s); fix the file or upload in lenient mode to have rows sorted`,
        file: fileName, line, column: (timeColumn?.index ?? 0) + 1, columnName: timeColumn?.name ?? null,
      };
    }
    if (rowIssue) {
      reject(rowIssue);
      if (issues.length >= maxIssues) stopped = true;
      return;
    }
    const elapsedS = values.time as number;
    previousElapsedS = elapsedS;
    samples.push({
      elapsedS,
      altitudeM: toMetres(values.altitude ?? null, layout.columns.altitude?.unit),
      rawTemperature: values.temperature ?? null,
      pressureHpa: toHpa(values.pressure ?? null, layout.columns.pressure?.unit),
      relativeHumidityPct: values.humidity ?? null,
      latitudeDeg: values.latitude ?? null,
      longitudeDeg: values.longitude ?? null,
      sourceLine: line,
    });
  };

  // Rows are handled as the parser emits them (on_record) rather than through an async iterator,
  // which costs a promise per row.
  try {
    await new Promise<void>((resolve, fail) => {
      const parser = createCsvParser({
        delimiter,
        comment: layout.commentPrefix ?? undefined,
        comment_no_infix: true,
        relax_column_count: true,
        relax_quotes: true,
        skip_empty_lines: true,
        on_record: (record: string[], context: { lines: number }) => {
          handleRecord(record, context.lines);
          return null;
        },
      });
      parser.on("error", fail);
      parser.on("end", resolve);
      parser.resume();
      Readable.from(chunksOf(text)).pipe(parser);
    });
  } catch (error) {
    if (error instanceof IngestFailure) throw error;
    const message = error instanceof Error ? error.message : String(error);
    const lineMatch = /line (\d+)/i.exec(message);
    throw new IngestFailure("unreadable", [
      { ...fileIssue(fileName, "unreadable", `The file could not be read as ${layout.delimiter}-separated text: ${message}`), line: lineMatch ? Number(lineMatch[1]) : null },
    ]);
  }

  if (issues.length) throw new IngestFailure("bad-rows", issues);
  if (!columns) throw new IngestFailure("no-header", [fileIssue(fileName, "no-header", "The file has no header row and no data (only comments or blank lines?)")]);
  if (samples.length === 0) {
    const reason = skippedRows.length ? `all ${skippedRows.length} data rows were bad; first: ${skippedRows[0]?.message}` : "there are no data rows";
    throw new IngestFailure("no-data", [fileIssue(fileName, "no-data", `Nothing to analyse: ${reason}`), ...skippedRows.slice(0, maxIssues)]);
  }
  return {
    samples,
    fileStartUtc: firstAbsoluteMs === null ? null : new Date(firstAbsoluteMs),
    header,
    dataRowCount,
    skippedRows,
    clockNotes: clockNotesOf(clock),
  };
}

/**
 * A row with more fields than the header (or, without a header, than the first data row) is
 * refused: its values no longer sit under their column names. Typical of decimal commas read
 * with a comma delimiter ("12,5" becomes two fields). Empty fields at the end of a row (a
 * trailing delimiter) are not counted [P].
 */
function longRowIssue(record: string[], expectedFieldCount: number, layout: LoggerLayoutSpec, hasHeader: boolean, fileName: string, line: number): IngestIssue | null {
  if (record.length <= expectedFieldCount) return null;
  let fieldCount = record.length;
  while (fieldCount > expectedFieldCount && (record[fieldCount - 1] ?? "").trim() === "") fieldCount--;
  if (fieldCount <= expectedFieldCount) return null;
  const reference = hasHeader ? "the header row has" : "the first data row has";
  const hint =
    layout.delimiter === "comma" && layout.decimalSeparator === "."
      ? " Does the file use decimal commas (12,5)? Then it needs a layout with another delimiter and the decimal comma."
      : " Is the delimiter or the decimal separator of the layout right?";
  return {
    code: "long-row",
    message: `The row has ${fieldCount} fields but ${reference} ${expectedFieldCount}, so its values cannot be matched to the columns.${hint}`,
    file: fileName, line, column: expectedFieldCount + 1, columnName: null,
  };
}

function clockNotesOf(clock: WallClockReader): Array<{ code: string; message: string }> {
  const notes: Array<{ code: string; message: string }> = [];
  if (clock.gapReadingCount > 0) {
    notes.push({
      code: "clock-in-skipped-hour",
      message: `${clock.gapReadingCount} clock reading(s) fall in the hour ${clock.zone} skips when its clocks go forward; they were read with the offset in force before the change. If the logger's clock does not change for daylight saving, give its fixed zone (e.g. Etc/GMT+6 for UTC−6) as the layout's clock zone`,
    });
  }
  if (clock.repeatedHourReadingCount > 0) {
    notes.push({
      code: "clock-repeated-hour",
      message: `The clock stepped back into the hour ${clock.zone} repeats when its clocks go back; ${clock.repeatedHourReadingCount} reading(s) were read as the second pass through that hour`,
    });
  }
  return notes;
}

/** Feeds the parser in 64 KiB pieces, as a file stream would. */
function* chunksOf(text: string): Generator<string> {
  for (let i = 0; i < text.length; i += 65536) yield text.slice(i, i + 65536);
}

type TimeReading =
  | { kind: "instant"; utcMs: number }
  | { kind: "local-date-time"; wallMs: number }
  | { kind: "time-of-day"; secondsOfDay: number };

/** One time field: an instant (ISO with offset), a local date-time (ISO without one) or a time of day; null if invalid. */
function parseTimeField(field: string, format: "clock-time" | "iso-datetime"): TimeReading | null {
  const text = field.trim();
  if (format === "iso-datetime") {
    if (!/^\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}/.test(text)) return null;
    const zoned = HAS_ZONE.test(text);
    // Without an offset the fields are parsed as if UTC ("wall" ms) and then read in the clock's zone.
    const ms = Date.parse(zoned ? text.replace(" ", "T") : `${text.replace(" ", "T")}Z`);
    if (!Number.isFinite(ms)) return null;
    return zoned ? { kind: "instant", utcMs: ms } : { kind: "local-date-time", wallMs: ms };
  }
  const match = CLOCK_TIME.exec(text);
  if (!match) return null;
  const [hours, minutes, seconds] = [Number(match[1]), Number(match[2]), Number(match[3] ?? 0)];
  if (hours > 23 || minutes > 59 || seconds >= 61) return null;
  return { kind: "time-of-day", secondsOfDay: (hours * 60 + minutes) * 60 + seconds };
}

function toMetres(value: number | null, unit: "m" | "ft" | undefined): number | null {
  if (value === null) return null;
  return unit === "ft" ? feetToMetres(value) : value;
}

function toHpa(value: number | null, unit: "hPa" | "Pa" | "mbar" | undefined): number | null {
  if (value === null) return null;
  return unit === "Pa" ? pascalToHectopascal(value) : value; // 1 mbar = 1 hPa
}
