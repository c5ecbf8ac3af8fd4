/** Fixed-altitude binning of one flight phase into profile levels. */
import type { Phase, ProfileLevel } from "./types";
import { valueAt } from "./typed-arrays";

/**
 * Bins samples from..to−1 into fixed altitude bins [k·binSizeM, (k+1)·binSizeM) above mean sea
 * level, so bins line up across flights and sites. Each level carries the sample count, the mean
 * altitude of its samples, mean and sample SD of temperature (SD null below 2 samples), and mean
 * pressure and humidity over the samples that have them (null when none). NaN marks a missing
 * pressure/humidity. Levels are returned in ascending altitude; empty bins are omitted.
 */
export function binProfile(
  phase: Phase,
  altitudeM: Float64Array,
  temperatureK: Float64Array,
  pressureHpa: Float64Array,
  relativeHumidityPct: Float64Array,
  from: number,
  to: number,
  binSizeM: number,
): ProfileLevel[] {
  if (to <= from || !(binSizeM > 0)) return [];
  let minBin = Infinity;
  let maxBin = -Infinity;
  for (let i = from; i < to; i++) {
    const b = Math.floor(valueAt(altitudeM, i) / binSizeM);
    if (b < minBin) minBin = b;
    if (b > maxBin) maxBin = b;
  }
  const nBins = maxBin - minBin + 1;
  const count = new Float64Array(nBins);
  const sumZ = new Float64Array(nBins);
  const sumT = new Float64Array(nBins);
  const sumT2 = new Float64Array(nBins);
  const countP = new Float64Array(nBins);
  const sumP = new Float64Array(nBins);
  const countRh = new Float64Array(nBins);
  const sumRh = new Float64Array(nBins);
  // Temperatures are summed as deviations from a per-bin reference to keep the SD accurate.
  const refT = new Float64Array(nBins).fill(Number.NaN);
  for (let i = from; i < to; i++) {
    const z = valueAt(altitudeM, i);
    const b = Math.floor(z / binSizeM) - minBin;
    const t = valueAt(temperatureK, i);
    if (Number.isNaN(valueAt(refT, b))) refT[b] = t;
    const dt = t - valueAt(refT, b);
    count[b] = valueAt(count, b) + 1;
    sumZ[b] = valueAt(sumZ, b) + z;
    sumT[b] = valueAt(sumT, b) + dt;
    sumT2[b] = valueAt(sumT2, b) + dt * dt;
    const p = valueAt(pressureHpa, i);
    if (p === p) {
      countP[b] = valueAt(countP, b) + 1;
      sumP[b] = valueAt(sumP, b) + p;
    }
    const rh = valueAt(relativeHumidityPct, i);
    if (rh === rh) {
      countRh[b] = valueAt(countRh, b) + 1;
      sumRh[b] = valueAt(sumRh, b) + rh;
    }
  }
  const levels: ProfileLevel[] = [];
  for (let b = 0; b < nBins; b++) {
    const n = valueAt(count, b);
    if (n === 0) continue;
    const meanDt = valueAt(sumT, b) / n;
    const variance = n > 1 ? Math.max((valueAt(sumT2, b) - n * meanDt * meanDt) / (n - 1), 0) : null;
    const baseM = (b + minBin) * binSizeM;
    const np = valueAt(countP, b);
    const nrh = valueAt(countRh, b);
    levels.push({
      phase,
      baseM,
      topM: baseM + binSizeM,
      altitudeM: valueAt(sumZ, b) / n,
      sampleCount: n,
      temperatureK: valueAt(refT, b) + meanDt,
      temperatureSdK: variance === null ? null : Math.sqrt(variance),
      pressureHpa: np > 0 ? valueAt(sumP, b) / np : null,
      relativeHumidityPct: nrh > 0 ? valueAt(sumRh, b) / nrh : null,
    });
  }
  return levels;
}
