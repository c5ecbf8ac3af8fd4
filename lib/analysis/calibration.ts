/**
 * Temperature calibration: raw logger readings (ADC counts, volts, millivolts or a temperature
 * column) → kelvin, plus least-squares fitting of calibration models to reference points.
 */
import { fahrenheitToKelvin, celsiusToKelvin } from "./units";
import { solveLeastSquares } from "./regression";
import {
  CalibrationError,
  type AdcSpec,
  type CalibrationIssue,
  type SensorModel,
  type TemperatureCalibration,
  type ThermistorEquation,
} from "./types";
import { valueAt } from "./typed-arrays";

export type CalibrationFailureReason =
  | "non-finite-reading"
  | "divider-out-of-range"
  | "non-physical-result"
  | "invalid-calibration";

export type CalibrationResult =
  | { ok: true; temperatureK: number }
  | { ok: false; reason: CalibrationFailureReason };

const needsVolts = (sensor: SensorModel): boolean =>
  sensor.kind === "linear-voltage" || sensor.kind === "thermistor-divider";

const isTemperatureInput = (input: TemperatureCalibration["input"]): boolean =>
  input === "celsius" || input === "kelvin" || input === "fahrenheit";

const finite = (v: unknown): v is number => typeof v === "number" && Number.isFinite(v);

/**
 * Every problem with a calibration's parameters (empty when valid): zero or non-finite scale,
 * non-positive resistances/supply/β, ADC bits outside 1–32, model/input mismatches, zero gain.
 */
export function validateCalibration(cal: TemperatureCalibration): CalibrationIssue[] {
  const issues: CalibrationIssue[] = [];
  const add = (field: string, message: string) => issues.push({ field, message });
  const inputs = ["counts", "volts", "millivolts", "celsius", "kelvin", "fahrenheit"];
  if (!inputs.includes(cal.input)) add("input", `unknown input unit "${String(cal.input)}"`);
  const sensor = cal.sensor;
  if (needsVolts(sensor)) {
    if (isTemperatureInput(cal.input)) add("input", `a ${sensor.kind} sensor needs counts, volts or millivolts, not ${cal.input}`);
    if (cal.input === "counts") {
      if (!cal.adc) add("adc", "counts need an ADC specification (bits, reference voltage, divisor)");
      else issues.push(...validateAdc(cal.adc));
    }
  }
  switch (sensor.kind) {
    case "linear-voltage":
      if (!finite(sensor.scaleMvPerK) || sensor.scaleMvPerK === 0) add("sensor.scaleMvPerK", "scale must be a finite, non-zero number of mV/K");
      if (!finite(sensor.offsetV)) add("sensor.offsetV", "offset must be a finite voltage");
      break;
    case "thermistor-divider":
      if (!finite(sensor.supplyV) || sensor.supplyV <= 0) add("sensor.supplyV", "supply voltage must be positive");
      if (!finite(sensor.seriesOhm) || sensor.seriesOhm <= 0) add("sensor.seriesOhm", "series resistance must be positive");
      if (sensor.thermistorSide !== "high" && sensor.thermistorSide !== "low") add("sensor.thermistorSide", 'thermistor side must be "high" or "low"');
      issues.push(...validateEquation(sensor.equation));
      break;
    case "polynomial": {
      const c = sensor.coefficients;
      if (!Array.isArray(c) || c.length === 0) add("sensor.coefficients", "at least one coefficient is required");
      else if (!c.every(finite)) add("sensor.coefficients", "coefficients must be finite numbers");
      else if (!c.slice(1).some((v) => v !== 0)) add("sensor.coefficients", "the polynomial must depend on the reading (a non-zero coefficient of order ≥ 1)");
      break;
    }
    case "direct":
      if (!isTemperatureInput(cal.input)) add("input", "a direct sensor needs a celsius, kelvin or fahrenheit column");
      break;
    default:
      add("sensor.kind", "unknown sensor model");
  }
  if (cal.correction) {
    if (!finite(cal.correction.gain) || cal.correction.gain <= 0) add("correction.gain", "correction gain must be a positive number");
    if (!finite(cal.correction.offsetK)) add("correction.offsetK", "correction offset must be finite");
  }
  return issues;
}

function validateAdc(adc: AdcSpec): CalibrationIssue[] {
  const issues: CalibrationIssue[] = [];
  if (!Number.isInteger(adc.bits) || adc.bits <= 0 || adc.bits > 32) issues.push({ field: "adc.bits", message: "ADC bits must be an integer from 1 to 32" });
  if (!finite(adc.referenceV) || adc.referenceV <= 0) issues.push({ field: "adc.referenceV", message: "ADC reference voltage must be positive" });
  if (adc.divisor !== "2^N" && adc.divisor !== "2^N-1") issues.push({ field: "adc.divisor", message: 'ADC divisor must be "2^N" or "2^N-1"' });
  return issues;
}

