/**
 * Public contract of the Lapsebank analysis core. Everything here is plain data so that
 * results can be stored as JSON and compared across analysis versions.
 */

/** Bump whenever a change can alter any stored analysis result. */
export const ANALYSIS_VERSION = "1.3.0";

import type { BandSpec } from "./band-coverage";

// --- input ---

/** One parsed logger row; units already normalised by ingest. */
export interface RawSample {
  /** Seconds since the first row of the file. */
  elapsedS: number;
  /** GPS altitude above mean sea level, metres (geometric). */
  altitudeM: number | null;
  /** In the unit of TemperatureCalibration.input (counts, V, mV, °C, K, °F). */
  rawTemperature: number | null;
  pressureHpa: number | null;
  relativeHumidityPct: number | null;
  latitudeDeg: number | null;
  longitudeDeg: number | null;
  /** 1-based line in the raw file, for messages. */
  sourceLine: number;
}

/** ADC full-scale divisor: 2^N (classic AVR) or 2^N − 1 (others). */
export type AdcDivisor = "2^N" | "2^N-1";
export interface AdcSpec {
  bits: number;
  referenceV: number;
  divisor: AdcDivisor;
}

export type ThermistorEquation =
  | { kind: "steinhart-hart"; a: number; b: number; c: number }
  | { kind: "beta"; beta: number; r0Ohm: number; t0K: number };

export type SensorModel =
  /** V = offsetV + scaleMvPerK · T[K] / 1000; a 10 mV/K sensor has scale 10, offset 0. */
  | { kind: "linear-voltage"; scaleMvPerK: number; offsetV: number }
  /**
   * Thermistor in a voltage divider fed by supplyV with a fixed seriesOhm resistor.
   * "high": thermistor between supply and the measured node; "low": between node and ground.
   */
  | {
      kind: "thermistor-divider";
      supplyV: number;
      seriesOhm: number;
      thermistorSide: "high" | "low";
      equation: ThermistorEquation;
    }
  /** T[K] = Σ c_i · x^i, x = the raw reading (counts, V or whatever the column holds). */
  | { kind: "polynomial"; coefficients: number[] }
  /** Column already is a temperature (°C/K/°F per input). */
  | { kind: "direct" };

export type TemperatureInput = "counts" | "volts" | "millivolts" | "celsius" | "kelvin" | "fahrenheit";

export interface TemperatureCalibration {
  input: TemperatureInput;
  /** Required when input is counts and the sensor model needs volts. */
  adc?: AdcSpec;
  sensor: SensorModel;
  /** Two-point/field correction applied last: T' = gain · T + offsetK. */
  correction?: { gain: number; offsetK: number };
}

export interface SiteInfo {
  latitudeDeg: number;
  longitudeDeg: number;
  elevationM: number;
}

export interface AnalysisParameters {
  /** Altitude bin size, m. */
  binSizeM: number;
  /** Tropopause search starts above this altitude, m. */
  tropopauseSearchFloorM: number;
  /** First-order sensor-lag correction T_air = T_s + τ dT_s/dt. */
  lagCorrection: { enabled: boolean; timeConstantS: number };
  /** Moving-average window used before differentiating for the lag correction, s. */
  smoothingWindowS: number;
  /** Hampel filter half-window, samples. */
  hampelWindowSamples: number;
  /** Hampel threshold in robust sigmas (1.4826 · MAD). */
  hampelThresholdSigmas: number;
  /** GPS jump filter: larger vertical speeds between kept samples are rejected, m/s. */
  maxVerticalSpeedMPerS: number;
  /**
   * Inversion layers separated by a non-inversion stretch no thicker than this are merged, m.
   * At bin resolution a one-bin interruption counts as thinner than the threshold.
   */
  inversionMergeGapM: number;
  /** Inversions weaker than this (T(top) − T(base)) are ignored as noise, K. */
  inversionMinStrengthK: number;
  /**
   * Fixed altitude bands reported for every flight, m above their reference: above ground level
   * (the site's elevation) or above mean sea level.
   */
  fixedBandsM: BandSpec[];
}

