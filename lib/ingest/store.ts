import type { Db, DbTransaction } from "../db/index.ts";
import { Prisma } from "../db/index.ts";
import { insertProfileLevels } from "../db/bulk.ts";
import type { SiteSnapshot } from "../db/site-snapshot.ts";
import { getEnv } from "../env.ts";
import type { AnalysisParameters, TemperatureCalibration } from "../analysis/types.ts";
import { fileIssue, IngestFailure, type IngestIssue } from "./errors.ts";
import { loggerLayoutSpecSchema, type LoggerLayoutSpec } from "./layout.ts";
import { directCalibrationFor, prepareAnalysis, sha256Hex, type PreparedAnalysis } from "./pipeline.ts";
import { analysisParametersSchema, DEFAULT_PARAMETERS, temperatureCalibrationSchema, uploadMetadataSchema } from "./schemas.ts";

export interface Actor {
  userId: string | null;
  label: string;
}

export interface IngestRequest {
  file: { name: string; bytes: Uint8Array };
  metadata: unknown; // validated with uploadMetadataSchema
  actor?: Actor;
  synthetic?: boolean;
}

export interface IngestResult {
  flightId: string;
  runId: string;
  title: string;
  launchAtUtc: Date;
  tropopauseAltitudeM: number | null;
  troposphericLapseRateKPerKm: number | null;
  warnings: Array<{ code: string; message: string }>;
  skippedRowCount: number;
}

export interface IngestOptions {
  maxUploadBytes?: number;
  /** Test hook: called between writes inside the transaction (a throw rolls everything back). */
  afterWrite?: (stage: "raw-file" | "flight" | "run") => void | Promise<void>;
}

/** Program-wide analysis parameters, recorded with every run; defaults until an admin changes them. */
export async function getProgramParameters(db: Db | DbTransaction): Promise<AnalysisParameters> {
  const row = await db.programSettings.findUnique({ where: { id: 1 } });
  if (!row) return DEFAULT_PARAMETERS;
  const parsed = analysisParametersSchema.safeParse({ ...DEFAULT_PARAMETERS, ...(row.analysisParameters as object) });
  return parsed.success ? parsed.data : DEFAULT_PARAMETERS;
}

/**
 * Program parameters for one flight: when lag correction is switched on, the flight's own sensor
 * time constant is used (the program value is the fallback for sensors without one).
 */
export async function parametersForSensor(db: Db | DbTransaction, sensor: { timeConstantS: number } | null): Promise<AnalysisParameters> {
  const parameters = await getProgramParameters(db);
  if (!parameters.lagCorrection.enabled || !sensor || !(sensor.timeConstantS > 0)) return parameters;
  return { ...parameters, lagCorrection: { enabled: true, timeConstantS: sensor.timeConstantS } };
}

/** The sensor's calibration whose validity period contains `at` (latest start wins). */
export async function findCalibrationAt(db: Db | DbTransaction, sensorId: string, at: Date) {
  return db.calibration.findFirst({
    where: { sensorId, validFromUtc: { lte: at }, OR: [{ validToUtc: null }, { validToUtc: { gt: at } }] },
    orderBy: { validFromUtc: "desc" },
  });
}

function isUniqueViolation(error: unknown): boolean {
  return error instanceof Prisma.PrismaClientKnownRequestError && error.code === "P2002";
}

/**
 * Upload pipeline shared by web, API, CLI and the demo loader: validate metadata, refuse
 * duplicates, parse with the layout, calibrate with the sensor's calibration valid at launch,
 * analyse, and store raw bytes, flight, run, levels, layers, summary and an audit event in one
 * transaction. On any failure nothing is written and an IngestFailure names file, line, column.
 */
