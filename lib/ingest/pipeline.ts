import { createHash } from "node:crypto";
import { analyseFlight } from "../analysis/index.ts";
import { describeLaunchTime } from "../analysis/launch-time.ts";
import type { AnalysisParameters, FlightAnalysis, TemperatureCalibration } from "../analysis/types.ts";
import { fileIssue, IngestFailure, type IngestIssue } from "./errors.ts";
import { temperatureInputOf, type LoggerLayoutSpec } from "./layout.ts";
import { parseLoggerFile, type ParseMode } from "./parse.ts";
import { resolveClockZone } from "./clock-zone.ts";
import { launchTimeProblem } from "./time-bounds.ts";

/** How far the launch the file's clock shows may lie from the typed launch time before the flight says so. */
export const LAUNCH_DISAGREEMENT_LIMIT_MS = 30 * 60 * 1000;

export interface SiteForAnalysis {
  latitudeDeg: number;
  longitudeDeg: number;
  elevationM: number;
  timeZone: string;
}

export interface PreparedAnalysis {
  analysis: FlightAnalysis;
  launchAtUtc: Date;
  launchTime: ReturnType<typeof describeLaunchTime>;
  rowCount: number;
  skippedRows: IngestIssue[];
  /** Notes on the file's time: clock readings in a daylight-saving hour, a typed launch time the clock disagrees with. */
  timeWarnings: Array<{ code: string; message: string }>;
}

export function sha256Hex(bytes: Uint8Array): string {
  return createHash("sha256").update(bytes).digest("hex");
}

/** The calibration a layout implies when the column already holds a temperature. */
export function directCalibrationFor(layout: LoggerLayoutSpec): TemperatureCalibration | null {
  const input = temperatureInputOf(layout.columns.temperature.unit);
  return input === "celsius" || input === "kelvin" || input === "fahrenheit" ? { input, sensor: { kind: "direct" } } : null;
}

/**
 * Parse → calibrate → analyse one file, without touching the database. Used by upload and by
 * re-analysis alike, so a reprocessed flight goes through exactly the same steps.
 * Throws IngestFailure (file, line, column) for anything that makes the result untrustworthy.
 */
