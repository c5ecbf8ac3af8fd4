import type { LoggerLayoutSpec } from "./layout.ts";

export interface LayoutSuggestion {
  spec: LoggerLayoutSpec;
  /** What was guessed and why, for the user to confirm. */
  notes: string[];
  /** The first data rows split with the suggested delimiter, for a preview table. */
  previewHeader: string[] | null;
  previewRows: string[][];
}

type Delimiter = LoggerLayoutSpec["delimiter"];
const CANDIDATES: Array<[Delimiter, RegExp]> = [
  ["semicolon", /;/g],
  ["tab", /\t/g],
  ["comma", /,/g],
  ["whitespace", /[ \t]+/g],
];
const COMMENT_PREFIXES = ["#", "//", "%", "!"];
const NUMBER = /^[+-]?(\d+[.,]?\d*|[.,]\d+)([eE][+-]?\d+)?$/;

function splitLine(line: string, delimiter: Delimiter): string[] {
  if (delimiter === "whitespace") return line.trim().split(/[ \t]+/);
  const char = { comma: ",", semicolon: ";", tab: "\t" }[delimiter];
  return line.split(char).map((f) => f.trim().replace(/^"(.*)"$/, "$1"));
}

/**
 * Guesses a logger layout from the start of a file: delimiter, comment lines, header row,
 * decimal comma, and which column is time, altitude, temperature, pressure, humidity and
 * position (by header words, then by the values). The user confirms or edits the result.
 */
export function suggestLayout(sampleText: string, name = "New layout"): LayoutSuggestion {
  const notes: string[] = [];
  const allLines = sampleText.replace(/^\uFEFF/, "").split(/\r?\n/).slice(0, 60);
  const commentPrefix = COMMENT_PREFIXES.find((p) => allLines.some((l) => l.trimStart().startsWith(p))) ?? null;
  if (commentPrefix) notes.push(`Lines starting with "${commentPrefix}" are treated as comments.`);
  const lines = allLines.filter((l) => l.trim() !== "" && !(commentPrefix && l.trimStart().startsWith(commentPrefix)));

  let delimiter: Delimiter = "comma";
  for (const [candidate, pattern] of CANDIDATES) {
    const counts = lines.slice(0, 10).map((l) => (l.trim().match(pattern) ?? []).length);
    if (counts.length && counts.every((c) => c > 0 && c === counts[0])) {
      delimiter = candidate;
      break;
    }
  }
  notes.push(`Fields look ${delimiter}-separated.`);

  const rows = lines.map((l) => splitLine(l, delimiter));
  const first = rows[0] ?? [];
  const hasHeader = first.some((f) => f !== "" && !NUMBER.test(f) && !/^\d{1,2}:\d{2}/.test(f) && !/^\d{4}-\d{2}-\d{2}/.test(f));
  notes.push(hasHeader ? "The first row is a header." : "There is no header row; columns are numbered from 1.");
  const header = hasHeader ? first : null;
  const data = hasHeader ? rows.slice(1) : rows;
  const sampleRow = data[0] ?? [];
  const decimalSeparator: "." | "," = delimiter !== "comma" && data.slice(0, 5).some((r) => r.some((f) => /^[+-]?\d+,\d+$/.test(f))) ? "," : ".";
  if (decimalSeparator === ",") notes.push("Numbers use a decimal comma.");

  const columnCount = Math.max(header?.length ?? 0, sampleRow.length);
  const names = Array.from({ length: columnCount }, (_, i) => (header?.[i] ?? "").toLowerCase());
  const ref = (i: number): string | number => (header ? (header[i] ?? "").trim() : i + 1);
  const used = new Set<number>();
  const pick = (pattern: RegExp, test?: (i: number) => boolean): number | null => {
    for (let i = 0; i < columnCount; i++) {
      if (!used.has(i) && pattern.test(names[i] ?? "") && (!test || test(i))) {
        used.add(i);
        return i;
      }
    }
    return null;
  };
  const valuesOf = (i: number) => data.slice(0, 20).map((r) => r[i] ?? "");

  // Time: by name, else the first column.
  let timeIndex = pick(/time|sec|elapsed|utc|clock|date|^t$/);
  if (timeIndex === null && columnCount > 0) { timeIndex = 0; used.add(0); }
  const timeValues = valuesOf(timeIndex ?? 0);
  const timeFormat: LoggerLayoutSpec["columns"]["time"]["format"] = timeValues.some((v) => /^\d{4}-\d{2}-\d{2}[T ]\d{2}:/.test(v))
    ? "iso-datetime"
    : timeValues.some((v) => /^\d{1,2}:\d{2}(:\d{2})?/.test(v))
      ? "clock-time"
      : "elapsed-seconds";
  const clockZone = guessClockZone(timeFormat, names[timeIndex ?? 0] ?? "", timeValues, allLines.filter((l) => commentPrefix && l.trimStart().startsWith(commentPrefix)), notes);

  const altitudeIndex = pick(/alt|height|elev|^z$|^h$/);
  const altitudeUnit = altitudeIndex !== null && /ft|feet/.test(names[altitudeIndex] ?? "") ? "ft" : "m";
  const pressureIndex = pick(/press|baro|hpa|mbar|^p$|_pa$/);
  const pressureUnit = pressureIndex === null ? "hPa" : /mbar/.test(names[pressureIndex] ?? "") ? "mbar" : /(^|_)pa$|pascal/.test(names[pressureIndex] ?? "") ? "Pa" : "hPa";
  const humidityIndex = pick(/hum|^rh|_rh/);
  const latitudeIndex = pick(/^lat/);
  const longitudeIndex = pick(/^lon|^lng/);
  let temperatureIndex = pick(/temp|therm|adc|count|raw|^t_|deg/);
  if (temperatureIndex === null) {
    for (let i = 0; i < columnCount; i++) if (!used.has(i)) { temperatureIndex = i; used.add(i); break; }
  }
  const tName = names[temperatureIndex ?? 0] ?? "";
  const tValues = valuesOf(temperatureIndex ?? 0).map((v) => Number(v.replace(",", "."))).filter(Number.isFinite);
  const allIntegers = tValues.length > 0 && tValues.every((v) => Number.isInteger(v));
  const temperatureUnit: LoggerLayoutSpec["columns"]["temperature"]["unit"] =
    /count|adc|raw/.test(tName) ? "counts"
    : /mv/.test(tName) ? "mV"
    : /volt|(^|_)v$/.test(tName) ? "V"
    : /degf|fahr|(^|_)f$/.test(tName) ? "degF"
    : /kelvin|(^|_)k$/.test(tName) ? "K"
    : allIntegers && tValues.some((v) => v > 120) ? "counts"
    : "degC";
  notes.push(`Temperature column ${header ? `"${ref(temperatureIndex ?? 0)}"` : temperatureIndex! + 1} read as ${temperatureUnit}; check the unit.`);
  if (altitudeIndex === null && pressureIndex === null) notes.push("No altitude or pressure column recognised: map one by hand.");

  const spec: LoggerLayoutSpec = {
    name,
    delimiter,
    hasHeader,
    commentPrefix,
    decimalSeparator,
    columns: {
      time: { column: ref(timeIndex ?? 0), format: timeFormat, ...(clockZone ? { clockZone } : {}) },
      temperature: { column: ref(temperatureIndex ?? 0), unit: temperatureUnit },
      ...(altitudeIndex !== null ? { altitude: { column: ref(altitudeIndex), unit: altitudeUnit } } : {}),
      ...(pressureIndex !== null ? { pressure: { column: ref(pressureIndex), unit: pressureUnit } } : {}),
      ...(humidityIndex !== null ? { humidity: { column: ref(humidityIndex) } } : {}),
      ...(latitudeIndex !== null ? { latitude: { column: ref(latitudeIndex) } } : {}),
      ...(longitudeIndex !== null ? { longitude: { column: ref(longitudeIndex) } } : {}),
    },
  };
  return { spec, notes, previewHeader: header, previewRows: data.slice(0, 8) };
}