function validateEquation(eq: ThermistorEquation): CalibrationIssue[] {
  const issues: CalibrationIssue[] = [];
  if (eq.kind === "steinhart-hart") {
    if (![eq.a, eq.b, eq.c].every(finite)) issues.push({ field: "sensor.equation", message: "Steinhart–Hart coefficients must be finite" });
    else if (eq.b === 0 && eq.c === 0) issues.push({ field: "sensor.equation.b", message: "Steinhart–Hart B and C cannot both be zero" });
  } else if (eq.kind === "beta") {
    if (!finite(eq.beta) || eq.beta <= 0) issues.push({ field: "sensor.equation.beta", message: "β must be positive" });
    if (!finite(eq.r0Ohm) || eq.r0Ohm <= 0) issues.push({ field: "sensor.equation.r0Ohm", message: "R0 must be positive" });
    if (!finite(eq.t0K) || eq.t0K <= 0) issues.push({ field: "sensor.equation.t0K", message: "T0 must be a positive temperature in K" });
  } else {
    issues.push({ field: "sensor.equation.kind", message: "unknown thermistor equation" });
  }
  return issues;
}

/** Throws CalibrationError (code "invalid-parameter") for the first problem found; for callers that prefer exceptions. */
export function assertValidCalibration(cal: TemperatureCalibration): void {
  const first = validateCalibration(cal)[0];
  if (first) throw new CalibrationError(first.field === "adc" ? "missing-adc" : "invalid-parameter", first.field, first.message);
}

/**
 * ADC counts → volts: V = counts·Vref/2^N (classic AVR) or /(2^N − 1).
 * Source: Microchip ADC documentation (both conventions occur; configurable).
 */
export function adcCountsToVolts(counts: number, adc: AdcSpec): number {
  const full = adc.divisor === "2^N" ? 2 ** adc.bits : 2 ** adc.bits - 1;
  return (counts * adc.referenceV) / full;
}

/**
 * Thermistor resistance (Ω) from the divider node voltage. Low side: thermistor between node and
 * ground, V = Vs·Rt/(Rs + Rt); high side: between supply and node, V = Vs·Rs/(Rs + Rt).
 * Null unless 0 < V < Vs.
 */
export function dividerResistanceOhm(
  nodeV: number,
  supplyV: number,
  seriesOhm: number,
  thermistorSide: "high" | "low",
): number | null {
  if (!Number.isFinite(nodeV) || !(nodeV > 0) || !(nodeV < supplyV)) return null;
  return thermistorSide === "low" ? (seriesOhm * nodeV) / (supplyV - nodeV) : (seriesOhm * (supplyV - nodeV)) / nodeV;
}

/**
 * Thermistor temperature, K. Steinhart–Hart: 1/T = A + B·ln R + C·(ln R)³ (Steinhart & Hart 1968);
 * beta model: 1/T = 1/T0 + ln(R/R0)/β. Null for non-positive R or a non-physical result.
 */
export function thermistorTemperatureK(resistanceOhm: number, equation: ThermistorEquation): number | null {
  if (!Number.isFinite(resistanceOhm) || resistanceOhm <= 0) return null;
  const lnR = Math.log(resistanceOhm);
  const inverse =
    equation.kind === "steinhart-hart"
      ? equation.a + equation.b * lnR + equation.c * lnR * lnR * lnR
      : 1 / equation.t0K + Math.log(resistanceOhm / equation.r0Ohm) / equation.beta;
  const t = 1 / inverse;
  return Number.isFinite(t) && t > 0 ? t : null;
}

/** Raw reading → volts for voltage-based sensors; null when the input unit is not electrical. */
function readingToVolts(cal: TemperatureCalibration, raw: number): number | null {
  switch (cal.input) {
    case "volts":
      return raw;
    case "millivolts":
      return raw / 1000;
    case "counts":
      return cal.adc ? adcCountsToVolts(raw, cal.adc) : null;
    default:
      return null;
  }
}

/** Sensor model only (no correction), K, or NaN when the reading cannot be converted. */
function sensorTemperatureOrNaN(cal: TemperatureCalibration, raw: number): number {
  const sensor = cal.sensor;
  switch (sensor.kind) {
    case "direct":
      return cal.input === "celsius" ? celsiusToKelvin(raw) : cal.input === "fahrenheit" ? fahrenheitToKelvin(raw) : raw;
    case "polynomial": {
      let t = 0;
      for (let i = sensor.coefficients.length - 1; i >= 0; i--) t = t * raw + valueAt(sensor.coefficients, i);
      return t;
    }
    case "linear-voltage": {
      const v = readingToVolts(cal, raw);
      return v === null ? Number.NaN : ((v - sensor.offsetV) * 1000) / sensor.scaleMvPerK;
    }
    case "thermistor-divider": {
      const v = readingToVolts(cal, raw);
      if (v === null) return Number.NaN;
      const r = dividerResistanceOhm(v, sensor.supplyV, sensor.seriesOhm, sensor.thermistorSide);
      if (r === null) return Number.NaN;
      return thermistorTemperatureK(r, sensor.equation) ?? Number.NaN;
    }
  }
}

