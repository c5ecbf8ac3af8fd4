import { medianInPlace } from "./regression";
import { float64At } from "./typed-arrays";

/**
 * Robust glitch filters on time series held in typed arrays: a sliding median, the Hampel
 * spike filter and a GPS altitude-jump filter. Inputs are never modified.
 */

/**
 * Median of values[i − h … i + h] (clipped at the ends) for every i, using a sorted sliding
 * window (O(n·h)). Values must be finite.
 */
export function rollingMedian(values: Float64Array, halfWindow: number): Float64Array {
  const n = values.length;
  const h = Math.max(0, Math.floor(halfWindow));
  const out = new Float64Array(n);
  const window = new Float64Array(2 * h + 1);
  let size = 0;
  let lo = 0;
  let hi = -1;
  for (let i = 0; i < n; i++) {
    const newHi = Math.min(n - 1, i + h);
    const newLo = Math.max(0, i - h);
    // Once the window is full, one value leaves and one enters: overwrite the leaving value and
    // restore order by shifting (cheap for the small windows used here).
    while (lo < newLo && hi < newHi) {
      const leaving = float64At(values, lo++);
      const entering = float64At(values, ++hi);
      let k = 0;
      while (float64At(window, k) !== leaving) k++;
      while (k > 0 && float64At(window, k - 1) > entering) {
        window[k] = float64At(window, k - 1);
        k--;
      }
      while (k < size - 1 && float64At(window, k + 1) < entering) {
        window[k] = float64At(window, k + 1);
        k++;
      }
      window[k] = entering;
    }
    while (lo < newLo) {
      const leaving = float64At(values, lo++);
      let k = 0;
      while (float64At(window, k) !== leaving) k++;
      for (; k < size - 1; k++) window[k] = float64At(window, k + 1);
      size--;
    }
    while (hi < newHi) {
      const entering = float64At(values, ++hi);
      let k = size;
      while (k > 0 && float64At(window, k - 1) > entering) {
        window[k] = float64At(window, k - 1);
        k--;
      }
      window[k] = entering;
      size++;
    }
    const mid = size >> 1;
    out[i] = size % 2 === 1 ? float64At(window, mid) : (float64At(window, mid - 1) + float64At(window, mid)) / 2;
  }
  return out;
}

/** 1/Φ⁻¹(3/4): scales the median absolute deviation to a Gaussian standard deviation. */
const MAD_TO_SIGMA = 1.4826;

/**
 * Hampel filter (Hampel 1974; Pearson 2002): sample i is a spike when
 * |x_i − median| > max(k·1.4826·MAD, minThreshold, 3·step) over the window i ± h, where step is
 * the smallest non-zero change between neighbouring samples in the window: the reading's
 * resolution. The floors stop quantised records (an ADC count is ~0.5 K on a 10-bit, 10 mV/K
 * logger; MAD is then often 0) from flagging ordinary one- or two-count steps [P].
 * Returns a mask, 1 = spike.
 */
export function hampelSpikeMask(
  values: Float64Array,
  halfWindow: number,
  thresholdSigmas: number,
  minThreshold: number,
): Uint8Array {
  const n = values.length;
  const h = Math.max(1, Math.floor(halfWindow));
  const mask = new Uint8Array(n);
  if (n < 3) return mask;
  const medians = rollingMedian(values, h);
  const scratch = new Float64Array(2 * h + 1);
  for (let i = 0; i < n; i++) {
    const deviation = Math.abs(float64At(values, i) - float64At(medians, i));
    // Cheap rejection first: most samples sit within the floor and need no MAD.
    if (deviation <= minThreshold) continue;
    const lo = Math.max(0, i - h);
    const hi = Math.min(n - 1, i + h);
    const count = hi - lo + 1;
    const med = float64At(medians, i);
    for (let j = lo; j <= hi; j++) scratch[j - lo] = Math.abs(float64At(values, j) - med);
    const mad = medianInPlace(scratch, count);
    let step = Number.POSITIVE_INFINITY;
    for (let j = lo + 1; j <= hi; j++) {
      const change = Math.abs(float64At(values, j) - float64At(values, j - 1));
      if (change > 1e-9 && change < step) step = change;
    }
    const resolutionFloor = Number.isFinite(step) ? 3 * step : 0;
    if (deviation > Math.max(thresholdSigmas * MAD_TO_SIGMA * mad, minThreshold, resolutionFloor)) mask[i] = 1;
  }
  return mask;
}