export const DEFAULT_ANALYSIS_PARAMETERS: AnalysisParameters = {
  binSizeM: 100,
  tropopauseSearchFloorM: 5000,
  lagCorrection: { enabled: false, timeConstantS: 0 },
  smoothingWindowS: 5,
  hampelWindowSamples: 7,
  hampelThresholdSigmas: 3,
  maxVerticalSpeedMPerS: 60,
  inversionMergeGapM: 100,
  inversionMinStrengthK: 0.3,
  // The lowest band is the boundary layer, measured from the ground; the ones above compare the free
  // troposphere across sites at the same heights above sea level.
  fixedBandsM: [
    { baseM: 0, topM: 2000, reference: "agl" },
    { baseM: 2000, topM: 5000, reference: "msl" },
    { baseM: 5000, topM: 10000, reference: "msl" },
  ],
};

export interface FlightAnalysisInput {
  samples: readonly RawSample[];
  calibration: TemperatureCalibration;
  site: SiteInfo;
  parameters?: Partial<AnalysisParameters>;
}

// --- output ---

export type Phase = "ascent" | "descent";

export interface CalibratedSample {
  elapsedS: number;
  altitudeM: number;
  temperatureK: number;
  pressureHpa: number | null;
  relativeHumidityPct: number | null;
  phase: Phase;
  sourceLine: number;
}

export interface ProfileLevel {
  phase: Phase;
  baseM: number;
  topM: number;
  /** Mean altitude of the samples in the bin (the bin centre for a steady climb through a full bin), m. */
  altitudeM: number;
  sampleCount: number;
  temperatureK: number;
  temperatureSdK: number | null;
  pressureHpa: number | null;
  relativeHumidityPct: number | null;
}

export type StabilityClass = "absolutely-stable" | "conditionally-unstable" | "absolutely-unstable";
export type LayerKind = "surface-inversion" | "elevated-inversion" | "troposphere" | "stratosphere" | "band";

/** A band layer's band as asked, with the ground its AGL limits were measured from (null for MSL). */
export type LayerBand = BandSpec & { groundElevationM: number | null };

export interface LayerStat {
  kind: LayerKind;
  phase: Phase;
  /** Layer limits, m above mean sea level (for a band: its asked limits moved to MSL). */
  baseM: number;
  topM: number;
  /** Lowest and highest point the fit used, m above mean sea level. */
  fittedBaseM: number;
  fittedTopM: number;
  /** Band layers only: the band as asked; null for every other kind. */
  band: LayerBand | null;
  /** −dT/dz by ordinary least squares over the layer's levels, K/km. */
  lapseRateKPerKm: number;
  lapseRateStdErrKPerKm: number | null;
  rSquared: number | null;
  theilSenLapseRateKPerKm: number | null;
  levelCount: number;
  /** Inversions only: T(top) − T(base), K. */
  strengthK: number | null;
  meanTemperatureK: number;
  meanPressureHpa: number;
  /** True when meanPressureHpa came from the standard atmosphere, not from measurements. */
  pressureFromStandardAtmosphere: boolean;
  dryAdiabaticLapseRateKPerKm: number;
  moistAdiabaticLapseRateKPerKm: number;
  stability: StabilityClass;
}

export type TropopauseResult =
  | { status: "found"; altitudeM: number; temperatureK: number; pressureHpa: number | null }
  /** candidateAltitudeM: the lowest level that met the 2 K/km test but could not be confirmed. */
  | { status: "undetermined"; reason: string; candidateAltitudeM: number | null }
  | { status: "not-found" };

export interface QcWarning {
  code: string;
  message: string;
}

