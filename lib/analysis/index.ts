/**
 * Lapsebank analysis core: one flight's raw rows → calibrated samples, binned levels, layer
 * statistics, tropopause and QC. Pure and deterministic (no clock, no randomness, no I/O).
 */
import { validateCalibration } from "./calibration";
import { cleanSamples, type CleanSeries } from "./clean";
import { binProfile } from "./binning";
import { correctSensorLag } from "./lag";
import { computePhaseLayers, type ProfilePoint } from "./layers";
import { HEIGHT_REFERENCES } from "./band-coverage";
import { detectFlightSegments } from "./segment";
import { findTropopauses } from "./tropopause";
import { dewPointK, findSaturatedLayers, liftingCondensationLevel, precipitableWater } from "./humidity";
import { freezingLevelsM, mixedLayerHeightGradient, mixedLayerHeightParcel } from "./boundary-layer";
import {
  ANALYSIS_VERSION,
  DEFAULT_ANALYSIS_PARAMETERS,
  type AnalysisParameters,
  type CalibratedSample,
  type FlightAnalysis,
  type FlightAnalysisInput,
  type FlightSummaryValues,
  type LayerStat,
  type Phase,
  type ProfileLevel,
  type QcReport,
  type QcWarning,
  type TropopauseResult,
} from "./types";

export * from "./types";
export * from "./units";
export * from "./constants";
export * from "./standard-atmosphere";
export * from "./bodies";
export * from "./reference-profiles";
export * from "./moisture";
export * from "./stability";
export * from "./altitude";
export * from "./calibration";
export * from "./regression";
export * from "./filters";
export * from "./segment";
export * from "./lag";
export * from "./binning";
export * from "./tropopause";
export * from "./layers";
export * from "./band-coverage";
export * from "./humidity";
export * from "./boundary-layer";
export { cleanSamples, TEMPERATURE_RANGE_K, ALTITUDE_RANGE_M } from "./clean";

/** Ascent samples within this height above launch give the surface temperature, m [P]. */
const SURFACE_LAYER_M = 20;
/** Fewer ascent levels than this are flagged "few-levels" (the analysis still runs from 3). */
const FEW_LEVELS = 10;

const finiteOr = (value: unknown, fallback: number, check: (v: number) => boolean): number =>
  typeof value === "number" && Number.isFinite(value) && check(value) ? value : fallback;

/**
 * Merges caller parameters over DEFAULT_ANALYSIS_PARAMETERS; any value that is not finite or
 * outside its sensible range falls back to the default with a warning.
 */
export function resolveAnalysisParameters(partial: Partial<AnalysisParameters> | undefined): {
  parameters: AnalysisParameters;
  warnings: QcWarning[];
} {
  const d = DEFAULT_ANALYSIS_PARAMETERS;
  const p = partial ?? {};
  const warnings: QcWarning[] = [];
  const pick = (name: keyof AnalysisParameters, value: unknown, fallback: number, check: (v: number) => boolean): number => {
    if (value === undefined) return fallback;
    const v = finiteOr(value, fallback, check);
    if (v !== value) warnings.push({ code: "invalid-parameter", message: `Parameter ${name} was invalid; the default ${fallback} is used.` });
    return v;
  };
  const lag = p.lagCorrection ?? d.lagCorrection;
  const timeConstantS = pick("lagCorrection", lag.timeConstantS, d.lagCorrection.timeConstantS, (v) => v >= 0 && v <= 600);
  const bands = (p.fixedBandsM ?? d.fixedBandsM).filter(
    (b) => Number.isFinite(b.baseM) && Number.isFinite(b.topM) && b.topM > b.baseM && (HEIGHT_REFERENCES as readonly string[]).includes(b.reference),
  );
  if (p.fixedBandsM && bands.length !== p.fixedBandsM.length) {
    warnings.push({ code: "invalid-parameter", message: "Some fixed bands were invalid (top must be above base, reference agl or msl) and were ignored." });
  }
  return {
    parameters: {
      binSizeM: pick("binSizeM", p.binSizeM, d.binSizeM, (v) => v >= 1 && v <= 5000),
      tropopauseSearchFloorM: pick("tropopauseSearchFloorM", p.tropopauseSearchFloorM, d.tropopauseSearchFloorM, (v) => v >= -500 && v <= 60000),
      lagCorrection: { enabled: lag.enabled === true && timeConstantS > 0, timeConstantS },
      smoothingWindowS: pick("smoothingWindowS", p.smoothingWindowS, d.smoothingWindowS, (v) => v >= 0 && v <= 600),
      hampelWindowSamples: Math.round(pick("hampelWindowSamples", p.hampelWindowSamples, d.hampelWindowSamples, (v) => v >= 1 && v <= 1000)),
      hampelThresholdSigmas: pick("hampelThresholdSigmas", p.hampelThresholdSigmas, d.hampelThresholdSigmas, (v) => v > 0 && v <= 100),
      maxVerticalSpeedMPerS: pick("maxVerticalSpeedMPerS", p.maxVerticalSpeedMPerS, d.maxVerticalSpeedMPerS, (v) => v > 0 && v <= 1000),
      inversionMergeGapM: pick("inversionMergeGapM", p.inversionMergeGapM, d.inversionMergeGapM, (v) => v >= 0 && v <= 10000),
      inversionMinStrengthK: pick("inversionMinStrengthK", p.inversionMinStrengthK, d.inversionMinStrengthK, (v) => v >= 0 && v <= 100),
      fixedBandsM: bands.map((b) => ({ baseM: b.baseM, topM: b.topM, reference: b.reference })),
    },
    warnings,
  };
}