/**
 * GPS altitude jumps, two passes [P]. (1) Against the sliding median of ±h samples: a real climb
 * at ≤ maxV cannot put a sample further from the median than maxV times the window's time span.
 * (2) Sequentially against the last kept sample: |Δz| > maxV·Δt + noiseM is a jump. A run of
 * more than maxRun consecutive rejections is accepted as a genuine level shift so that one bad
 * anchor cannot discard the rest of the flight. Returns a mask, 1 = jump.
 */
export function altitudeJumpMask(
  elapsedS: Float64Array,
  altitudeM: Float64Array,
  maxVerticalSpeedMPerS: number,
  halfWindow: number,
  noiseM = 20,
  maxRun = 10,
): Uint8Array {
  const n = altitudeM.length;
  const mask = new Uint8Array(n);
  if (n < 3) return mask;
  const h = Math.max(1, Math.floor(halfWindow));
  const medians = rollingMedian(altitudeM, h);
  for (let i = 0; i < n; i++) {
    const lo = Math.max(0, i - h);
    const hi = Math.min(n - 1, i + h);
    const t = float64At(elapsedS, i);
    const spanS = Math.max(t - float64At(elapsedS, lo), float64At(elapsedS, hi) - t);
    if (Math.abs(float64At(altitudeM, i) - float64At(medians, i)) > maxVerticalSpeedMPerS * spanS + noiseM) mask[i] = 1;
  }
  let last = -1;
  let run = 0;
  for (let i = 0; i < n; i++) {
    if (mask[i] === 1) continue;
    if (last < 0) {
      last = i;
      continue;
    }
    const dt = float64At(elapsedS, i) - float64At(elapsedS, last);
    const dz = Math.abs(float64At(altitudeM, i) - float64At(altitudeM, last));
    if (dz > maxVerticalSpeedMPerS * dt + noiseM && run < maxRun) {
      mask[i] = 1;
      run++;
    } else {
      last = i;
      run = 0;
    }
  }
  return mask;
}

/** Two readings closer than this are the same reading (calibrated values of one raw count), K. */
const SAME_READING_K = 1e-9;

/** A run of identical temperature readings that a working sensor would not produce. */
export interface StuckTemperatureSpan {
  /** First and last index of the run in the input arrays. */
  startIndex: number;
  endIndex: number;
  sampleCount: number;
  /** The repeated reading, K. */
  temperatureK: number;
  /** max − min altitude over the run, m. */
  altitudeSpanM: number;
  /**
   * The change the run hid, K: the jump back to the air's temperature when readings resume, or,
   * for a run to the end of the record, the lapse rate below the run times its altitude span.
   * Null for a record of one reading.
   */
  hiddenChangeK: number | null;
}

export interface StuckTemperatureOptions {
  /** Fewest consecutive identical readings that can count as stuck [P]. */
  minSamples: number;
  /** Least altitude covered by the run, m [P]. */
  minAltitudeSpanM: number;
  /** A whole record of one reading must cover at least this much altitude, m [P]. */
  minConstantSpanM: number;
  /** The rest of the record must show the sensor's noise: this share of its successive changes reverse direction [P]. */
  minReversalShare: number;
  /** The hidden change must be at least this many reading steps at the run's value [P]… */
  minHiddenSteps: number;
  /** …and at least this many kelvin [P]. */
  minHiddenChangeK: number;
  /** Depth of profile below a run to the end of the record whose lapse rate predicts the run's change, m [P]. */
  lapseDepthBelowM: number;
}

/**
 * [P] A live sensor at 1–2 s steps shows count-level noise; 30 identical readings in a row over
 * 500 m of climb are not noise when the readings, once they resume, have moved by three counts or
 * more. A whole record of one reading over 2 km is impossible in air that cools by about 6.5 K/km
 * (13 K over 2 km, many logger counts).
 */
export const DEFAULT_STUCK_TEMPERATURE_OPTIONS: StuckTemperatureOptions = {
  minSamples: 30,
  minAltitudeSpanM: 500,
  minConstantSpanM: 2000,
  minReversalShare: 0.2,
  minHiddenSteps: 3,
  minHiddenChangeK: 1,
  lapseDepthBelowM: 2000,
};

/** Readings after a run whose median stands for where the sensor resumed. */
const RESUME_SAMPLES = 5;

