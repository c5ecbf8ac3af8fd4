import { createHash } from "node:crypto";
import { analyseFlight } from "../analysis/index.ts";
import { describeLaunchTime } from "../analysis/launch-time.ts";
import type { AnalysisParameters, FlightAnalysis, TemperatureCalibration } from "../analysis/types.ts";
import { fileIssue, IngestFailure, type IngestIssue } from "./errors.ts";
import { temperatureInputOf, type LoggerLayoutSpec } from "./layout.ts";
import { parseLoggerFile, type ParseMode } from "./parse.ts";
import { launchTimeProblem } from "./time-bounds.ts";

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
  launchAtUtcHint: Date | null;
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
  const parsed = await parseLoggerFile(args.bytes, layout, { fileName, mode: args.mode, clockDateUtc: args.launchAtUtcHint });
  if (!parsed.fileStartUtc && !args.launchAtUtcHint) {
    throw new IngestFailure("launch-time-needed", [
      fileIssue(fileName, "launch-time-needed", "The file's time column has no date, so give the launch time (UTC) with the upload"),
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
  return { analysis, launchAtUtc, launchTime, rowCount: parsed.dataRowCount, skippedRows: parsed.skippedRows };
}