export async function ingestFlightFile(db: Db, request: IngestRequest, options: IngestOptions = {}): Promise<IngestResult> {
  const { name: fileName, bytes } = request.file;
  const maxBytes = options.maxUploadBytes ?? getEnv().LAPSEBANK_MAX_UPLOAD_MB * 1024 * 1024;
  if (bytes.byteLength > maxBytes) {
    throw new IngestFailure("too-large", [
      fileIssue(fileName, "too-large", `The file is ${(bytes.byteLength / 1048576).toFixed(1)} MB; the upload limit is ${(maxBytes / 1048576).toFixed(0)} MB (LAPSEBANK_MAX_UPLOAD_MB)`),
    ]);
  }
  const metadataResult = uploadMetadataSchema.safeParse(request.metadata);
  if (!metadataResult.success) {
    throw new IngestFailure(
      "invalid-metadata",
      metadataResult.error.issues.map((i) => ({ ...fileIssue(fileName, "invalid-metadata", i.message), columnName: i.path.join(".") || null })),
    );
  }
  const meta = metadataResult.data;
  const sha256 = sha256Hex(bytes);
  const existing = await db.rawFile.findUnique({ where: { schoolId_sha256: { schoolId: meta.schoolId, sha256 } }, include: { flight: { select: { id: true } } } });
  if (existing) throw duplicateFailure(fileName, existing.flight?.id ?? null);

  const [site, layoutRow, sensorRow, payloadRow] = await Promise.all([
    db.site.findUnique({ where: { id: meta.siteId } }),
    db.loggerLayout.findUnique({ where: { id: meta.layoutId } }),
    meta.sensorId ? db.sensor.findUnique({ where: { id: meta.sensorId }, select: { schoolId: true, timeConstantS: true } }) : null,
    meta.payloadId ? db.payload.findUnique({ where: { id: meta.payloadId }, select: { schoolId: true } }) : null,
  ]);
  const refIssues: IngestIssue[] = [];
  if (!site || site.schoolId !== meta.schoolId) refIssues.push(fileIssue(fileName, "unknown-site", `Site ${meta.siteId} does not exist for this school`));
  if (!layoutRow || layoutRow.schoolId !== meta.schoolId) refIssues.push(fileIssue(fileName, "unknown-layout", `Logger layout ${meta.layoutId} does not exist for this school`));
  if (meta.sensorId && sensorRow?.schoolId !== meta.schoolId) refIssues.push(fileIssue(fileName, "unknown-sensor", `Sensor ${meta.sensorId} does not exist for this school`));
  if (meta.payloadId && payloadRow?.schoolId !== meta.schoolId) refIssues.push(fileIssue(fileName, "unknown-payload", `Payload ${meta.payloadId} does not exist for this school`));
  if (refIssues.length || !site || !layoutRow) throw new IngestFailure("unknown-reference", refIssues);
  const layout = parseStoredLayout(layoutRow.spec, fileName);

  const calibrationChoice = await chooseCalibration(db, { ...meta, fileName, layout, schoolId: meta.schoolId });
  const parameters = await parametersForSensor(db, sensorRow);
  const prepared = await prepareAnalysis({
    fileName, bytes, layout, site, parameters, mode: meta.mode,
    calibration: calibrationChoice.spec,
    launchAtUtcHint: meta.launchAtUtc ?? null,
    typedLaunchAtUtc: meta.launchAtUtc ?? null,
  });
  // A calibration chosen by time is re-checked against the launch time found in the file.
  let calibrationId = calibrationChoice.id;
  let calibrationSpec = calibrationChoice.spec;
  let finalPrepared = prepared;
  if (calibrationChoice.byTime && meta.sensorId) {
    const atLaunch = await findCalibrationAt(db, meta.sensorId, prepared.launchAtUtc);
    if (atLaunch && atLaunch.id !== calibrationId) {
      calibrationId = atLaunch.id;
      calibrationSpec = parseStoredCalibration(atLaunch.spec, fileName);
      finalPrepared = await prepareAnalysis({ fileName, bytes, layout, site, parameters, mode: meta.mode, calibration: calibrationSpec, launchAtUtcHint: meta.launchAtUtc ?? null, typedLaunchAtUtc: meta.launchAtUtc ?? null });
    }
  }

  const title = meta.title?.trim() || `${site.name} ${finalPrepared.launchAtUtc.toISOString().slice(0, 16).replace("T", " ")} UTC`;
  const actor = request.actor ?? { userId: null, label: "system" };
  try {
    return await db.$transaction(
      async (tx) => {
        const rawFile = await tx.rawFile.create({
          data: { schoolId: meta.schoolId, name: fileName, sizeBytes: bytes.byteLength, sha256, bytes: Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength) as Uint8Array<ArrayBuffer> },
          select: { id: true },
        });
        await options.afterWrite?.("raw-file");
        const flight = await tx.flight.create({
          data: {
            schoolId: meta.schoolId, siteId: site.id, layoutId: layoutRow.id, rawFileId: rawFile.id,
            payloadId: meta.payloadId ?? null, sensorId: meta.sensorId ?? null,
            title, notes: meta.notes ?? "", launchAtUtc: finalPrepared.launchAtUtc, typedLaunchAtUtc: meta.launchAtUtc ?? null, visibility: meta.visibility,
            synthetic: request.synthetic ?? false, uploadMode: meta.mode, createdById: actor.userId,
          },
          select: { id: true },
        });
        await options.afterWrite?.("flight");
        const runId = await writeAnalysisRun(tx, {
          flightId: flight.id, schoolId: meta.schoolId, siteId: site.id, site,
          prepared: finalPrepared, parameters, calibrationId, calibrationSpec, layout, reason: "upload",
        });
        await options.afterWrite?.("run");
        await tx.auditEvent.create({
          data: {
            actorUserId: actor.userId, actorLabel: actor.label, schoolId: meta.schoolId, action: "flight.upload",
            entityType: "flight", entityId: flight.id, details: { fileName, sha256, sizeBytes: bytes.byteLength, runId },
          },
        });
        return {
          flightId: flight.id, runId, title, launchAtUtc: finalPrepared.launchAtUtc,
          tropopauseAltitudeM: finalPrepared.analysis.summary.tropopauseAltitudeM,
          troposphericLapseRateKPerKm: finalPrepared.analysis.summary.troposphericLapseRateKPerKm,
          warnings: runWarnings(finalPrepared),
          skippedRowCount: finalPrepared.skippedRows.length,
        };
      },
      { timeout: 120_000, maxWait: 60_000 },
    );
  } catch (error) {
    if (isUniqueViolation(error)) {
      const winner = await db.rawFile.findUnique({ where: { schoolId_sha256: { schoolId: meta.schoolId, sha256 } }, include: { flight: { select: { id: true } } } });
      throw duplicateFailure(fileName, winner?.flight?.id ?? null);
    }
    throw error;
  }
}