/**
 * A stuck or constant temperature sensor [P]: the run of identical readings (same value to
 * 1e-9 K) over the widest altitude span that passes these tests:
 * - ≥ minSamples readings over ≥ minAltitudeSpanM of altitude (the balloon moved, the reading did not);
 * - a record of that one reading only: ≥ minConstantSpanM of altitude;
 * - otherwise the rest of the record shows a live, noisy sensor (≥ minReversalShare of its
 *   successive non-zero changes reverse direction), and the change the run hid is ≥ minHiddenSteps
 *   reading steps (the gap from the run's value to the nearest other reading: a thermistor's step
 *   grows in the cold) and ≥ minHiddenChangeK. The hidden change is the jump to the median of the
 *   next RESUME_SAMPLES readings when the record goes on (a quantised reading of real air leaves
 *   its value by one step, a stuck one jumps to where the air now is), else the lapse rate of the
 *   lapseDepthBelowM of profile below the run times the run's altitude span.
 * The noise test keeps noiseless model profiles (the isothermal 11–20 km of the 1976 standard
 * atmosphere reads exactly one value) from counting; the step test keeps a coarse logger's long
 * stays on one count (at the cold turning point of a tropopause, say) from counting. Inputs must
 * be finite and aligned; they are never modified.
 */
export function detectStuckTemperature(
  altitudeM: Float64Array,
  temperatureK: Float64Array,
  options: StuckTemperatureOptions = DEFAULT_STUCK_TEMPERATURE_OPTIONS,
): StuckTemperatureSpan | null {
  const n = temperatureK.length;
  if (n < options.minSamples) return null;
  // Record-wide facts, computed once so that many candidate runs cost little each.
  let context: RecordContext | null = null;
  let best: StuckTemperatureSpan | null = null;
  for (let start = 0; start < n; ) {
    const value = float64At(temperatureK, start);
    let end = start;
    let zMin = float64At(altitudeM, start);
    let zMax = zMin;
    while (end + 1 < n && Math.abs(float64At(temperatureK, end + 1) - value) <= SAME_READING_K) {
      end++;
      const z = float64At(altitudeM, end);
      if (z < zMin) zMin = z;
      if (z > zMax) zMax = z;
    }
    const count = end - start + 1;
    const spanM = zMax - zMin;
    if (count >= options.minSamples && spanM >= options.minAltitudeSpanM && (best === null || spanM > best.altitudeSpanM)) {
      context ??= recordContext(temperatureK);
      const hidden = hiddenChange(altitudeM, temperatureK, start, end, spanM, context, options);
      if (hidden.stuck) best = { startIndex: start, endIndex: end, sampleCount: count, temperatureK: value, altitudeSpanM: spanM, hiddenChangeK: hidden.changeK };
    }
    start = end + 1;
  }
  return best;
}

interface RecordContext {
  /** Successive non-zero changes (identical readings skipped) and how many of them reverse direction. */
  pairs: number;
  reversals: number;
  /** The distinct readings, ascending. */
  distinctK: Float64Array;
}

function recordContext(temperatureK: Float64Array): RecordContext {
  let previousChange = 0;
  let pairs = 0;
  let reversals = 0;
  for (let i = 1; i < temperatureK.length; i++) {
    const change = float64At(temperatureK, i) - float64At(temperatureK, i - 1);
    if (Math.abs(change) <= SAME_READING_K) continue;
    if (previousChange !== 0) {
      pairs++;
      if (Math.sign(change) !== Math.sign(previousChange)) reversals++;
    }
    previousChange = change;
  }
  const sorted = Float64Array.from(temperatureK).sort();
  let m = 0;
  for (let i = 0; i < sorted.length; i++) {
    if (m === 0 || float64At(sorted, i) - float64At(sorted, m - 1) > SAME_READING_K) sorted[m++] = float64At(sorted, i);
  }
  return { pairs, reversals, distinctK: sorted.subarray(0, m) };
}

/** Gap from `value` (one of the readings) to the nearest other reading: the reading step there. */
function stepAt(distinctK: Float64Array, value: number): number {
  let lo = 0;
  let hi = distinctK.length - 1;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (float64At(distinctK, mid) < value - SAME_READING_K) lo = mid + 1;
    else hi = mid;
  }
  const below = lo > 0 ? value - float64At(distinctK, lo - 1) : Number.POSITIVE_INFINITY;
  const above = lo + 1 < distinctK.length ? float64At(distinctK, lo + 1) - value : Number.POSITIVE_INFINITY;
  return Math.min(below, above);
}

