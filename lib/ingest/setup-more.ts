import { z } from "zod";
import type { Db, DbTransaction } from "../db/index.ts";
import { Prisma } from "../db/index.ts";
import { calibrateReading, fitCalibration, fitTwoPointCorrection } from "../analysis/calibration.ts";
import { CalibrationError, type TemperatureCalibration } from "../analysis/types.ts";
import { IngestFailure, type IngestIssue } from "./errors.ts";
import { loggerLayoutSpecSchema, type LoggerLayoutSpec } from "./layout.ts";
import { parseLoggerFile } from "./parse.ts";
import { previewClockZone } from "./clock-zone.ts";
import { analysisParametersSchema, storableDateInputSchema, temperatureCalibrationSchema } from "./schemas.ts";
import { payloadInputSchema, sensorInputSchema, siteInputSchema } from "./setup.ts";
import type { Actor } from "./store.ts";

type DbLike = Db | DbTransaction;

const KELVIN_AT_0_C = 273.15;
const SETUP_ACTOR: Actor = { userId: null, label: "setup" };

async function audit(db: DbLike, actor: Actor, schoolId: string | null, action: string, entityType: string, entityId: string, details: Prisma.InputJsonValue) {
  await db.auditEvent.create({ data: { actorUserId: actor.userId, actorLabel: actor.label, schoolId, action, entityType, entityId, details } });
}

/** Raised when a write would contradict stored setup (a sensor in two payloads at once, another school's id…). */
export class SetupConflictError extends Error {
  constructor(message: string, readonly field: string | null = null) {
    super(message);
    this.name = "SetupConflictError";
  }
}

// --- sites, payloads, sensors -------------------------------------------------------------------

export const siteUpdateSchema = siteInputSchema.omit({ schoolId: true });
export const payloadUpdateSchema = payloadInputSchema.omit({ schoolId: true });
export const sensorUpdateSchema = sensorInputSchema.pick({ serial: true, kind: true, timeConstantS: true, notes: true });

/** Corrects a launch site (name, position, elevation, IANA zone); flights keep pointing at it. */
export async function updateSite(db: DbLike, siteId: string, input: z.input<typeof siteUpdateSchema>, actor: Actor = SETUP_ACTOR) {
  const data = siteUpdateSchema.parse(input);
  const site = await db.site.update({ where: { id: siteId }, data });
  await audit(db, actor, site.schoolId, "site.update", "site", site.id, data);
  return site;
}

export async function updatePayload(db: DbLike, payloadId: string, input: z.input<typeof payloadUpdateSchema>, actor: Actor = SETUP_ACTOR) {
  const data = payloadUpdateSchema.parse(input);
  const payload = await db.payload.update({ where: { id: payloadId }, data });
  await audit(db, actor, payload.schoolId, "payload.update", "payload", payload.id, data);
  return payload;
}

/** Changes a sensor's description (serial, kind, time constant, notes); mounts and calibrations stay. */
export async function updateSensor(db: DbLike, sensorId: string, input: z.input<typeof sensorUpdateSchema>, actor: Actor = SETUP_ACTOR) {
  const data = sensorUpdateSchema.parse(input);
  const sensor = await db.sensor.update({ where: { id: sensorId }, data });
  await audit(db, actor, sensor.schoolId, "sensor.update", "sensor", sensor.id, data);
  return sensor;
}

export const sensorMountInputSchema = z
  .object({
    sensorId: z.string().min(1),
    payloadId: z.string().min(1, "Choose a payload"),
    fromUtc: storableDateInputSchema({ error: "Give the date the sensor went into the payload" }),
    toUtc: storableDateInputSchema().nullable().default(null),
  })
  .refine((m) => !m.toUtc || m.toUtc > m.fromUtc, { path: ["toUtc"], message: "The end of the mount must be after its start" });

const FAR_FUTURE = new Date(8.64e15);
const isoDay = (d: Date | null) => (d ? d.toISOString().slice(0, 10) : "open end");

/**
 * Records that a sensor sits in a payload from `fromUtc` (to `toUtc`, or open). A sensor is in one
 * payload at a time: an open mount that began earlier is closed at `fromUtc` (the sensor was moved);
 * any other overlap is refused with a message naming the clashing mount.
 */