function emptySummary(groundElevationM: number | null = null): FlightSummaryValues {
  return {
    groundElevationM,
    launchElapsedS: null, burstElapsedS: null, landingElapsedS: null, launchAltitudeM: null, burstAltitudeM: null,
    maxAltitudeM: null, minAltitudeM: null, surfaceTemperatureK: null, troposphericLapseRateKPerKm: null, troposphericLapseRateStdErrKPerKm: null,
    tropopauseAltitudeM: null, tropopauseTemperatureK: null, tropopausePressureHpa: null, secondTropopauseAltitudeM: null,
    surfaceInversionDepthM: null, surfaceInversionStrengthK: null, hasSurfaceInversion: false,
    stratosphericLapseRateKPerKm: null, hasDescent: false, hasPressure: false, hasHumidity: false,
    surfaceDewPointK: null, lclAltitudeM: null, precipitableWaterMm: null, saturatedLayerCount: null, lowestSaturatedLayerBaseM: null,
    freezingLevelAltitudeM: null, freezingLevelCount: 0, mixedLayerHeightM: null, mixedLayerHeightGradientM: null,
  };
}

function emptyRemoved(): QcReport["removed"] {
  return { preLaunch: 0, postLanding: 0, duplicateTimes: 0, gpsJumps: 0, temperatureSpikes: 0, missingValues: 0, outOfRange: 0 };
}

function failed(parameters: AnalysisParameters, qc: QcReport, summary: FlightSummaryValues = emptySummary()): FlightAnalysis {
  return {
    analysisVersion: ANALYSIS_VERSION,
    parameters,
    ok: false,
    samples: [],
    levels: [],
    layers: [],
    tropopause: { first: { status: "not-found" }, second: { status: "not-found" } },
    summary,
    qc,
  };
}

/** Mean temperature of samples from..to−1 within SURFACE_LAYER_M of the reference altitude. */
function surfacePoint(series: CleanSeries, from: number, to: number, groundM: number): ProfilePoint | null {
  let sumT = 0;
  let sumP = 0;
  let countP = 0;
  let n = 0;
  for (let i = from; i < to; i++) {
    if ((series.altitudeM[i] as number) - groundM > SURFACE_LAYER_M) continue;
    sumT += series.temperatureK[i] as number;
    const p = series.pressureHpa[i] as number;
    if (p === p) {
      sumP += p;
      countP++;
    }
    n++;
  }
  if (n === 0) return null;
  return { altitudeM: groundM, temperatureK: sumT / n, pressureHpa: countP === n ? sumP / countP : null };
}

const nullable = (v: number): number | null => (Number.isFinite(v) ? v : null);

/** Mean relative humidity of the samples the surface point uses; null unless every one has humidity. */
function surfaceRelativeHumidityPct(series: CleanSeries, from: number, to: number, groundM: number): number | null {
  let sum = 0;
  let n = 0;
  for (let i = from; i < to; i++) {
    if ((series.altitudeM[i] as number) - groundM > SURFACE_LAYER_M) continue;
    const rh = series.relativeHumidityPct[i] as number;
    if (rh !== rh) return null;
    sum += rh;
    n++;
  }
  return n === 0 ? null : sum / n;
}

