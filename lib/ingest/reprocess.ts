import { isDeepStrictEqual } from "node:util";
import { ANALYSIS_VERSION, type TemperatureCalibration } from "../analysis/types.ts";
import type { Db } from "../db/index.ts";
import { IngestFailure } from "./errors.ts";
import { directCalibrationFor, prepareAnalysis } from "./pipeline.ts";
import { findCalibrationAt, parametersForSensor, parseStoredCalibration, parseStoredLayout, writeAnalysisRun, type Actor } from "./store.ts";
import { runUsedSite } from "../db/site-snapshot.ts";

export type ReprocessSelection = { all: true } | { flightIds: string[] } | { calibrationId: string } | { layoutId: string } | { siteId: string };

export interface ReprocessOutcome {
  flightId: string;
  status: "reprocessed" | "up-to-date" | "failed";
  runId?: string;
  previousRunId?: string;
  message?: string;
  change?: RunChange;
}

/** What moved between two runs, in the units users read. */
export interface RunChange {
  tropopauseAltitudeDeltaM: number | null;
  troposphericLapseRateDeltaKPerKm: number | null;
  surfaceTemperatureDeltaK: number | null;
  analysisVersionChanged: boolean;
  calibrationChanged: boolean;
  parametersChanged: boolean;
  /** The site's latitude, longitude, elevation or time zone differ from those the previous run used. */
  siteChanged: boolean;
}

/**
 * The site's flights (not deleted) whose current run was analysed with other site values than the
 * site has now, oldest first: what a correction of the site changes, and what re-analysis would redo.
 */
export async function flightsAnalysedWithOtherSite(db: Db, siteId: string): Promise<string[]> {
  const site = await db.site.findUnique({ where: { id: siteId } });
  if (!site) return [];
  const flights = await db.flight.findMany({
    where: { siteId, deletedAt: null },
    orderBy: [{ launchAtUtc: "asc" }, { id: "asc" }],
    select: { id: true, runs: { where: { isCurrent: true }, select: { siteLatitudeDeg: true, siteLongitudeDeg: true, siteElevationM: true, siteTimeZone: true } } },
  });
  return flights.filter((f) => !f.runs[0] || !runUsedSite(f.runs[0], site)).map((f) => f.id);
}

/** Flight ids a selection covers (not deleted), oldest first so a resumed run continues in order. */
export async function selectFlights(db: Db, selection: ReprocessSelection): Promise<string[]> {
  const base = { deletedAt: null };
  let where;
  if ("all" in selection) where = base;
  else if ("flightIds" in selection) where = { ...base, id: { in: selection.flightIds } };
  else if ("layoutId" in selection) where = { ...base, layoutId: selection.layoutId };
  else if ("siteId" in selection) where = { ...base, siteId: selection.siteId };
  else {
    const calibration = await db.calibration.findUnique({ where: { id: selection.calibrationId } });
    if (!calibration) return [];
    // Flights whose current run used it, and flights of its sensor launched in its validity period.
    where = {
      ...base,
      OR: [
        { runs: { some: { isCurrent: true, calibrationId: calibration.id } } },
        { sensorId: calibration.sensorId, launchAtUtc: { gte: calibration.validFromUtc, ...(calibration.validToUtc ? { lt: calibration.validToUtc } : {}) } },
      ],
    };
  }
  const rows = await db.flight.findMany({ where, orderBy: [{ launchAtUtc: "asc" }, { id: "asc" }], select: { id: true } });
  return rows.map((r) => r.id);
}

/** The calibration a flight should be analysed with now: sensor's valid at launch, else the one used before, else direct. */
async function currentCalibrationFor(db: Db, flight: { sensorId: string | null; launchAtUtc: Date }, previous: { calibrationId: string | null; calibrationSpec: unknown } | null, layout: ReturnType<typeof parseStoredLayout>, fileName: string): Promise<{ id: string | null; spec: TemperatureCalibration }> {
  if (flight.sensorId) {
    const row = await findCalibrationAt(db, flight.sensorId, flight.launchAtUtc);
    if (row) return { id: row.id, spec: parseStoredCalibration(row.spec, fileName) };
  }
  if (previous?.calibrationId) {
    const row = await db.calibration.findUnique({ where: { id: previous.calibrationId } });
    if (row) return { id: row.id, spec: parseStoredCalibration(row.spec, fileName) };
  }
  const direct = directCalibrationFor(layout);
  if (direct) return { id: null, spec: direct };
  if (previous) return { id: null, spec: parseStoredCalibration(previous.calibrationSpec, fileName) };
  throw new IngestFailure("calibration-needed", [{ code: "calibration-needed", message: "No calibration is valid at this flight's launch time", file: fileName, line: null, column: null, columnName: null }]);
}

/**
 * Re-runs the pipeline for one flight from its stored raw bytes with today's calibration, layout,
 * program parameters and site, as a new current run; the old run is kept. Skips a flight whose current run
 * already used exactly those inputs (so an interrupted batch resumes where it stopped) unless `force`.
 * One transaction per flight: a failure leaves that flight on its previous run.
 */