function duplicateFailure(fileName: string, flightId: string | null): IngestFailure {
  return new IngestFailure(
    "duplicate",
    [fileIssue(fileName, "duplicate", `These exact bytes were already uploaded for this school${flightId ? ` as flight ${flightId} (/flights/${flightId})` : ""}`)],
    flightId,
  );
}

function runWarnings(prepared: PreparedAnalysis) {
  const warnings = [...prepared.analysis.qc.warnings, ...prepared.timeWarnings];
  if (prepared.skippedRows.length) {
    warnings.push({ code: "skipped-rows", message: `${prepared.skippedRows.length} bad row(s) skipped in lenient mode; first at line ${prepared.skippedRows[0]?.line ?? "?"}: ${prepared.skippedRows[0]?.message ?? ""}` });
  }
  return warnings;
}

export function parseStoredLayout(spec: unknown, fileName: string): LoggerLayoutSpec {
  const parsed = loggerLayoutSpecSchema.safeParse(spec);
  if (!parsed.success) throw new IngestFailure("bad-layout", parsed.error.issues.map((i) => ({ ...fileIssue(fileName, "bad-layout", `Logger layout: ${i.message}`), columnName: i.path.join(".") })));
  return parsed.data;
}

export function parseStoredCalibration(spec: unknown, fileName: string): TemperatureCalibration {
  const parsed = temperatureCalibrationSchema.safeParse(spec);
  if (!parsed.success) throw new IngestFailure("bad-calibration", parsed.error.issues.map((i) => ({ ...fileIssue(fileName, "bad-calibration", `Calibration: ${i.message}`), columnName: i.path.join(".") })));
  return parsed.data;
}

async function chooseCalibration(
  db: Db,
  args: { fileName: string; layout: LoggerLayoutSpec; schoolId: string; sensorId?: string | undefined; calibrationId?: string | undefined; launchAtUtc?: Date | undefined },
): Promise<{ id: string | null; spec: TemperatureCalibration; byTime: boolean }> {
  const { fileName, layout } = args;
  if (args.calibrationId) {
    const row = await db.calibration.findUnique({ where: { id: args.calibrationId }, include: { sensor: { select: { schoolId: true } } } });
    if (!row || row.sensor.schoolId !== args.schoolId) throw new IngestFailure("unknown-calibration", [fileIssue(fileName, "unknown-calibration", `Calibration ${args.calibrationId} does not exist for this school`)]);
    if (args.sensorId && row.sensorId !== args.sensorId) throw new IngestFailure("unknown-calibration", [fileIssue(fileName, "unknown-calibration", `Calibration ${args.calibrationId} belongs to another sensor than ${args.sensorId}`)]);
    return { id: row.id, spec: parseStoredCalibration(row.spec, fileName), byTime: false };
  }
  if (args.sensorId) {
    // The sensor's school was checked with the other references before this is called.
    const sensor = { id: args.sensorId };
    // Before parsing we only know the time the user gave, or nothing: take the calibration valid
    // then (or the latest), and re-check it once the launch time is read from the file.
    const at = args.launchAtUtc ?? new Date(8.64e15);
    const row = (await findCalibrationAt(db, sensor.id, at)) ?? (await db.calibration.findFirst({ where: { sensorId: sensor.id }, orderBy: { validFromUtc: "desc" } }));
    if (row) return { id: row.id, spec: parseStoredCalibration(row.spec, fileName), byTime: true };
  }
  const direct = directCalibrationFor(layout);
  if (direct) return { id: null, spec: direct, byTime: false };
  throw new IngestFailure("calibration-needed", [
    { ...fileIssue(fileName, "calibration-needed", `The temperature column holds raw ${layout.columns.temperature.unit}; choose a sensor with a calibration (or a calibration) to turn it into temperatures`), columnName: String(layout.columns.temperature.column) },
  ]);
}