/** Humidity, freezing-level and mixed-layer quantities of the ascent (REFERENCE.md §14–§19). */
function moistAndMixedLayer(
  ascentLevels: readonly ProfileLevel[],
  surface: ProfilePoint | null,
  surfaceRhPct: number | null,
  warnings: QcWarning[],
  flags: string[],
): Partial<FlightSummaryValues> {
  const out: Partial<FlightSummaryValues> = {};
  const freezing = freezingLevelsM(ascentLevels);
  out.freezingLevelAltitudeM = freezing[0] ?? null;
  out.freezingLevelCount = freezing.length;
  if (freezing.length > 1) warnings.push({ code: "several-freezing-levels", message: `The ascent crosses 0 °C ${freezing.length} times; the lowest crossing is reported.` });
  let standardPressureUsed = false;
  if (surface) {
    const parcel = mixedLayerHeightParcel(surface, ascentLevels);
    const gradient = mixedLayerHeightGradient(surface, ascentLevels);
    out.mixedLayerHeightM = parcel === null ? null : nullable(parcel.heightM);
    out.mixedLayerHeightGradientM = gradient === null ? null : nullable(gradient.heightM);
    standardPressureUsed ||= (parcel?.pressureFromStandardAtmosphere ?? false) || (gradient?.pressureFromStandardAtmosphere ?? false);
  }
  if (surface && surfaceRhPct !== null) {
    const td = dewPointK(surface.temperatureK, surfaceRhPct);
    out.surfaceDewPointK = td === null ? null : nullable(td);
    const lcl = td === null ? null : liftingCondensationLevel(surface.temperatureK, td);
    out.lclAltitudeM = lcl === null ? null : nullable(surface.altitudeM + lcl.heightM);
  }
  const withHumidity = ascentLevels.filter((l) => l.relativeHumidityPct !== null);
  if (withHumidity.length > 0) {
    const saturated = findSaturatedLayers(ascentLevels);
    out.saturatedLayerCount = saturated.length;
    out.lowestSaturatedLayerBaseM = saturated[0]?.baseM ?? null;
    const pw = precipitableWater(ascentLevels);
    out.precipitableWaterMm = pw === null ? null : nullable(pw.valueMm);
    standardPressureUsed ||= pw?.pressureFromStandardAtmosphere ?? false;
  }
  if (standardPressureUsed) {
    flags.push("standard-atmosphere-pressure");
    warnings.push({
      code: "standard-atmosphere-pressure",
      message: "Levels without measured pressure: potential temperature (mixed-layer height) and precipitable water use the standard-atmosphere pressure of each altitude.",
    });
  }
  return out;
}

/** QC flags of a faulty temperature sensor: a tropopause found in such a profile does not count. */
export const SENSOR_FAULT_FLAGS: readonly string[] = ["temperature-stuck", "temperature-alternating"];

/**
 * A found tropopause becomes "undetermined" (its altitude kept as the candidate) when the
 * temperature sensor looked stuck or alternating: an isothermal stretch or a kink made by the
 * fault would otherwise pass the WMO test.
 */
function distrustTropopause(result: TropopauseResult, faults: readonly string[]): TropopauseResult {
  if (faults.length === 0 || result.status !== "found") return result;
  return { status: "undetermined", reason: `the temperature sensor looks faulty (${faults.join(", ")})`, candidateAltitudeM: result.altitudeM };
}