export async function prepareAnalysis(args: {
  fileName: string;
  bytes: Uint8Array;
  layout: LoggerLayoutSpec;
  calibration: TemperatureCalibration;
  site: SiteForAnalysis;
  parameters: AnalysisParameters;
  mode: ParseMode;
  /** The launch time the file is dated by when its time column has no date (the typed one, else the stored one). */
  launchAtUtcHint: Date | null;
  /** The launch time the user typed, checked against the file's own clock; null when none was typed. */
  typedLaunchAtUtc?: Date | null;
}): Promise<PreparedAnalysis> {
  const { fileName, layout, calibration } = args;
  const expectedInput = temperatureInputOf(layout.columns.temperature.unit);
  if (calibration.input !== expectedInput) {
    throw new IngestFailure("unit-mismatch", [
      {
        ...fileIssue(fileName, "unit-mismatch", `The layout reads the temperature column as ${layout.columns.temperature.unit}, but the calibration expects ${calibration.input}. Choose a matching calibration or fix the layout.`),
        columnName: String(layout.columns.temperature.column),
      },
    ]);
  }
  const clockZone = layout.columns.time.format === "elapsed-seconds" ? { zone: "UTC" } : resolveClockZone(layout.columns.time.clockZone, args.site.timeZone);
  if ("problem" in clockZone) throw new IngestFailure("unknown-clock-zone", [{ ...fileIssue(fileName, "unknown-clock-zone", clockZone.problem), columnName: String(layout.columns.time.column) }]);
  const parsed = await parseLoggerFile(args.bytes, layout, { fileName, mode: args.mode, clockAnchorUtc: args.launchAtUtcHint, clockZone: clockZone.zone });
  if (!parsed.fileStartUtc && !args.launchAtUtcHint) {
    throw new IngestFailure("launch-time-needed", [
      fileIssue(fileName, "launch-time-needed", "The file's time column has no date, so give the launch time with the upload (ISO 8601 with its offset, e.g. 2025-07-14T06:30:00Z)"),
    ]);
  }
  const analysis = analyseFlight({
    samples: parsed.samples,
    calibration,
    site: { latitudeDeg: args.site.latitudeDeg, longitudeDeg: args.site.longitudeDeg, elevationM: args.site.elevationM },
    parameters: args.parameters,
  });
  const usable = parsed.samples.length;
  const outOfRange = analysis.qc.removed.outOfRange;
  if (usable > 20 && outOfRange > usable / 2) {
    throw new IngestFailure("implausible-values", [
      {
        ...fileIssue(fileName, "implausible-values", `${outOfRange} of ${usable} rows give temperatures or altitudes outside any plausible range. Check the units in the layout (°C vs K, m vs ft, counts vs volts) and the calibration.`),
        columnName: String(layout.columns.temperature.column),
      },
    ]);
  }
  if (!analysis.ok) {
    const reasons = analysis.qc.warnings.map((w) => w.message).join(" ");
    throw new IngestFailure("analysis-failed", [fileIssue(fileName, "analysis-failed", `No usable ascent could be analysed. ${reasons}`)]);
  }
  // Launch time: read from the file when it carries dates (first row + detected launch offset),
  // else the time the user gave.
  const launchAtUtc = parsed.fileStartUtc
    ? new Date(parsed.fileStartUtc.getTime() + (analysis.summary.launchElapsedS ?? 0) * 1000)
    : (args.launchAtUtcHint as Date);
  // The last gate before anything is stored: a launch time neither engine can read back (or no logger could
  // have written) never reaches the database, whoever called.
  const launchProblem = launchTimeProblem(launchAtUtc);
  if (launchProblem) throw new IngestFailure("implausible-launch-time", [fileIssue(fileName, "implausible-launch-time", launchProblem)]);
  const launchTime = describeLaunchTime(launchAtUtc, args.site);
  const timeWarnings = [...parsed.clockNotes];
  const typed = args.typedLaunchAtUtc ?? null;
  if (parsed.fileStartUtc && typed && Math.abs(launchAtUtc.getTime() - typed.getTime()) > LAUNCH_DISAGREEMENT_LIMIT_MS) {
    timeWarnings.push({ code: "launch-time-disagrees", message: launchDisagreement(typed, launchAtUtc, clockZone.zone, args.site.timeZone) });
  }
  return { analysis, launchAtUtc, launchTime, rowCount: parsed.dataRowCount, skippedRows: parsed.skippedRows, timeWarnings };
}

function launchDisagreement(typed: Date, fromFile: Date, clockZone: string, siteTimeZone: string): string {
  const minutes = Math.round(Math.abs(fromFile.getTime() - typed.getTime()) / 60_000);
  const apart = minutes >= 120 ? `${Math.floor(minutes / 60)} h ${minutes % 60} min` : `${minutes} min`;
  const utc = (d: Date) => `${d.toISOString().slice(0, 16).replace("T", " ")} UTC`;
  const local = (d: Date) => {
    try {
      return new Intl.DateTimeFormat("en-CA", { timeZone: siteTimeZone, year: "numeric", month: "2-digit", day: "2-digit", hour: "2-digit", minute: "2-digit", hourCycle: "h23", timeZoneName: "short" }).format(d).replace(",", "");
    } catch {
      return utc(d);
    }
  };
  return (
    `The launch time typed with the upload (${utc(typed)}, ${local(typed)} at the site) is ${apart} ${fromFile < typed ? "after" : "before"} the launch the file's clock shows ` +
    `(${utc(fromFile)}, ${local(fromFile)}); the file's clock, read in ${clockZone}, is used. Check the logger's clock, the layout's clock zone and the typed time.`
  );
}
