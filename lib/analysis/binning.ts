/** Fixed-altitude binning of one flight phase into profile levels. */
import type { Phase, ProfileLevel } from "./types";

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
    const b = Math.floor((altitudeM[i] as number) / binSizeM);
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
    const z = altitudeM[i] as number;
    const b = Math.floor(z / binSizeM) - minBin;
    const t = temperatureK[i] as number;
    if (Number.isNaN(refT[b] as number)) refT[b] = t;
    const dt = t - (refT[b] as number);
    count[b] = (count[b] as number) + 1;
    sumZ[b] = (sumZ[b] as number) + z;
    sumT[b] = (sumT[b] as number) + dt;
    sumT2[b] = (sumT2[b] as number) + dt * dt;
    const p = pressureHpa[i] as number;
    if (p === p) {
      countP[b] = (countP[b] as number) + 1;
      sumP[b] = (sumP[b] as number) + p;
    }
    const rh = relativeHumidityPct[i] as number;
    if (rh === rh) {
      countRh[b] = (countRh[b] as number) + 1;
      sumRh[b] = (sumRh[b] as number) + rh;
    }
  }
  const levels: ProfileLevel[] = [];
  for (let b = 0; b < nBins; b++) {
    const n = count[b] as number;
    if (n === 0) continue;
    const meanDt = (sumT[b] as number) / n;
    const variance = n > 1 ? Math.max(((sumT2[b] as number) - n * meanDt * meanDt) / (n - 1), 0) : null;
    const baseM = (b + minBin) * binSizeM;
    const np = countP[b] as number;
    const nrh = countRh[b] as number;
    levels.push({
      phase,
      baseM,
      topM: baseM + binSizeM,
      altitudeM: (sumZ[b] as number) / n,
      sampleCount: n,
      temperatureK: (refT[b] as number) + meanDt,
      temperatureSdK: variance === null ? null : Math.sqrt(variance),
      pressureHpa: np > 0 ? (sumP[b] as number) / np : null,
      relativeHumidityPct: nrh > 0 ? (sumRh[b] as number) / nrh : null,
    });
  }
  return levels;
}