export async function mountSensor(db: DbLike, input: z.input<typeof sensorMountInputSchema>, actor: Actor = SETUP_ACTOR) {
  const data = sensorMountInputSchema.parse(input);
  const [sensor, payload] = await Promise.all([
    db.sensor.findUnique({ where: { id: data.sensorId } }),
    db.payload.findUnique({ where: { id: data.payloadId } }),
  ]);
  if (!sensor) throw new SetupConflictError("That sensor does not exist", "sensorId");
  if (!payload || payload.schoolId !== sensor.schoolId) throw new SetupConflictError("That payload does not belong to the sensor's school", "payloadId");
  const mounts = await db.sensorMount.findMany({ where: { sensorId: sensor.id }, include: { payload: { select: { name: true } } }, orderBy: { fromUtc: "asc" } });
  const open = mounts.find((m) => m.toUtc === null && m.fromUtc < data.fromUtc);
  for (const mount of mounts) {
    // The open mount that began earlier ends where the new one starts (the sensor was moved).
    const end = mount === open ? data.fromUtc : (mount.toUtc ?? FAR_FUTURE);
    if (data.fromUtc < end && mount.fromUtc < (data.toUtc ?? FAR_FUTURE)) {
      throw new SetupConflictError(
        `Sensor ${sensor.serial} is already in payload ${mount.payload.name} from ${isoDay(mount.fromUtc)} to ${isoDay(mount.toUtc)}; a sensor sits in one payload at a time. End that mount first or choose other dates.`,
        "fromUtc",
      );
    }
  }
  if (open) await db.sensorMount.update({ where: { id: open.id }, data: { toUtc: data.fromUtc } });
  const mount = await db.sensorMount.create({ data: { sensorId: sensor.id, payloadId: payload.id, fromUtc: data.fromUtc, toUtc: data.toUtc } });
  await audit(db, actor, sensor.schoolId, "sensor.mount", "sensor", sensor.id, { mountId: mount.id, payloadId: payload.id, fromUtc: data.fromUtc.toISOString(), toUtc: data.toUtc?.toISOString() ?? null, closedMountId: open?.id ?? null });
  return mount;
}

// --- deleting setup items -----------------------------------------------------------------------

export const SETUP_ITEM_KINDS = ["site", "payload", "sensor", "calibration", "layout"] as const;
export type SetupItemKind = (typeof SETUP_ITEM_KINDS)[number];

function countWords(count: number, one: string, many: string): string {
  return `${count} ${count === 1 ? one : many}`;
}

export interface SetupItemFacts {
  schoolId: string;
  name: string;
  /** A calibration's sensor (its page lives under the sensor's). */
  sensorId?: string;
}

/** The item's school and display name, or null when it does not exist. */
export async function findSetupItem(db: DbLike, kind: SetupItemKind, id: string): Promise<SetupItemFacts | null> {
  switch (kind) {
    case "site": {
      const site = await db.site.findUnique({ where: { id }, select: { schoolId: true, name: true } });
      return site && { schoolId: site.schoolId, name: site.name };
    }
    case "payload": {
      const payload = await db.payload.findUnique({ where: { id }, select: { schoolId: true, name: true } });
      return payload && { schoolId: payload.schoolId, name: payload.name };
    }
    case "sensor": {
      const sensor = await db.sensor.findUnique({ where: { id }, select: { schoolId: true, serial: true } });
      return sensor && { schoolId: sensor.schoolId, name: sensor.serial };
    }
    case "calibration": {
      const calibration = await db.calibration.findUnique({ where: { id }, select: { id: true, sensorId: true, sensor: { select: { schoolId: true, serial: true } } } });
      return calibration && { schoolId: calibration.sensor.schoolId, name: `${calibration.id} (sensor ${calibration.sensor.serial})`, sensorId: calibration.sensorId };
    }
    case "layout": {
      const layout = await db.loggerLayout.findUnique({ where: { id }, select: { schoolId: true, name: true } });
      return layout && { schoolId: layout.schoolId, name: layout.name };
    }
  }
}

/** What refers to a setup item, in words ("3 flights"); empty when nothing does. */
export async function setupItemUses(db: DbLike, kind: SetupItemKind, id: string): Promise<string[]> {
  const uses: string[] = [];
  const flights = (n: number) => n && uses.push(countWords(n, "flight", "flights"));
  const runs = (n: number) => n && uses.push(countWords(n, "analysis run", "analysis runs"));
  switch (kind) {
    case "site":
      flights(await db.flight.count({ where: { siteId: id } }));
      break;
    case "payload":
      flights(await db.flight.count({ where: { payloadId: id } }));
      break;
    case "sensor":
      flights(await db.flight.count({ where: { sensorId: id } }));
      runs(await db.analysisRun.count({ where: { calibration: { sensorId: id } } }));
      break;
    case "calibration":
      runs(await db.analysisRun.count({ where: { calibrationId: id } }));
      break;
    case "layout":
      flights(await db.flight.count({ where: { layoutId: id } }));
      break;
  }
  return uses;
}

