/** Launch, burst and landing detection on a cleaned, time-ordered altitude series. */

/** Climb above the ground level that counts as airborne, m [P]. */
const LIFTOFF_MARGIN_M = 30;
/** The climb must stay above that margin for this long, s [P]. */
const LIFTOFF_SUSTAIN_S = 30;
/** The ground level is estimated from this initial stretch, s. */
const GROUND_WINDOW_S = 30;
/** A trailing stretch within this band of the final altitude… */
const LANDED_BAND_M = 30;
/** …lasting at least this long means the payload has landed, s [P]. */
const LANDED_MIN_S = 30;

export interface FlightSegments {
  /** Index of the first airborne sample (the start of the climb). */
  launchIndex: number;
  /** Index of the highest sample at or after launch. */
  burstIndex: number;
  /** Index of the first sample of the final stationary stretch, or null when none is recorded. */
  landingIndex: number | null;
  /** Altitude the climb started from, m. */
  launchAltitudeM: number;
}

function lowQuantile(values: Float64Array, count: number, q: number): number {
  const part = Float64Array.from(values.subarray(0, count)).sort();
  const idx = Math.min(count - 1, Math.max(0, Math.floor(q * (count - 1))));
  return valueAt(part, idx);
}

/**
 * Segments a flight. Ground level is the 10th percentile of the first 30 s (robust to a file
 * that starts in flight); launch is the first sample of the climb that ends up sustained more
 * than 30 m above ground for 30 s, found by walking back down the climb; burst is the maximum
 * altitude; landing is the start of a final stretch of ≥ 30 s within 30 m of the last altitude.
 * Returns null when there is no sustained climb of at least minimumClimbM. Source: [P].
 */
import { valueAt } from "./typed-arrays";
export function detectFlightSegments(
  elapsedS: Float64Array,
  altitudeM: Float64Array,
  minimumClimbM: number,
): FlightSegments | null {
  const n = altitudeM.length;
  if (n < 3) return null;
  const t0 = valueAt(elapsedS, 0);
  let groundCount = 0;
  while (groundCount < n && valueAt(elapsedS, groundCount) - t0 <= GROUND_WINDOW_S) groundCount++;
  const groundM = lowQuantile(altitudeM, Math.max(groundCount, 1), 0.1);
  const threshold = groundM + LIFTOFF_MARGIN_M;

  // nextBelow[i]: first index ≥ i whose altitude is at or below the threshold (n when none).
  const nextBelow = new Int32Array(n + 1);
  nextBelow[n] = n;
  for (let i = n - 1; i >= 0; i--) nextBelow[i] = valueAt(altitudeM, i) <= threshold ? i : valueAt(nextBelow, i + 1);
  let airborne = -1;
  for (let i = 0; i < n; i++) {
    if (valueAt(altitudeM, i) <= threshold) continue;
    const below = valueAt(nextBelow, i);
    if (below === n || valueAt(elapsedS, below) - valueAt(elapsedS, i) >= LIFTOFF_SUSTAIN_S) {
      airborne = i;
      break;
    }
  }
  if (airborne < 0) return null;
  let launchIndex = airborne;
  while (
    launchIndex > 0 &&
    valueAt(altitudeM, launchIndex - 1) < valueAt(altitudeM, launchIndex) &&
    valueAt(altitudeM, launchIndex) > groundM
  ) {
    launchIndex--;
  }
  let burstIndex = launchIndex;
  for (let i = launchIndex; i < n; i++) if (valueAt(altitudeM, i) > valueAt(altitudeM, burstIndex)) burstIndex = i;
  const launchAltitudeM = valueAt(altitudeM, launchIndex);
  if (valueAt(altitudeM, burstIndex) - launchAltitudeM < minimumClimbM) return null;

  let landingIndex: number | null = null;
  const finalM = valueAt(altitudeM, n - 1);
  let i = n - 1;
  while (i > burstIndex && Math.abs(valueAt(altitudeM, i - 1) - finalM) <= LANDED_BAND_M) i--;
  if (
    i > burstIndex &&
    valueAt(elapsedS, n - 1) - valueAt(elapsedS, i) >= LANDED_MIN_S &&
    valueAt(altitudeM, burstIndex) - finalM > minimumClimbM
  ) {
    landingIndex = i;
  }
  return { launchIndex, burstIndex, landingIndex, launchAltitudeM };
}