function hiddenChange(
  altitudeM: Float64Array,
  temperatureK: Float64Array,
  start: number,
  end: number,
  spanM: number,
  context: RecordContext,
  options: StuckTemperatureOptions,
): { stuck: boolean; changeK: number | null } {
  const n = temperatureK.length;
  if (n - (end - start + 1) < options.minSamples) return { stuck: spanM >= options.minConstantSpanM, changeK: null };
  // The run itself holds no change, so the record's reversal share is the rest's (up to the one
  // pair that straddles the run).
  if (context.pairs < options.minSamples || context.reversals < options.minReversalShare * context.pairs) return { stuck: false, changeK: null };
  const value = float64At(temperatureK, start);
  let changeK: number | null;
  if (end + 1 < n) {
    const resumed = Float64Array.from(temperatureK.subarray(end + 1, Math.min(n, end + 1 + RESUME_SAMPLES)));
    changeK = Math.abs(medianInPlace(resumed, resumed.length) - value);
  } else {
    const slope = slopeBelow(altitudeM, temperatureK, start, options.lapseDepthBelowM, options.minSamples);
    changeK = slope === null ? null : Math.abs(slope) * spanM;
  }
  const stuck = changeK !== null && changeK >= options.minHiddenSteps * stepAt(context.distinctK, value) && changeK >= options.minHiddenChangeK;
  return { stuck, changeK };
}

/** Least-squares dT/dz (K/m) of the readings before index `start` within depthM below its altitude; null when too few. */
function slopeBelow(altitudeM: Float64Array, temperatureK: Float64Array, start: number, depthM: number, minSamples: number): number | null {
  const top = float64At(altitudeM, start);
  let count = 0;
  let sumZ = 0;
  let sumT = 0;
  for (let i = 0; i < start; i++) {
    const z = float64At(altitudeM, i);
    if (z > top || z < top - depthM) continue;
    count++;
    sumZ += z;
    sumT += float64At(temperatureK, i);
  }
  if (count < minSamples) return null;
  const meanZ = sumZ / count;
  const meanT = sumT / count;
  let szz = 0;
  let szt = 0;
  for (let i = 0; i < start; i++) {
    const z = float64At(altitudeM, i);
    if (z > top || z < top - depthM) continue;
    szz += (z - meanZ) ** 2;
    szt += (z - meanZ) * (float64At(temperatureK, i) - meanT);
  }
  return szz > 0 ? szt / szz : null;
}

/** Temperatures that jump up and down by tens of kelvin from one reading to the next. */
export interface AlternatingTemperature {
  /** Readings that differ from both neighbours by ≥ the step, in opposite directions. */
  zigzagCount: number;
  /** Longest run of consecutive zigzag readings. */
  longestRun: number;
  /** Index of the first zigzag reading. */
  firstIndex: number;
}

export interface AlternatingTemperatureOptions {
  /** Jump size that no air mass shows between successive readings of a climbing balloon, K [P]. */
  minStepK: number;
  /** Consecutive zigzag readings that make an alternating sensor [P]. */
  minRun: number;
  /** …or this share of all readings, scattered [P]… */
  minShare: number;
  /** …but never fewer than this many [P]. */
  minCount: number;
}

/** [P] "tens of kelvin": 10 K; one isolated spike is a glitch (the Hampel filter's job), four in a row or 1 % of a record is a sensor fault. */
export const DEFAULT_ALTERNATING_TEMPERATURE_OPTIONS: AlternatingTemperatureOptions = { minStepK: 10, minRun: 4, minShare: 0.01, minCount: 5 };

/**
 * An alternating (wildly noisy) temperature sensor [P]: reading i is a zigzag when it differs from
 * both neighbours by ≥ minStepK with opposite signs (up then down, or down then up). Reported when
 * minRun zigzags follow each other, or zigzags make ≥ minShare of all readings (and ≥ minCount).
 * The Hampel filter would otherwise keep one phase of an alternating signal as if it were the air.
 * Inputs must be finite; they are never modified.
 */
export function detectAlternatingTemperature(
  temperatureK: Float64Array,
  options: AlternatingTemperatureOptions = DEFAULT_ALTERNATING_TEMPERATURE_OPTIONS,
): AlternatingTemperature | null {
  const n = temperatureK.length;
  let zigzagCount = 0;
  let longestRun = 0;
  let run = 0;
  let firstIndex = -1;
  for (let i = 1; i + 1 < n; i++) {
    const before = float64At(temperatureK, i) - float64At(temperatureK, i - 1);
    const after = float64At(temperatureK, i + 1) - float64At(temperatureK, i);
    if (Math.abs(before) >= options.minStepK && Math.abs(after) >= options.minStepK && Math.sign(before) !== Math.sign(after)) {
      zigzagCount++;
      run++;
      if (run > longestRun) longestRun = run;
      if (firstIndex < 0) firstIndex = i;
    } else {
      run = 0;
    }
  }
  const scattered = zigzagCount >= Math.max(options.minCount, options.minShare * n);
  return longestRun >= options.minRun || scattered ? { zigzagCount, longestRun, firstIndex } : null;
}
