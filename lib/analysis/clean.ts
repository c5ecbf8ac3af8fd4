/**
 * From raw logger rows to a cleaned, time-ordered sample series in typed arrays: time ordering
 * and de-duplication, calibration, altitude choice (GPS, else pressure), missing and
 * out-of-range rows, GPS jumps and temperature spikes. Every removal is counted.
 */
import { calibrateReadingOrNaN } from "./calibration";
import { float64At, int32At, valueAt } from "./typed-arrays";

/** `valueAt` for the input rows: a read of its own keeps its element kind (objects) specialised. */
function sampleAt(samples: readonly RawSample[], index: number): RawSample {
  const sample = samples[index];
  if (sample === undefined) throw new RangeError(`row ${index} is outside 0…${samples.length - 1}`);
  return sample;
}
import { altitudeJumpMask, detectAlternatingTemperature, detectStuckTemperature, hampelSpikeMask } from "./filters";
import { integrateHypsometricAltitudesM } from "./altitude";
import { standardAtmosphereAltitudeForPressureM } from "./standard-atmosphere";
import type { AnalysisParameters, QcReport, QcWarning, RawSample, SiteInfo, TemperatureCalibration } from "./types";

/** Plausible ranges for a balloon sounding [P]. */
export const TEMPERATURE_RANGE_K = { min: 150, max: 350 } as const;
export const ALTITUDE_RANGE_M = { min: -500, max: 60000 } as const;
const PRESSURE_RANGE_HPA = { min: 0.1, max: 1100 } as const;
/**
 * When at least this share of the altitude readings, and at least MIN rows, lie outside the
 * plausible range, the altitude column as a whole is not trusted [P]: a GPS (or column) that is
 * that often impossible (wrong unit or column, ×400, negative) is no passing glitch, and its
 * in-range readings are suspect too. With pressure, every altitude then comes from pressure;
 * either way the flight is QC-flagged ("implausible-altitudes"). A few glitch rows, or rows with
 * no altitude at all, are simply filled from pressure (informational "altitude-from-pressure").
 */
const IMPLAUSIBLE_ALTITUDE_SHARE = 0.01;
const IMPLAUSIBLE_ALTITUDE_MIN_ROWS = 10;
/** Hampel threshold floor, K: smaller departures are not treated as spikes [P]. */
const HAMPEL_MIN_THRESHOLD_K = 0.3;

/** Cleaned samples, time-ordered; NaN marks a missing pressure or humidity. */
export interface CleanSeries {
  n: number;
  elapsedS: Float64Array;
  altitudeM: Float64Array;
  temperatureK: Float64Array;
  pressureHpa: Float64Array;
  relativeHumidityPct: Float64Array;
  sourceLine: Float64Array;
}

export interface CleanResult {
  series: CleanSeries;
  removed: QcReport["removed"];
  timeOrder: QcReport["timeOrder"];
  flags: string[];
  warnings: QcWarning[];
  hasPressure: boolean;
  hasHumidity: boolean;
}

const num = (v: number | null | undefined): number => (typeof v === "number" && Number.isFinite(v) ? v : Number.NaN);

function compact(series: CleanSeries, kept: Int32Array): CleanSeries {
  return {
    n: kept.length,
    elapsedS: gather(series.elapsedS, kept),
    altitudeM: gather(series.altitudeM, kept),
    temperatureK: gather(series.temperatureK, kept),
    pressureHpa: gather(series.pressureHpa, kept),
    relativeHumidityPct: gather(series.relativeHumidityPct, kept),
    sourceLine: gather(series.sourceLine, kept),
  };
}

function gather(values: Float64Array, indices: Int32Array): Float64Array {
  const out = new Float64Array(indices.length);
  for (let i = 0; i < indices.length; i++) out[i] = float64At(values, int32At(indices, i));
  return out;
}

function indicesOf(keep: Uint8Array, n: number): Int32Array {
  let m = 0;
  for (let i = 0; i < n; i++) if (keep[i] === 1) m++;
  const out = new Int32Array(m);
  for (let i = 0, k = 0; i < n; i++) if (keep[i] === 1) out[k++] = i;
  return out;
}