/**
 * Deletes a setup item entered by mistake. Flights and analysis runs keep pointing at the setup
 * they were made with (provenance), so an item anything refers to is refused, saying what uses it;
 * such an item can be corrected instead. Deleting a sensor also deletes its calibrations and mount
 * history; deleting a payload, its mount history. Call inside a transaction.
 * @throws SetupConflictError when the item does not exist or is in use.
 */
export async function deleteSetupItem(db: DbLike, kind: SetupItemKind, id: string, actor: Actor = SETUP_ACTOR): Promise<SetupItemFacts> {
  const item = await findSetupItem(db, kind, id);
  if (!item) throw new SetupConflictError(`That ${kind} no longer exists`);
  const uses = await setupItemUses(db, kind, id);
  if (uses.length) {
    throw new SetupConflictError(`${kind[0]?.toUpperCase()}${kind.slice(1)} ${item.name} is used by ${uses.join(" and ")}, so it cannot be deleted; correct it instead.`);
  }
  switch (kind) {
    case "site":
      await db.site.delete({ where: { id } });
      break;
    case "payload":
      await db.payload.delete({ where: { id } });
      break;
    case "sensor":
      await db.sensor.delete({ where: { id } });
      break;
    case "calibration":
      await db.calibration.delete({ where: { id } });
      break;
    case "layout":
      await db.loggerLayout.delete({ where: { id } });
      break;
  }
  await audit(db, actor, item.schoolId, `${kind}.delete`, kind, id, { name: item.name });
  return item;
}

// --- logger layouts -----------------------------------------------------------------------------

export const layoutUpdateSchema = z.object({ spec: loggerLayoutSpecSchema });

/**
 * Replaces a logger layout's spec (and name). Runs made with the old spec keep their own copy, so
 * nothing published is lost; reprocessing the layout's flights applies the new one.
 */
export async function updateLayout(db: DbLike, layoutId: string, input: z.input<typeof layoutUpdateSchema>, actor: Actor = SETUP_ACTOR) {
  const { spec } = layoutUpdateSchema.parse(input);
  const layout = await db.loggerLayout.update({ where: { id: layoutId }, data: { name: spec.name, spec: spec as unknown as Prisma.InputJsonValue } });
  await audit(db, actor, layout.schoolId, "layout.update", "layout", layout.id, { name: spec.name });
  return layout;
}

// --- program parameters -------------------------------------------------------------------------

/**
 * Sets the program-wide analysis parameters (id 1 of ProgramSettings). Every later run records the
 * parameters it used, so changing them never alters a stored run; reprocessing applies them.
 */
export async function setProgramParameters(db: DbLike, input: z.input<typeof analysisParametersSchema>, actor: Actor = SETUP_ACTOR) {
  const parameters = analysisParametersSchema.parse(input);
  const json = parameters as unknown as Prisma.InputJsonValue;
  await db.programSettings.upsert({ where: { id: 1 }, create: { id: 1, analysisParameters: json }, update: { analysisParameters: json } });
  await audit(db, actor, null, "program.parameters", "program", "1", json);
  return parameters;
}

// --- calibration helper -------------------------------------------------------------------------

export const calibrationPointSchema = z.object({
  raw: z.number({ error: "Each reading must be a number" }).finite(),
  referenceC: z.number({ error: "Each reference temperature must be a number" }).finite().min(-273.15, "Below absolute zero"),
});

export const calibrationFitInputSchema = z.object({
  /** The nominal model (input unit, ADC, sensor); any correction on it is replaced by the fit. */
  template: temperatureCalibrationSchema,
  points: z.array(calibrationPointSchema).min(2, "Enter at least two (reading, reference temperature) pairs"),
  /** correction: gain/offset on top of the nominal model; model: refit the model itself (3+ points); auto: 2 points → correction, 3+ → model. */
  fit: z.enum(["auto", "correction", "model"]).default("auto"),
});

export interface CalibrationFitCoefficient {
  name: string;
  value: number;
  unit: string;
}

