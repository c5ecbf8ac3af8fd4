import { medianInPlace } from "./regression";

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
      const leaving = values[lo++] as number;
      const entering = values[++hi] as number;
      let k = 0;
      while ((window[k] as number) !== leaving) k++;
      while (k > 0 && (window[k - 1] as number) > entering) {
        window[k] = window[k - 1] as number;
        k--;
      }
      while (k < size - 1 && (window[k + 1] as number) < entering) {
        window[k] = window[k + 1] as number;
        k++;
      }
      window[k] = entering;
    }
    while (lo < newLo) {
      const leaving = values[lo++] as number;
      let k = 0;
      while ((window[k] as number) !== leaving) k++;
      for (; k < size - 1; k++) window[k] = window[k + 1] as number;
      size--;
    }
    while (hi < newHi) {
      const entering = values[++hi] as number;
      let k = size;
      while (k > 0 && (window[k - 1] as number) > entering) {
        window[k] = window[k - 1] as number;
        k--;
      }
      window[k] = entering;
      size++;
    }
    const mid = size >> 1;
    out[i] = size % 2 === 1 ? (window[mid] as number) : ((window[mid - 1] as number) + (window[mid] as number)) / 2;
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
    const deviation = Math.abs((values[i] as number) - (medians[i] as number));
    // Cheap rejection first: most samples sit within the floor and need no MAD.
    if (deviation <= minThreshold) continue;
    const lo = Math.max(0, i - h);
    const hi = Math.min(n - 1, i + h);
    const count = hi - lo + 1;
    const med = medians[i] as number;
    for (let j = lo; j <= hi; j++) scratch[j - lo] = Math.abs((values[j] as number) - med);
    const mad = medianInPlace(scratch, count);
    let step = Number.POSITIVE_INFINITY;
    for (let j = lo + 1; j <= hi; j++) {
      const change = Math.abs((values[j] as number) - (values[j - 1] as number));
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
    const t = elapsedS[i] as number;
    const spanS = Math.max(t - (elapsedS[lo] as number), (elapsedS[hi] as number) - t);
    if (Math.abs((altitudeM[i] as number) - (medians[i] as number)) > maxVerticalSpeedMPerS * spanS + noiseM) mask[i] = 1;
  }
  let last = -1;
  let run = 0;
  for (let i = 0; i < n; i++) {
    if (mask[i] === 1) continue;
    if (last < 0) {
      last = i;
      continue;
    }
    const dt = (elapsedS[i] as number) - (elapsedS[last] as number);
    const dz = Math.abs((altitudeM[i] as number) - (altitudeM[last] as number));
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