const LOCAL_WORDS = /(^|[^a-z])(local|lt|lokal|site)([^a-z]|$)/;
const UTC_WORDS = /(^|[^a-z])(utc|gmt|zulu|z)([^a-z]|$)/;
const ISO_OFFSET = /(Z|[+-]\d{2}:?\d{2})$/i;

/**
 * The zone a clock column keeps, guessed from its header (and comment lines): "local" words mean the site's
 * zone, "utc" words UTC; otherwise UTC with a note asking the user to check. Null for elapsed seconds and for
 * date-times that carry their own offset.
 */
function guessClockZone(format: LoggerLayoutSpec["columns"]["time"]["format"], timeName: string, timeValues: string[], commentLines: string[], notes: string[]): string | null {
  if (format === "elapsed-seconds") return null;
  if (format === "iso-datetime" && timeValues.filter((v) => v !== "").every((v) => ISO_OFFSET.test(v.trim()))) return null;
  const comments = commentLines.map((l) => l.toLowerCase());
  const local = LOCAL_WORDS.test(timeName) || comments.some((c) => /\blocal time\b/.test(c));
  const utc = UTC_WORDS.test(timeName) || comments.some((c) => /\b(utc|gmt)\b/.test(c));
  if (local && !utc) {
    notes.push("Clock times read in the launch site's time zone (the time column says local time); check it.");
    return "site";
  }
  notes.push(utc ? "Clock times read as UTC (the time column says UTC)." : "Clock times read as UTC; if the logger's clock keeps local time, choose the launch site's time zone or name the zone.");
  return "utc";
}