export interface CalibrationFitResult {
  calibration: TemperatureCalibration;
  method: "two-point" | "least-squares";
  fitted: "correction" | "model";
  coefficients: CalibrationFitCoefficient[];
  points: Array<{ raw: number; referenceC: number; fittedC: number | null; residualK: number | null }>;
  rmsResidualK: number | null;
  /** The fitted curve across the readings (a little beyond them), for a chart. */
  curve: Array<{ raw: number; temperatureC: number }>;
}

/** Why a fit could not be made, in words for the form. */
export class CalibrationFitError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "CalibrationFitError";
  }
}

/** Ten significant digits: far below any sensor's resolution, and the stored coefficients stay readable. */
function roundCoefficients<T>(value: T): T {
  if (typeof value === "number") return (Number.isFinite(value) ? Number(value.toPrecision(10)) : value) as T;
  if (Array.isArray(value)) return value.map((v: unknown) => roundCoefficients(v)) as T;
  if (typeof value === "object" && value !== null) return Object.fromEntries(Object.entries(value).map(([k, v]) => [k, roundCoefficients(v)])) as T;
  return value;
}

function withoutCorrection(cal: TemperatureCalibration): TemperatureCalibration {
  const { correction: _dropped, ...rest } = cal;
  return rest;
}

function coefficientsOf(cal: TemperatureCalibration, fitted: "correction" | "model"): CalibrationFitCoefficient[] {
  if (fitted === "correction" || cal.sensor.kind === "direct") {
    return cal.correction ? [{ name: "gain", value: cal.correction.gain, unit: "" }, { name: "offset", value: cal.correction.offsetK, unit: "K" }] : [];
  }
  const sensor = cal.sensor;
  switch (sensor.kind) {
    case "linear-voltage":
      return [{ name: "scale", value: sensor.scaleMvPerK, unit: "mV/K" }, { name: "offset", value: sensor.offsetV, unit: "V" }];
    case "polynomial":
      return sensor.coefficients.map((value, i) => ({ name: `c${i}`, value, unit: i === 0 ? "K" : `K per reading${i > 1 ? `^${i}` : ""}` }));
    case "thermistor-divider":
      return sensor.equation.kind === "steinhart-hart"
        ? [{ name: "A", value: sensor.equation.a, unit: "1/K" }, { name: "B", value: sensor.equation.b, unit: "1/K" }, { name: "C", value: sensor.equation.c, unit: "1/K" }]
        : [{ name: "beta", value: sensor.equation.beta, unit: "K" }, { name: "R0", value: sensor.equation.r0Ohm, unit: "Ω" }, { name: "T0", value: sensor.equation.t0K, unit: "K" }];
  }
}

/**
 * Calibration helper: fits (raw reading, reference °C) pairs. Two points (or `fit: "correction"`)
 * give a gain/offset field correction T' = gain·T + offset on top of the nominal model (exact
 * through two points, least squares through more); three or more with `fit: "model"` (or auto)
 * refit the model's own coefficients by least squares (lib/analysis/calibration fitCalibration).
 * Pure: no database. Throws CalibrationFitError with a plain message when the points cannot
 * determine the fit.
 */