/**
 * Allocation-free form of calibrateReading for bulk use: K, or NaN when the reading cannot be
 * converted (NaN never leaves the analysis; callers count it as a missing value).
 */
export function calibrateReadingOrNaN(cal: TemperatureCalibration, raw: number): number {
  if (!Number.isFinite(raw)) return Number.NaN;
  const base = sensorTemperatureOrNaN(cal, raw);
  const t = cal.correction ? cal.correction.gain * base + cal.correction.offsetK : base;
  return Number.isFinite(t) && t > 0 ? t : Number.NaN;
}

/** Sensor model only (no correction), K or a failure reason. Assumes a validated calibration. */
function sensorTemperatureK(cal: TemperatureCalibration, raw: number): CalibrationResult {
  const t = sensorTemperatureOrNaN(cal, raw);
  if (t === t) return { ok: true, temperatureK: t };
  const sensor = cal.sensor;
  const volts = sensor.kind === "linear-voltage" || sensor.kind === "thermistor-divider" ? readingToVolts(cal, raw) : 0;
  if (volts === null) return { ok: false, reason: "invalid-calibration" };
  if (sensor.kind === "thermistor-divider" && dividerResistanceOhm(volts, sensor.supplyV, sensor.seriesOhm, sensor.thermistorSide) === null) {
    return { ok: false, reason: "divider-out-of-range" };
  }
  return { ok: false, reason: "non-physical-result" };
}

/**
 * One raw reading → air temperature in K: input unit → (ADC → volts) → sensor model → field
 * correction T' = gain·T + offsetK. A typed failure (never NaN) when the reading cannot be
 * converted; a result ≤ 0 K counts as non-physical. Range checks for plausibility are left to
 * cleaning. The calibration is assumed validated (see validateCalibration).
 */
export function calibrateReading(cal: TemperatureCalibration, raw: number): CalibrationResult {
  if (!Number.isFinite(raw)) return { ok: false, reason: "non-finite-reading" };
  const base = sensorTemperatureK(cal, raw);
  if (!base.ok) return base;
  const t = cal.correction ? cal.correction.gain * base.temperatureK + cal.correction.offsetK : base.temperatureK;
  if (!Number.isFinite(t) || t <= 0) return { ok: false, reason: "non-physical-result" };
  return { ok: true, temperatureK: t };
}

export interface CorrectionPair {
  /** Temperature from the uncorrected calibration, K. */
  measuredK: number;
  /** Reference thermometer temperature, K. */
  referenceK: number;
}

/**
 * Field correction T' = gain·T + offsetK from reference pairs: one pair → offset only (gain 1),
 * two pairs → exact two-point line, more → least squares. Throws CalibrationError when there are no
 * usable pairs or the measured values are all equal (with ≥ 2 pairs).
 */
export function fitTwoPointCorrection(pairs: readonly CorrectionPair[]): { gain: number; offsetK: number } {
  const usable = pairs.filter((p) => Number.isFinite(p.measuredK) && Number.isFinite(p.referenceK));
  const only = usable[0];
  if (!only) throw new CalibrationError("too-few-points", "pairs", "at least one reference pair is needed");
  if (usable.length === 1) return { gain: 1, offsetK: only.referenceK - only.measuredK };
  const coef = solveLeastSquares(usable.map((p) => [1, p.measuredK]), usable.map((p) => p.referenceK));
  if (!coef) throw new CalibrationError("singular-fit", "pairs", "reference pairs need at least two different measured temperatures");
  const [offsetK, gain] = coef as [number, number];
  if (!(gain > 0)) throw new CalibrationError("singular-fit", "pairs", "the fitted gain is not positive; check the pairs");
  return { gain, offsetK };
}

export interface CalibrationPoint {
  /** Raw reading in the calibration's input unit. */
  raw: number;
  /** Reference temperature, K. */
  temperatureK: number;
}

export interface CalibrationFit {
  calibration: TemperatureCalibration;
  /** Fitted minus reference temperature for each point, K (null where the fitted model fails). */
  residualsK: Array<number | null>;
  rmsResidualK: number | null;
}