/** Indices whose entry in `drop` (aligned with `indices`) is 0. */
function filterIndices(indices: Int32Array, drop: Uint8Array): Int32Array {
  let m = 0;
  for (let i = 0; i < indices.length; i++) if (drop[i] === 0) m++;
  const out = new Int32Array(m);
  for (let i = 0, k = 0; i < indices.length; i++) if (drop[i] === 0) out[k++] = int32At(indices, i);
  return out;
}

/**
 * Cleans raw rows (never mutated). Order of steps: drop rows without a finite time; sort by time
 * (ties by source line, so input order never matters) and keep the first row of each duplicated
 * time; calibrate; take GPS altitude when plausible, else altitude from pressure (hypsometric
 * integration anchored at the first pressure row, or the standard atmosphere); drop rows still
 * missing temperature or altitude, then rows outside 150–350 K or −500 m–60 km; drop GPS jumps;
 * drop temperature spikes (Hampel).
 */
export function cleanSamples(
  samples: readonly RawSample[],
  calibration: TemperatureCalibration,
  site: SiteInfo,
  params: AnalysisParameters,
): CleanResult {
  const removed: QcReport["removed"] = {
    preLaunch: 0, postLanding: 0, duplicateTimes: 0, gpsJumps: 0, temperatureSpikes: 0, missingValues: 0, outOfRange: 0,
  };
  const flags: string[] = [];
  const warnings: QcWarning[] = [];

  const timed: number[] = [];
  for (let i = 0; i < samples.length; i++) {
    if (Number.isFinite(sampleAt(samples, i).elapsedS)) timed.push(i);
    else removed.missingValues++;
  }
  let monotonic = true;
  let strictlyIncreasing = true;
  for (let k = 1; k < timed.length; k++) {
    const prev = sampleAt(samples, valueAt(timed, k - 1)).elapsedS;
    const cur = sampleAt(samples, valueAt(timed, k)).elapsedS;
    if (cur <= prev) strictlyIncreasing = false;
    if (cur < prev) {
      monotonic = false;
      break;
    }
  }
  // Sorting (with ties broken by source line) only when needed keeps the common case fast and
  // makes the kept row of a duplicated time independent of the input order.
  const order = strictlyIncreasing ? timed : timed.slice().sort((a, b) => {
    const sa = sampleAt(samples, a);
    const sb = sampleAt(samples, b);
    return sa.elapsedS - sb.elapsedS || num(sa.sourceLine) - num(sb.sourceLine) || a - b;
  });
  if (!monotonic) {
    flags.push("sorted-times");
    warnings.push({ code: "sorted-times", message: "Rows were not in time order and have been sorted by elapsed time." });
  }
  const unique: number[] = [];
  for (const idx of order) {
    const prev = unique[unique.length - 1];
    if (prev !== undefined && sampleAt(samples, prev).elapsedS === sampleAt(samples, idx).elapsedS) removed.duplicateTimes++;
    else unique.push(idx);
  }
  if (removed.duplicateTimes > 0) {
    warnings.push({ code: "duplicate-times", message: `${removed.duplicateTimes} rows repeated an earlier time and were dropped (the first row of each time is kept).` });
  }

  const n = unique.length;
  const elapsedS = new Float64Array(n);
  const gpsM = new Float64Array(n);
  const temperatureK = new Float64Array(n);
  const pressureHpa = new Float64Array(n);
  const rhPct = new Float64Array(n);
  const sourceLine = new Float64Array(n);
  let failedCalibration = 0;
  let hasPressure = false;
  let hasHumidity = false;
  let gpsCount = 0;
  let altitudeReadings = 0;
  let implausibleAltitudes = 0;
  let firstImplausibleLine = 0;
  for (let k = 0; k < n; k++) {
    const s = sampleAt(samples, valueAt(unique, k));
    elapsedS[k] = s.elapsedS;
    sourceLine[k] = Number.isFinite(s.sourceLine) ? s.sourceLine : 0;
    const raw = num(s.rawTemperature);
    const t = raw === raw ? calibrateReadingOrNaN(calibration, raw) : Number.NaN;
    if (raw === raw && t !== t) failedCalibration++;
    temperatureK[k] = t;
    const p = num(s.pressureHpa);
    pressureHpa[k] = p >= PRESSURE_RANGE_HPA.min && p <= PRESSURE_RANGE_HPA.max ? p : Number.NaN;
    if (pressureHpa[k] === pressureHpa[k]) hasPressure = true;
    const rh = num(s.relativeHumidityPct);
    rhPct[k] = rh >= 0 && rh <= 110 ? Math.min(rh, 100) : Number.NaN;
    if (rhPct[k] === rhPct[k]) hasHumidity = true;
    const z = num(s.altitudeM);
    if (z === z) altitudeReadings++;
    gpsM[k] = z >= ALTITUDE_RANGE_M.min && z <= ALTITUDE_RANGE_M.max ? z : Number.NaN;
    if (gpsM[k] === gpsM[k]) gpsCount++;
    else if (z === z) {
      if (implausibleAltitudes === 0) firstImplausibleLine = float64At(sourceLine, k);
      implausibleAltitudes++;
    }
  }
  const altitudeColumnImplausible = implausibleAltitudes >= Math.max(IMPLAUSIBLE_ALTITUDE_MIN_ROWS, IMPLAUSIBLE_ALTITUDE_SHARE * altitudeReadings);
  if (altitudeColumnImplausible) {
    flags.push("implausible-altitudes");
    warnings.push({
      code: "implausible-altitudes",
      message: `${implausibleAltitudes} of ${altitudeReadings} altitude readings (first at line ${firstImplausibleLine}) are outside −500 m to 60 km: check the altitude column and its unit. ${hasPressure ? "No altitude reading is used; all altitudes come from pressure." : "Those rows are dropped."} The flight is QC-flagged.`,
    });
    if (hasPressure) {
      gpsM.fill(Number.NaN);
      gpsCount = 0;
    }
  }
  if (failedCalibration > 0) {
    warnings.push({ code: "calibration-failures", message: `${failedCalibration} raw temperature readings could not be converted by the calibration and count as missing.` });
  }

  const altitudeM = Float64Array.from(gpsM);
  if (hasPressure && gpsCount < n) {
    let anchor = -1;
    for (let k = 0; k < n; k++) {
      if (float64At(pressureHpa, k) > 0 && float64At(temperatureK, k) > 0) {
        anchor = k;
        break;
      }
    }
    let anchorM = site.elevationM;
    if (anchor >= 0) {
      const gps = float64At(gpsM, anchor);
      const standardM = standardAtmosphereAltitudeForPressureM(float64At(pressureHpa, anchor));
      if (gps === gps) anchorM = gps;
      else if (standardM !== null && standardM > site.elevationM + 1000) {
        anchorM = standardM;
        warnings.push({ code: "started-aloft", message: "The first pressure reading is far below surface pressure; pressure altitudes start from the standard atmosphere." });
      }
    }
    const hypsometric = integrateHypsometricAltitudesM(pressureHpa, temperatureK, rhPct, anchor, anchorM);
    let fromPressure = 0;
    for (let k = 0; k < n; k++) {
      if (altitudeM[k] === altitudeM[k]) continue;
      let z = float64At(hypsometric, k);
      if (z !== z && pressureHpa[k] === pressureHpa[k]) z = standardAtmosphereAltitudeForPressureM(float64At(pressureHpa, k)) ?? Number.NaN;
      if (z === z) {
        altitudeM[k] = z;
        fromPressure++;
      }
    }
    if (fromPressure > 0) {
      flags.push("altitude-from-pressure");
      warnings.push({ code: "altitude-from-pressure", message: `${fromPressure} rows had no plausible GPS altitude; their altitude was derived from pressure.` });
    }
  }

  const keep = new Uint8Array(n);
  for (let k = 0; k < n; k++) {
    const s = sampleAt(samples, valueAt(unique, k));
    const t = float64At(temperatureK, k);
    const z = float64At(altitudeM, k);
    const rawZ = num(s.altitudeM);
    const tOut = t === t && (t < TEMPERATURE_RANGE_K.min || t > TEMPERATURE_RANGE_K.max);
    const zOut = z !== z && rawZ === rawZ && (rawZ < ALTITUDE_RANGE_M.min || rawZ > ALTITUDE_RANGE_M.max);
    if (tOut || zOut) removed.outOfRange++;
    else if (t !== t || z !== z) removed.missingValues++;
    else keep[k] = 1;
  }
  const full: CleanSeries = { n, elapsedS, altitudeM, temperatureK, pressureHpa, relativeHumidityPct: rhPct, sourceLine };
  if (removed.outOfRange > 0) {
    warnings.push({ code: "out-of-range", message: `${removed.outOfRange} rows had a temperature outside 150–350 K or an altitude outside −500 m to 60 km and were dropped.` });
  }
  if (removed.missingValues > 0) {
    warnings.push({ code: "missing-values", message: `${removed.missingValues} rows lacked a usable time, temperature or altitude and were dropped.` });
  }

  // The glitch filters work on the kept rows only; index lists avoid copying every column.
  let kept = indicesOf(keep, n);
  if (kept.length >= 3) {
    const jumps = altitudeJumpMask(gather(elapsedS, kept), gather(altitudeM, kept), params.maxVerticalSpeedMPerS, params.hampelWindowSamples);
    const before = kept.length;
    kept = filterIndices(kept, jumps);
    removed.gpsJumps = before - kept.length;
    if (removed.gpsJumps > 0) {
      warnings.push({ code: "gps-jumps", message: `${removed.gpsJumps} rows with implausible altitude jumps (faster than ${params.maxVerticalSpeedMPerS} m/s) were dropped.` });
    }
  }
  // Sensor faults are judged before the Hampel filter, which would keep one phase of an
  // alternating signal and so hide it. Alternation is judged on every calibrated reading, out of
  // range ones included (a sensor flipping to an impossible value every other row is faulty, not
  // half-usable); a stuck reading on the rows kept so far, which all have an altitude.
  const readable = new Uint8Array(n);
  for (let k = 0; k < n; k++) if (temperatureK[k] === temperatureK[k]) readable[k] = 1;
  const readings = indicesOf(readable, n);
  const alternating = readings.length >= 3 ? detectAlternatingTemperature(gather(temperatureK, readings)) : null;
  if (alternating) {
    flags.push("temperature-alternating");
    warnings.push({
      code: "temperature-alternating",
      message: `The temperature jumps up and down by 10 K or more from one row to the next at ${alternating.zigzagCount} rows (first at line ${sourceLine[int32At(readings, alternating.firstIndex)]}; longest run ${alternating.longestRun}): the sensor or its wiring looks faulty. The flight is QC-flagged and no tropopause is reported.`,
    });
  }
  if (kept.length >= 3) {
    const line = (k: number): number => float64At(sourceLine, int32At(kept, k));
    const stuck = detectStuckTemperature(gather(altitudeM, kept), gather(temperatureK, kept));
    if (stuck) {
      flags.push("temperature-stuck");
      warnings.push({
        code: "temperature-stuck",
        message: `The temperature reads ${stuck.temperatureK.toFixed(2)} K in ${stuck.sampleCount} consecutive rows (lines ${line(stuck.startIndex)}–${line(stuck.endIndex)}) while the altitude changes by ${Math.round(stuck.altitudeSpanM)} m${stuck.hiddenChangeK === null ? "" : ` (the readings hide a change of about ${stuck.hiddenChangeK.toFixed(1)} K)`}: the sensor looks stuck. The flight is QC-flagged and no tropopause is reported.`,
      });
    }
  }
  if (kept.length >= 3) {
    const spikes = hampelSpikeMask(gather(temperatureK, kept), params.hampelWindowSamples, params.hampelThresholdSigmas, HAMPEL_MIN_THRESHOLD_K);
    const before = kept.length;
    kept = filterIndices(kept, spikes);
    removed.temperatureSpikes = before - kept.length;
    if (removed.temperatureSpikes > 0) {
      warnings.push({ code: "temperature-spikes", message: `${removed.temperatureSpikes} temperature spikes were dropped by the Hampel filter.` });
    }
  }
  const series = compact(full, kept);
  return { series, removed, timeOrder: monotonic ? "monotonic" : "sorted", flags, warnings, hasPressure, hasHumidity };
}