export function fitCalibrationPoints(input: z.input<typeof calibrationFitInputSchema>): CalibrationFitResult {
  const { template, points, fit } = calibrationFitInputSchema.parse(input);
  const fitted: "correction" | "model" = fit === "auto" ? (points.length >= 3 ? "model" : "correction") : fit;
  if (fitted === "model" && points.length < 3) throw new CalibrationFitError("Refitting the model needs at least three pairs; with two, fit a gain/offset correction");
  const nominal = withoutCorrection(template);
  let calibration: TemperatureCalibration;
  try {
    if (fitted === "correction") {
      const pairs = points.map((p) => {
        const measured = calibrateReading(nominal, p.raw);
        if (!measured.ok) throw new CalibrationFitError(`The nominal model cannot convert reading ${p.raw} (${measured.reason.replace(/-/g, " ")}); check the model and the reading's unit`);
        return { measuredK: measured.temperatureK, referenceK: p.referenceC + KELVIN_AT_0_C };
      });
      calibration = { ...nominal, correction: fitTwoPointCorrection(pairs) };
    } else {
      calibration = fitCalibration(nominal, points.map((p) => ({ raw: p.raw, temperatureK: p.referenceC + KELVIN_AT_0_C }))).calibration;
    }
  } catch (error) {
    if (error instanceof CalibrationError) throw new CalibrationFitError(`The pairs do not determine the fit: ${error.message}`);
    throw error;
  }
  const checked = temperatureCalibrationSchema.safeParse(roundCoefficients(calibration));
  if (!checked.success) throw new CalibrationFitError(`The fit gave an unusable calibration (${checked.error.issues.map((i) => i.message).join("; ")}); check the pairs`);
  const fittedCalibration = checked.data;
  const rows = points.map((p) => {
    const r = calibrateReading(fittedCalibration, p.raw);
    const fittedC = r.ok ? r.temperatureK - KELVIN_AT_0_C : null;
    return { raw: p.raw, referenceC: p.referenceC, fittedC, residualK: fittedC === null ? null : fittedC - p.referenceC };
  });
  const residuals = rows.map((r) => r.residualK).filter((r): r is number => r !== null);
  const rmsResidualK = residuals.length ? Math.sqrt(residuals.reduce((s, r) => s + r * r, 0) / residuals.length) : null;
  const raws = points.map((p) => p.raw);
  const lo = Math.min(...raws);
  const hi = Math.max(...raws);
  const pad = (hi - lo) * 0.1 || Math.abs(lo) * 0.05 || 1;
  const steps = 40;
  const curve: CalibrationFitResult["curve"] = [];
  for (let i = 0; i <= steps; i++) {
    const raw = lo - pad + ((hi - lo + 2 * pad) * i) / steps;
    const r = calibrateReading(fittedCalibration, raw);
    if (r.ok) curve.push({ raw, temperatureC: r.temperatureK - KELVIN_AT_0_C });
  }
  return {
    calibration: fittedCalibration,
    method: points.length === 2 ? "two-point" : "least-squares",
    fitted,
    coefficients: coefficientsOf(fittedCalibration, fitted),
    points: rows,
    rmsResidualK,
    curve,
  };
}

// --- layout preview -----------------------------------------------------------------------------

/** The live preview reads only the start of a sample file. */
export const LAYOUT_PREVIEW_BYTES = 64 * 1024;
const LAYOUT_PREVIEW_ROWS = 15;

export interface LayoutPreview {
  fileName: string;
  /** True when only the first 64 KB were read. */
  partial: boolean;
  header: string[] | null;
  dataRowCount: number;
  rows: Array<{ line: number; elapsedS: number; altitudeM: number | null; rawTemperature: number | null; pressureHpa: number | null; relativeHumidityPct: number | null; latitudeDeg: number | null; longitudeDeg: number | null }>;
  /** Rows the layout could not read (lenient parse), each with line and column. */
  skipped: IngestIssue[];
  /** Why the layout cannot read the file at all, located by line and column. */
  issues: IngestIssue[];
}

/**
 * Parses the first 64 KB of a sample file with a (possibly unsaved) layout, leniently, so the
 * editor can show the rows it reads and every row it cannot, with line and column.
 */
export async function previewLayoutSample(bytes: Uint8Array, spec: LoggerLayoutSpec, fileName: string): Promise<LayoutPreview> {
  let head = bytes.subarray(0, LAYOUT_PREVIEW_BYTES);
  const partial = bytes.byteLength > LAYOUT_PREVIEW_BYTES;
  if (partial) {
    // Cut at the last newline so the preview never sees half a line.
    const lastNewline = head.lastIndexOf(0x0a);
    if (lastNewline > 0) head = head.subarray(0, lastNewline + 1);
  }
  const empty = { fileName, partial, header: null, dataRowCount: 0, rows: [], skipped: [] };
  try {
    const parsed = await parseLoggerFile(head, spec, { fileName, mode: "lenient", clockAnchorUtc: new Date(Date.UTC(2000, 0, 1, 12)), clockZone: previewClockZone(spec.columns.time.clockZone), maxIssues: 20 });
    return {
      fileName, partial, header: parsed.header, dataRowCount: parsed.dataRowCount,
      rows: parsed.samples.slice(0, LAYOUT_PREVIEW_ROWS).map((s) => ({
        line: s.sourceLine, elapsedS: s.elapsedS, altitudeM: s.altitudeM, rawTemperature: s.rawTemperature, pressureHpa: s.pressureHpa,
        relativeHumidityPct: s.relativeHumidityPct, latitudeDeg: s.latitudeDeg, longitudeDeg: s.longitudeDeg,
      })),
      skipped: parsed.skippedRows.slice(0, 20),
      issues: [],
    };
  } catch (error) {
    if (error instanceof IngestFailure) return { ...empty, issues: error.issues };
    throw error;
  }
}