function analyse(input: FlightAnalysisInput): FlightAnalysis {
  const { parameters, warnings: parameterWarnings } = resolveAnalysisParameters(input.parameters);
  const qc: QcReport = { removed: emptyRemoved(), timeOrder: "monotonic", flags: [], warnings: [...parameterWarnings] };
  // AGL heights (fixed bands) are measured from the site's elevation, the ground the run records.
  const groundElevationM = nullable(input.site.elevationM);
  const issues = validateCalibration(input.calibration);
  if (issues.length > 0) {
    qc.flags.push("invalid-calibration");
    for (const issue of issues) qc.warnings.push({ code: "invalid-calibration", message: `Calibration ${issue.field}: ${issue.message}.` });
    return failed(parameters, qc, emptySummary(groundElevationM));
  }
  if (input.samples.length === 0) {
    qc.flags.push("empty-input");
    qc.warnings.push({ code: "empty-input", message: "The file contains no data rows." });
    return failed(parameters, qc, emptySummary(groundElevationM));
  }

  const cleaned = cleanSamples(input.samples, input.calibration, input.site, parameters);
  qc.removed = cleaned.removed;
  qc.timeOrder = cleaned.timeOrder;
  qc.flags.push(...cleaned.flags);
  qc.warnings.push(...cleaned.warnings);
  const series = cleaned.series;
  const summary = emptySummary(groundElevationM);
  summary.hasPressure = cleaned.hasPressure;
  summary.hasHumidity = cleaned.hasHumidity;

  const binM = parameters.binSizeM;
  const segments = detectFlightSegments(series.elapsedS, series.altitudeM, Math.max(3 * binM, 150));
  if (!segments) {
    qc.flags.push("no-ascent");
    qc.warnings.push({
      code: "no-ascent",
      message: series.n < 3
        ? `Only ${series.n} usable rows remain after cleaning; a flight needs a sustained climb.`
        : "No sustained climb was found (the altitude never rose and stayed more than 30 m above the start).",
    });
    return failed(parameters, qc, summary);
  }
  const { launchIndex, burstIndex, landingIndex } = segments;
  const endIndex = landingIndex ?? series.n - 1;
  qc.removed.preLaunch = launchIndex;
  qc.removed.postLanding = series.n - 1 - endIndex;
  if (landingIndex === null) qc.flags.push("no-landing");

  let temperatureK = series.temperatureK;
  if (parameters.lagCorrection.enabled) {
    const corrected = correctSensorLag(series.elapsedS, series.temperatureK, launchIndex, endIndex + 1, parameters.lagCorrection.timeConstantS, parameters.smoothingWindowS);
    temperatureK = Float64Array.from(series.temperatureK);
    temperatureK.set(corrected, launchIndex);
    qc.flags.push("lag-corrected");
  }

  const samples: CalibratedSample[] = [];
  for (let i = launchIndex; i <= endIndex; i++) {
    const p = series.pressureHpa[i] as number;
    const rh = series.relativeHumidityPct[i] as number;
    samples.push({
      elapsedS: series.elapsedS[i] as number,
      altitudeM: series.altitudeM[i] as number,
      temperatureK: temperatureK[i] as number,
      pressureHpa: p === p ? p : null,
      relativeHumidityPct: rh === rh ? rh : null,
      phase: i <= burstIndex ? "ascent" : "descent",
      sourceLine: series.sourceLine[i] as number,
    });
  }

  const bin = (phase: Phase, from: number, to: number): ProfileLevel[] =>
    binProfile(phase, series.altitudeM, temperatureK, series.pressureHpa, series.relativeHumidityPct, from, to, binM);
  const ascentLevels = bin("ascent", launchIndex, burstIndex + 1);
  const descentLevels = endIndex > burstIndex ? bin("descent", burstIndex + 1, endIndex + 1) : [];
  const descentDropM = endIndex > burstIndex ? (series.altitudeM[burstIndex] as number) - (series.altitudeM[endIndex] as number) : 0;
  const hasDescent = descentLevels.length >= 3 && descentDropM >= 3 * binM;

  const launchAltitudeM = segments.launchAltitudeM;
  const seriesView = { ...series, temperatureK };
  const sensorFaults = SENSOR_FAULT_FLAGS.filter((f) => qc.flags.includes(f));
  const foundTropopause = findTropopauses(ascentLevels, parameters.tropopauseSearchFloorM);
  const tropopause = { first: distrustTropopause(foundTropopause.first, sensorFaults), second: distrustTropopause(foundTropopause.second, sensorFaults) };
  const ascent = computePhaseLayers({
    phase: "ascent",
    levels: ascentLevels,
    surface: surfacePoint(seriesView, launchIndex, burstIndex + 1, launchAltitudeM),
    tropopause: tropopause.first,
    fixedBandsM: parameters.fixedBandsM,
    groundElevationM,
    binSizeM: binM,
    inversionMergeGapM: parameters.inversionMergeGapM,
    inversionMinStrengthK: parameters.inversionMinStrengthK,
  });
  const layers: LayerStat[] = [...ascent.layers];
  qc.warnings.push(...ascent.warnings);
  if (hasDescent) {
    const descentTropopause = distrustTropopause(findTropopauses(descentLevels, parameters.tropopauseSearchFloorM).first, sensorFaults);
    const landingAltitudeM = landingIndex !== null ? (series.altitudeM[landingIndex] as number) : null;
    const descent = computePhaseLayers({
      phase: "descent",
      levels: descentLevels,
      surface: landingAltitudeM === null ? null : surfacePoint(seriesView, burstIndex + 1, endIndex + 1, landingAltitudeM),
      tropopause: descentTropopause,
      fixedBandsM: parameters.fixedBandsM,
      groundElevationM,
      binSizeM: binM,
      inversionMergeGapM: parameters.inversionMergeGapM,
      inversionMinStrengthK: parameters.inversionMinStrengthK,
    });
    layers.push(...descent.layers);
  }

  const ok = ascentLevels.length >= 3;
  if (!ok) {
    qc.flags.push("few-levels");
    qc.warnings.push({ code: "few-levels", message: `The ascent yields only ${ascentLevels.length} altitude levels; at least 3 are needed.` });
  } else if (ascentLevels.length < FEW_LEVELS) {
    qc.flags.push("few-levels");
    qc.warnings.push({ code: "few-levels", message: `The ascent yields only ${ascentLevels.length} altitude levels; results are rough.` });
  }
  if (tropopause.first.status === "not-found") qc.flags.push("no-tropopause");
  if (tropopause.first.status === "undetermined") {
    qc.flags.push("tropopause-undetermined");
    qc.warnings.push({ code: "tropopause-undetermined", message: `Tropopause undetermined: ${tropopause.first.reason}.` });
  }
  if (Math.abs(launchAltitudeM - input.site.elevationM) > 200) {
    qc.flags.push("site-elevation-mismatch");
    qc.warnings.push({
      code: "site-elevation-mismatch",
      message: `The launch altitude (${Math.round(launchAltitudeM)} m) differs from the site elevation (${Math.round(input.site.elevationM)} m) by more than 200 m.`,
    });
  }

  const troposphere = ascent.layers.find((l) => l.kind === "troposphere");
  const stratosphere = ascent.layers.find((l) => l.kind === "stratosphere");
  let maxAltitudeM = -Infinity;
  let minAltitudeM = Infinity;
  for (let i = launchIndex; i <= endIndex; i++) {
    maxAltitudeM = Math.max(maxAltitudeM, series.altitudeM[i] as number);
    minAltitudeM = Math.min(minAltitudeM, series.altitudeM[i] as number);
  }
  const surface = surfacePoint(seriesView, launchIndex, burstIndex + 1, launchAltitudeM);
  const first: TropopauseResult = tropopause.first;
  const second: TropopauseResult = tropopause.second;
  Object.assign(summary, {
    launchElapsedS: series.elapsedS[launchIndex] as number,
    burstElapsedS: series.elapsedS[burstIndex] as number,
    landingElapsedS: landingIndex === null ? null : (series.elapsedS[landingIndex] as number),
    launchAltitudeM,
    burstAltitudeM: series.altitudeM[burstIndex] as number,
    maxAltitudeM: nullable(maxAltitudeM),
    minAltitudeM: nullable(minAltitudeM),
    surfaceTemperatureK: surface?.temperatureK ?? ascentLevels[0]?.temperatureK ?? null,
    troposphericLapseRateKPerKm: troposphere?.lapseRateKPerKm ?? null,
    troposphericLapseRateStdErrKPerKm: troposphere?.lapseRateStdErrKPerKm ?? null,
    tropopauseAltitudeM: first.status === "found" ? first.altitudeM : null,
    tropopauseTemperatureK: first.status === "found" ? first.temperatureK : null,
    tropopausePressureHpa: first.status === "found" ? first.pressureHpa : null,
    secondTropopauseAltitudeM: second.status === "found" ? second.altitudeM : null,
    surfaceInversionDepthM: ascent.surfaceInversion?.depthM ?? null,
    surfaceInversionStrengthK: ascent.surfaceInversion?.strengthK ?? null,
    hasSurfaceInversion: ascent.surfaceInversion !== null,
    stratosphericLapseRateKPerKm: stratosphere?.lapseRateKPerKm ?? null,
    hasDescent,
  } satisfies Partial<FlightSummaryValues>);
  Object.assign(
    summary,
    moistAndMixedLayer(ascentLevels, surface, surfaceRelativeHumidityPct(series, launchIndex, burstIndex + 1, launchAltitudeM), qc.warnings, qc.flags),
  );

  return {
    analysisVersion: ANALYSIS_VERSION,
    parameters,
    ok,
    samples,
    levels: [...ascentLevels, ...(hasDescent ? descentLevels : [])],
    layers,
    tropopause,
    summary,
    qc,
  };
}

/**
 * Analyses one flight: clean → segment → (optional lag correction) → bin → tropopause → layers →
 * summary. Never throws: invalid calibration, empty or unusable input give ok: false with
 * warnings; numbers in the result are always finite (null where a value is unavailable).
 * Deterministic: the same input (in any row order) gives the same result.
 */
export function analyseFlight(input: FlightAnalysisInput): FlightAnalysis {
  try {
    return analyse(input);
  } catch (error) {
    const { parameters } = resolveAnalysisParameters(undefined);
    const message = error instanceof Error ? error.message : String(error);
    return failed(parameters, {
      removed: emptyRemoved(),
      timeOrder: "monotonic",
      flags: ["internal-error"],
      warnings: [{ code: "internal-error", message: `The analysis stopped on an unexpected error: ${message}` }],
    });
  }
}