export interface QcReport {
  removed: {
    preLaunch: number;
    postLanding: number;
    duplicateTimes: number;
    gpsJumps: number;
    temperatureSpikes: number;
    missingValues: number;
    outOfRange: number;
  };
  /** "sorted" when rows had to be re-ordered (with a warning). */
  timeOrder: "monotonic" | "sorted";
  /** Short machine codes, e.g. "no-ascent", "few-levels", "sorted-times". */
  flags: string[];
  /** Human-readable, shown in the UI. */
  warnings: QcWarning[];
}

export interface FlightSummaryValues {
  /** The ground AGL heights are measured from: the site's elevation given to the analysis, m above mean sea level. */
  groundElevationM: number | null;
  launchElapsedS: number | null;
  burstElapsedS: number | null;
  landingElapsedS: number | null;
  launchAltitudeM: number | null;
  burstAltitudeM: number | null;
  maxAltitudeM: number | null;
  /** Lowest measured altitude from launch to the end of the record (not the lowest bin's base). */
  minAltitudeM: number | null;
  surfaceTemperatureK: number | null;
  troposphericLapseRateKPerKm: number | null;
  troposphericLapseRateStdErrKPerKm: number | null;
  tropopauseAltitudeM: number | null;
  tropopauseTemperatureK: number | null;
  tropopausePressureHpa: number | null;
  secondTropopauseAltitudeM: number | null;
  /** Null when there is no surface inversion (then hasSurfaceInversion is false). */
  surfaceInversionDepthM: number | null;
  surfaceInversionStrengthK: number | null;
  hasSurfaceInversion: boolean;
  stratosphericLapseRateKPerKm: number | null;
  hasDescent: boolean;
  hasPressure: boolean;
  hasHumidity: boolean;
  /** Dew point over water of the surface point (REFERENCE.md §14), K; null without humidity. */
  surfaceDewPointK: number | null;
  /** Lifting condensation level of the surface parcel, m above mean sea level (REFERENCE.md §15). */
  lclAltitudeM: number | null;
  /** Precipitable water up to the top of the humidity data, mm ≡ kg/m² (REFERENCE.md §17). */
  precipitableWaterMm: number | null;
  /** Saturated (cloud) layers on the ascent by the RH-threshold method (REFERENCE.md §16); null without humidity. */
  saturatedLayerCount: number | null;
  lowestSaturatedLayerBaseM: number | null;
  /** Lowest 0 °C crossing on the ascent, m above mean sea level, and how many crossings (REFERENCE.md §18). */
  freezingLevelAltitudeM: number | null;
  freezingLevelCount: number;
  /** Mixed-layer height above ground by the parcel method (Holzworth 1964), m (REFERENCE.md §19). */
  mixedLayerHeightM: number | null;
  /** Mixed-layer height above ground by the maximum θ gradient, m (REFERENCE.md §19). */
  mixedLayerHeightGradientM: number | null;
}

export interface FlightAnalysis {
  analysisVersion: string;
  parameters: AnalysisParameters;
  /** False when nothing usable came out (no ascent, empty input, invalid calibration…); warnings say why. */
  ok: boolean;
  samples: CalibratedSample[];
  levels: ProfileLevel[];
  layers: LayerStat[];
  /** From the ascent profile. */
  tropopause: { first: TropopauseResult; second: TropopauseResult };
  summary: FlightSummaryValues;
  qc: QcReport;
}

/** One problem found by validateCalibration. */
export interface CalibrationIssue {
  field: string;
  message: string;
}

export type CalibrationErrorCode =
  | "invalid-parameter"
  | "missing-adc"
  | "unsupported-input"
  | "too-few-points"
  | "singular-fit";

/** Thrown only by explicit calibration helpers (fits, strict checks); analyseFlight never throws it. */
export class CalibrationError extends Error {
  readonly code: CalibrationErrorCode;
  readonly field: string;
  constructor(code: CalibrationErrorCode, field: string, message: string) {
    super(message);
    this.name = "CalibrationError";
    this.code = code;
    this.field = field;
  }
}