/**
 * Least-squares fit of a calibration model to reference points (3 or more), using the model's
 * linear form: polynomial in the raw reading (degree = template coefficient count − 1);
 * linear-voltage V = offset + scale·T/1000; Steinhart–Hart 1/T on (1, ln R, (ln R)³); beta via
 * 1/T = (1/T0 − ln R0/β) + ln R/β keeping the template's T0 and solving β and R0; direct → a
 * gain/offset correction. Other parameters (ADC, divider, input unit) are kept from the template.
 * Throws CalibrationError for too few points or a singular design.
 */
export function fitCalibration(template: TemperatureCalibration, points: readonly CalibrationPoint[]): CalibrationFit {
  const usable = points.filter((p) => Number.isFinite(p.raw) && Number.isFinite(p.temperatureK) && p.temperatureK > 0);
  const sensor = template.sensor;
  const minimum = sensor.kind === "polynomial" ? Math.max(3, sensor.coefficients.length) : 3;
  if (usable.length < minimum) {
    throw new CalibrationError("too-few-points", "points", `at least ${minimum} reference points are needed`);
  }
  const base: TemperatureCalibration = { ...template };
  delete base.correction;
  const singular = () => new CalibrationError("singular-fit", "points", "the reference points do not determine the model (too similar)");
  let calibration: TemperatureCalibration;
  switch (sensor.kind) {
    case "polynomial": {
      const degree = Math.max(sensor.coefficients.length - 1, 1);
      const coef = solveLeastSquares(
        usable.map((p) => Array.from({ length: degree + 1 }, (_, i) => p.raw ** i)),
        usable.map((p) => p.temperatureK),
      );
      if (!coef) throw singular();
      calibration = { ...base, sensor: { kind: "polynomial", coefficients: coef } };
      break;
    }
    case "linear-voltage": {
      const rows: number[][] = [];
      const volts: number[] = [];
      for (const p of usable) {
        const v = readingToVolts(base, p.raw);
        if (v === null) throw new CalibrationError("unsupported-input", "input", "linear-voltage needs counts, volts or millivolts");
        rows.push([1, p.temperatureK / 1000]);
        volts.push(v);
      }
      const coef = solveLeastSquares(rows, volts);
      if (!coef || coef[1] === 0) throw singular();
      calibration = { ...base, sensor: { kind: "linear-voltage", offsetV: valueAt(coef, 0), scaleMvPerK: valueAt(coef, 1) } };
      break;
    }
    case "thermistor-divider": {
      const lnR: number[] = [];
      const invT: number[] = [];
      for (const p of usable) {
        const v = readingToVolts(base, p.raw);
        if (v === null) throw new CalibrationError("unsupported-input", "input", "a thermistor divider needs counts, volts or millivolts");
        const r = dividerResistanceOhm(v, sensor.supplyV, sensor.seriesOhm, sensor.thermistorSide);
        if (r === null) throw new CalibrationError("invalid-parameter", "points", `reading ${p.raw} is outside the divider range`);
        lnR.push(Math.log(r));
        invT.push(1 / p.temperatureK);
      }
      if (sensor.equation.kind === "steinhart-hart") {
        const coef = solveLeastSquares(lnR.map((l) => [1, l, l * l * l]), invT);
        if (!coef) throw singular();
        const [a, b, c] = coef as [number, number, number];
        calibration = { ...base, sensor: { ...sensor, equation: { kind: "steinhart-hart", a, b, c } } };
      } else {
        const coef = solveLeastSquares(lnR.map((l) => [1, l]), invT);
        if (!coef || !(valueAt(coef, 1) > 0)) throw singular();
        const [intercept, slope] = coef as [number, number];
        const beta = 1 / slope;
        const t0K = sensor.equation.t0K;
        const r0Ohm = Math.exp((1 / t0K - intercept) * beta);
        if (!Number.isFinite(r0Ohm)) throw singular();
        calibration = { ...base, sensor: { ...sensor, equation: { kind: "beta", beta, r0Ohm, t0K } } };
      }
      break;
    }
    case "direct": {
      const pairs: CorrectionPair[] = [];
      for (const p of usable) {
        const m = sensorTemperatureK(base, p.raw);
        if (m.ok) pairs.push({ measuredK: m.temperatureK, referenceK: p.temperatureK });
      }
      calibration = { ...base, correction: fitTwoPointCorrection(pairs) };
      break;
    }
  }
  const residualsK = usable.map((p) => {
    const r = calibrateReading(calibration, p.raw);
    return r.ok ? r.temperatureK - p.temperatureK : null;
  });
  const valid = residualsK.filter((r): r is number => r !== null);
  const rmsResidualK = valid.length > 0 ? Math.sqrt(valid.reduce((s, r) => s + r * r, 0) / valid.length) : null;
  return { calibration, residualsK, rmsResidualK };
}