/**
 * Flags that describe a flight rather than a quality problem: they don't mark the flight as
 * QC-flagged (climatology can exclude QC-flagged flights). "altitude-from-pressure" is here
 * because it covers rows without an altitude reading and a few GPS glitch rows; an altitude column
 * that is often impossible raises "implausible-altitudes" instead, and a faulty temperature sensor
 * "temperature-stuck" or "temperature-alternating" — none of those is informational.
 */
export const INFORMATIONAL_FLAGS = new Set(["no-landing", "lag-corrected", "no-tropopause", "tropopause-undetermined", "altitude-from-pressure", "standard-atmosphere-pressure"]);

/** Finite number or null: nothing non-finite ever reaches the database. */
function finiteOrNull(value: number | null | undefined): number | null {
  return value !== null && value !== undefined && Number.isFinite(value) ? value : null;
}

/**
 * Writes one analysis run with its levels, layers and summary, and makes it the flight's
 * current run. Used by upload and by re-analysis. `site` is the site the analysis was made with.
 */
export async function writeAnalysisRun(
  tx: DbTransaction,
  args: {
    flightId: string; schoolId: string; siteId: string; site: SiteSnapshot;
    prepared: PreparedAnalysis; parameters: AnalysisParameters;
    calibrationId: string | null; calibrationSpec: TemperatureCalibration; layout: LoggerLayoutSpec; reason: string;
  },
): Promise<string> {
  const { analysis, launchTime } = args.prepared;
  // Lock the flight's row first, so concurrent writers of runs for one flight take turns: the second one's
  // "un-mark the current run" then sees the first one's new run. (A no-op UPDATE locks the row on
  // PostgreSQL and takes the write lock on SQLite; the partial unique index "one current run per flight"
  // refuses whatever slips past.)
  await tx.$executeRaw`UPDATE "Flight" SET "deletedAt" = "deletedAt" WHERE "id" = ${args.flightId}`;
  await tx.analysisRun.updateMany({ where: { flightId: args.flightId, isCurrent: true }, data: { isCurrent: false } });
  await tx.flightSummary.updateMany({ where: { flightId: args.flightId, isCurrent: true }, data: { isCurrent: false } });
  const warnings = runWarnings(args.prepared);
  const run = await tx.analysisRun.create({
    data: {
      flightId: args.flightId,
      analysisVersion: analysis.analysisVersion,
      parameters: analysis.parameters as unknown as Prisma.InputJsonValue,
      calibrationId: args.calibrationId,
      calibrationSpec: args.calibrationSpec as unknown as Prisma.InputJsonValue,
      layoutSpec: args.layout as unknown as Prisma.InputJsonValue,
      warnings: warnings as unknown as Prisma.InputJsonValue,
      qcFlags: analysis.qc.flags.join(","),
      removedCounts: analysis.qc.removed as unknown as Prisma.InputJsonValue,
      rowCount: args.prepared.rowCount,
      skippedRowCount: args.prepared.skippedRows.length,
      siteLatitudeDeg: args.site.latitudeDeg, siteLongitudeDeg: args.site.longitudeDeg, siteElevationM: args.site.elevationM, siteTimeZone: args.site.timeZone,
      reason: args.reason,
      isCurrent: true,
    },
    select: { id: true },
  });
  await insertProfileLevels(
    tx,
    run.id,
    analysis.levels.map((l) => ({
      phase: l.phase, altitudeM: l.altitudeM, baseM: l.baseM, topM: l.topM, sampleCount: l.sampleCount, temperatureK: l.temperatureK,
      temperatureSdK: finiteOrNull(l.temperatureSdK), pressureHpa: finiteOrNull(l.pressureHpa), relativeHumidityPct: finiteOrNull(l.relativeHumidityPct),
    })),
  );
  await tx.layerStat.createMany({
    data: analysis.layers.map((l) => ({
      runId: run.id, kind: l.kind, phase: l.phase, baseM: l.baseM, topM: l.topM,
      lapseRateKPerKm: l.lapseRateKPerKm, lapseRateStdErrKPerKm: finiteOrNull(l.lapseRateStdErrKPerKm), rSquared: finiteOrNull(l.rSquared),
      theilSenLapseRateKPerKm: finiteOrNull(l.theilSenLapseRateKPerKm), levelCount: l.levelCount, strengthK: finiteOrNull(l.strengthK),
      meanTemperatureK: l.meanTemperatureK, meanPressureHpa: l.meanPressureHpa, pressureFromStandardAtmosphere: l.pressureFromStandardAtmosphere,
      dryAdiabaticLapseRateKPerKm: l.dryAdiabaticLapseRateKPerKm, moistAdiabaticLapseRateKPerKm: l.moistAdiabaticLapseRateKPerKm, stability: l.stability,
      fittedBaseM: finiteOrNull(l.fittedBaseM), fittedTopM: finiteOrNull(l.fittedTopM),
      bandReference: l.band?.reference ?? null, bandBaseM: finiteOrNull(l.band?.baseM), bandTopM: finiteOrNull(l.band?.topM),
      groundElevationM: finiteOrNull(l.band?.groundElevationM),
    })),
  });
  const s = analysis.summary;
  const qcFlagged = analysis.qc.flags.some((f) => !INFORMATIONAL_FLAGS.has(f)) || args.prepared.skippedRows.length > 0;
  await tx.flightSummary.create({
    data: {
      runId: run.id, flightId: args.flightId, isCurrent: true, schoolId: args.schoolId, siteId: args.siteId,
      launchAtUtc: args.prepared.launchAtUtc, year: launchTime.year, month: launchTime.month, dayOfYear: launchTime.dayOfYear,
      season: launchTime.season, seasonName: launchTime.seasonName, localHour: launchTime.localHour,
      hoursAfterSunrise: finiteOrNull(launchTime.hoursAfterSunrise), solarElevationDeg: launchTime.solarElevationDeg,
      latitudeDeg: args.site.latitudeDeg,
      launchAltitudeM: finiteOrNull(s.launchAltitudeM), burstAltitudeM: finiteOrNull(s.burstAltitudeM), maxAltitudeM: finiteOrNull(s.maxAltitudeM),
      minAltitudeM: finiteOrNull(s.minAltitudeM),
      surfaceTemperatureK: finiteOrNull(s.surfaceTemperatureK),
      troposphericLapseRateKPerKm: finiteOrNull(s.troposphericLapseRateKPerKm),
      troposphericLapseRateStdErrKPerKm: finiteOrNull(s.troposphericLapseRateStdErrKPerKm),
      tropopauseAltitudeM: finiteOrNull(s.tropopauseAltitudeM), tropopauseTemperatureK: finiteOrNull(s.tropopauseTemperatureK),
      tropopausePressureHpa: finiteOrNull(s.tropopausePressureHpa), tropopauseStatus: analysis.tropopause.first.status,
      secondTropopauseAltitudeM: finiteOrNull(s.secondTropopauseAltitudeM),
      hasSurfaceInversion: s.hasSurfaceInversion, surfaceInversionDepthM: finiteOrNull(s.surfaceInversionDepthM),
      surfaceInversionStrengthK: finiteOrNull(s.surfaceInversionStrengthK), stratosphericLapseRateKPerKm: finiteOrNull(s.stratosphericLapseRateKPerKm),
      surfaceDewPointK: finiteOrNull(s.surfaceDewPointK), lclAltitudeM: finiteOrNull(s.lclAltitudeM),
      precipitableWaterMm: finiteOrNull(s.precipitableWaterMm), saturatedLayerCount: s.saturatedLayerCount,
      lowestSaturatedLayerBaseM: finiteOrNull(s.lowestSaturatedLayerBaseM), freezingLevelAltitudeM: finiteOrNull(s.freezingLevelAltitudeM),
      freezingLevelCount: s.freezingLevelCount, mixedLayerHeightM: finiteOrNull(s.mixedLayerHeightM),
      mixedLayerHeightGradientM: finiteOrNull(s.mixedLayerHeightGradientM),
      hasDescent: s.hasDescent, groundElevationM: finiteOrNull(s.groundElevationM), qcFlags: analysis.qc.flags.join(","), qcFlagged,
    },
  });
  return run.id;
}