export async function reprocessFlight(db: Db, flightId: string, options: { reason: string; force?: boolean; actor?: Actor }): Promise<ReprocessOutcome> {
  try {
    const flight = await db.flight.findUniqueOrThrow({
      where: { id: flightId },
      include: { rawFile: true, layout: true, site: true, sensor: { select: { timeConstantS: true } }, runs: { where: { isCurrent: true }, include: { summary: true } } },
    });
    const previous = flight.runs[0] ?? null;
    const fileName = flight.rawFile.name;
    const layout = parseStoredLayout(flight.layout.spec, fileName);
    const calibration = await currentCalibrationFor(db, flight, previous, layout, fileName);
    const parameters = await parametersForSensor(db, flight.sensor);
    const sameInputs =
      previous !== null &&
      previous.analysisVersion === ANALYSIS_VERSION &&
      isDeepStrictEqual(previous.parameters, parameters) &&
      isDeepStrictEqual(previous.calibrationSpec, calibration.spec) &&
      isDeepStrictEqual(previous.layoutSpec, layout) &&
      runUsedSite(previous, flight.site);
    if (sameInputs && !options.force) return { flightId, status: "up-to-date", runId: previous.id };

    // The file is read the way it was when stored: a lenient upload (rows sorted or skipped) would fail
    // for ever in strict mode.
    const mode = flight.uploadMode === "lenient" ? "lenient" : "strict";
    const prepared = await prepareAnalysis({
      fileName, bytes: new Uint8Array(flight.rawFile.bytes), layout, calibration: calibration.spec, site: flight.site,
      // A clock-time file is dated by the launch time typed with it (flights stored before it was kept: the stored launch).
      parameters, mode, launchAtUtcHint: flight.typedLaunchAtUtc ?? flight.launchAtUtc, typedLaunchAtUtc: flight.typedLaunchAtUtc,
    });
    const actor = options.actor ?? { userId: null, label: "reprocess" };
    const runId = await db.$transaction(
      async (tx) => {
        const id = await writeAnalysisRun(tx, {
          flightId, schoolId: flight.schoolId, siteId: flight.siteId, site: flight.site,
          prepared, parameters, calibrationId: calibration.id, calibrationSpec: calibration.spec, layout, reason: options.reason,
        });
        await tx.flight.update({ where: { id: flightId }, data: { launchAtUtc: prepared.launchAtUtc } });
        await tx.auditEvent.create({
          data: { actorUserId: actor.userId, actorLabel: actor.label, schoolId: flight.schoolId, action: "flight.reprocess", entityType: "flight", entityId: flightId, details: { runId: id, previousRunId: previous?.id ?? null, reason: options.reason } },
        });
        return id;
      },
      { timeout: 120_000, maxWait: 60_000 },
    );
    const delta = (a: number | null | undefined, b: number | null | undefined) => (a === null || a === undefined || b === null || b === undefined ? null : a - b);
    const s = prepared.analysis.summary;
    return {
      flightId, status: "reprocessed", runId, previousRunId: previous?.id,
      change: {
        tropopauseAltitudeDeltaM: delta(s.tropopauseAltitudeM, previous?.summary?.tropopauseAltitudeM),
        troposphericLapseRateDeltaKPerKm: delta(s.troposphericLapseRateKPerKm, previous?.summary?.troposphericLapseRateKPerKm),
        surfaceTemperatureDeltaK: delta(s.surfaceTemperatureK, previous?.summary?.surfaceTemperatureK),
        analysisVersionChanged: previous?.analysisVersion !== ANALYSIS_VERSION,
        calibrationChanged: !isDeepStrictEqual(previous?.calibrationSpec, calibration.spec),
        parametersChanged: !isDeepStrictEqual(previous?.parameters, parameters),
        siteChanged: previous === null || !runUsedSite(previous, flight.site),
      },
    };
  } catch (error) {
    return { flightId, status: "failed", message: error instanceof Error ? error.message : String(error) };
  }
}

/** Reprocesses a selection flight by flight, reporting progress; never stops on one flight's failure. */
export async function reprocessFlights(
  db: Db,
  selection: ReprocessSelection,
  options: { reason: string; force?: boolean; actor?: Actor; onProgress?: (done: number, total: number, outcome: ReprocessOutcome) => void; signal?: AbortSignal },
): Promise<{ total: number; outcomes: ReprocessOutcome[]; interrupted: boolean }> {
  const ids = await selectFlights(db, selection);
  const outcomes: ReprocessOutcome[] = [];
  for (const id of ids) {
    if (options.signal?.aborted) return { total: ids.length, outcomes, interrupted: true };
    const outcome = await reprocessFlight(db, id, options);
    outcomes.push(outcome);
    options.onProgress?.(outcomes.length, ids.length, outcome);
  }
  return { total: ids.length, outcomes, interrupted: false };
}
