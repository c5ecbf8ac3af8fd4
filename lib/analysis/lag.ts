/** First-order sensor time-lag correction. */

/**
 * Centred moving average over samples within ±windowS/2 of each sample (time-based, so gaps and
 * irregular rates are handled), for indices from..to−1. Returns a new array of length to − from.
 */
import { valueAt } from "./typed-arrays";
export function movingAverageByTime(elapsedS: Float64Array, values: Float64Array, from: number, to: number, windowS: number): Float64Array {
  const count = Math.max(0, to - from);
  const out = new Float64Array(count);
  const half = Math.max(0, windowS) / 2;
  let lo = from;
  let hi = from;
  let sum = 0;
  for (let i = from; i < to; i++) {
    const t = valueAt(elapsedS, i);
    while (hi < to && valueAt(elapsedS, hi) <= t + half) sum += valueAt(values, hi++);
    while (valueAt(elapsedS, lo) < t - half) sum -= valueAt(values, lo++);
    out[i - from] = sum / (hi - lo);
  }
  return out;
}

/**
 * First-order lag correction T_air = T_s + τ·dT_s/dt on samples from..to−1 (time-ordered). The
 * derivative is a central difference of the time-smoothed series, because differentiating raw
 * readings amplifies noise. Source: first-order sensor response, common practice [P].
 * Returns the corrected temperatures (length to − from); the input is not modified.
 */
export function correctSensorLag(
  elapsedS: Float64Array,
  temperatureK: Float64Array,
  from: number,
  to: number,
  timeConstantS: number,
  smoothingWindowS: number,
): Float64Array {
  const count = Math.max(0, to - from);
  const out = Float64Array.from(temperatureK.subarray(from, to));
  if (count < 3 || !(timeConstantS > 0)) return out;
  const smooth = movingAverageByTime(elapsedS, temperatureK, from, to, smoothingWindowS);
  for (let k = 0; k < count; k++) {
    const a = Math.max(0, k - 1);
    const b = Math.min(count - 1, k + 1);
    const dt = valueAt(elapsedS, from + b) - valueAt(elapsedS, from + a);
    if (dt > 0) out[k] = valueAt(out, k) + (timeConstantS * (valueAt(smooth, b) - valueAt(smooth, a))) / dt;
  }
  return out;
}
