/** Calibrations: the schema, overlap rule, audited create and correction, and the fit helper. */
import { z } from "zod";
import { Prisma } from "../../db/index.ts";
import type { Actor } from "../store.ts";
import { auditCreate, inTransaction, SETUP_ACTOR, type DbLike } from "./common.ts";
import { calibrateReading, fitCalibration, fitTwoPointCorrection } from "../../analysis/calibration.ts";
import { CalibrationError, type TemperatureCalibration } from "../../analysis/types.ts";
import { storableDateInputSchema, temperatureCalibrationSchema } from "../schemas.ts";

const KELVIN_AT_0_C = 273.15;

export const calibrationInputSchema = z
  .object({
    sensorId: z.string().min(1),
    spec: temperatureCalibrationSchema,
    validFromUtc: storableDateInputSchema(),
    validToUtc: storableDateInputSchema().nullable().default(null),
    method: z.string().trim().min(1).max(80),
    referenceReadings: z.array(z.object({ raw: z.number().finite(), temperatureK: z.number().finite() })).optional(),
    notes: z.string().max(2000).default(""),
  })
  .refine((c) => !c.validToUtc || c.validToUtc > c.validFromUtc, { path: ["validToUtc"], message: "The end of validity must be after its start" });

export class OverlappingCalibrationError extends Error {
  constructor(readonly otherCalibrationId: string, from: Date, to: Date | null) {
    super(`This validity period overlaps calibration ${otherCalibrationId} (valid ${from.toISOString().slice(0, 10)} to ${to ? to.toISOString().slice(0, 10) : "open end"}). Close that one first or choose other dates.`);
    this.name = "OverlappingCalibrationError";
  }
}

async function refuseOverlap(db: DbLike, data: { sensorId: string; validFromUtc: Date; validToUtc: Date | null }, exceptId?: string) {
  const far = new Date(8.64e15);
  const others = await db.calibration.findMany({ where: { sensorId: data.sensorId, ...(exceptId ? { id: { not: exceptId } } : {}) } });
  for (const other of others) {
    const overlaps = data.validFromUtc < (other.validToUtc ?? far) && other.validFromUtc < (data.validToUtc ?? far);
    if (overlaps) throw new OverlappingCalibrationError(other.id, other.validFromUtc, other.validToUtc);
  }
}

/**
 * Creates a calibration; refuses a validity period that overlaps another of the same sensor.
 * Audited as calibration.create in the same transaction.
 */
export async function createCalibration(db: DbLike, input: z.input<typeof calibrationInputSchema>, actor: Actor = SETUP_ACTOR) {
  const data = calibrationInputSchema.parse(input);
  return inTransaction(db, async (tx) => {
    await refuseOverlap(tx, data);
    const calibration = await tx.calibration.create({
      data: {
        sensorId: data.sensorId,
        spec: data.spec as unknown as Prisma.InputJsonValue,
        validFromUtc: data.validFromUtc,
        validToUtc: data.validToUtc,
        method: data.method,
        referenceReadings: (data.referenceReadings ?? undefined) as Prisma.InputJsonValue | undefined,
        notes: data.notes,
      },
      include: { sensor: { select: { schoolId: true } } },
    });
    await auditCreate(tx, actor, calibration.sensor.schoolId, "calibration", calibration.id, {
      sensorId: calibration.sensorId, method: calibration.method,
      validFromUtc: calibration.validFromUtc.toISOString(), validToUtc: calibration.validToUtc?.toISOString() ?? null,
    });
    const { sensor: _sensor, ...row } = calibration;
    return row;
  });
}

/**
 * Corrects a calibration in place (coefficients, validity, notes). Runs made with the old values keep
 * their own copy of the spec, so history is not lost; reprocessing applies the new values.
 */
export async function updateCalibration(db: DbLike, calibrationId: string, input: z.input<typeof calibrationInputSchema>) {
  const data = calibrationInputSchema.parse(input);
  await refuseOverlap(db, data, calibrationId);
  return db.calibration.update({
    where: { id: calibrationId },
    data: {
      spec: data.spec as unknown as Prisma.InputJsonValue,
      validFromUtc: data.validFromUtc,
      validToUtc: data.validToUtc,
      method: data.method,
      referenceReadings: (data.referenceReadings ?? undefined) as Prisma.InputJsonValue | undefined,
      notes: data.notes,
    },
  });
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
