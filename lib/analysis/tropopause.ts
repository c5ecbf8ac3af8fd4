/**
 * WMO (1957) lapse-rate tropopause, first and second.
 * Source: WMO definition (International Meteorological Vocabulary): the first tropopause is the
 * lowest level at which the lapse rate decreases to 2 K/km or less, provided the average lapse
 * rate between this level and all higher levels within 2 km does not exceed 2 K/km. If above it
 * the average lapse rate between any level and all higher levels within 1 km exceeds 3 K/km, a
 * second tropopause is defined by the same criterion, within or above that 1 km layer.
 */
import type { ProfileLevel, TropopauseResult } from "./types";
import { valueAt } from "./typed-arrays";

/** WMO thresholds, K/km. */
const TROPOPAUSE_LAPSE_K_PER_KM = 2;
const SECOND_TROPOPAUSE_SEPARATION_K_PER_KM = 3;
const WINDOW_M = 2000;
const SEPARATION_WINDOW_M = 1000;

interface Profile {
  z: Float64Array;
  t: Float64Array;
  p: Float64Array;
  binM: number;
  /** Spacing between consecutive levels beyond which data are missing (more than 2 empty bins). */
  maxSpacingM: number;
}

type Search =
  | { status: "found"; index: number; altitudeM: number; temperatureK: number; pressureHpa: number | null }
  | { status: "undetermined"; reason: string; candidateAltitudeM: number | null }
  | { status: "not-found" };

function toProfile(levels: readonly ProfileLevel[]): Profile {
  const usable = levels
    .filter((l) => Number.isFinite(l.altitudeM) && Number.isFinite(l.temperatureK))
    .slice()
    .sort((a, b) => a.altitudeM - b.altitudeM);
  const widths = usable.map((l) => l.topM - l.baseM).filter((w) => w > 0).sort((a, b) => a - b);
  const binM = widths.length > 0 ? valueAt(widths, widths.length >> 1) : 100;
  return {
    z: Float64Array.from(usable, (l) => l.altitudeM),
    t: Float64Array.from(usable, (l) => l.temperatureK),
    p: Float64Array.from(usable, (l) => (l.pressureHpa !== null && l.pressureHpa > 0 ? l.pressureHpa : Number.NaN)),
    binM,
    maxSpacingM: 3 * binM,
  };
}

/** Lapse rate −dT/dz between levels i and j, K/km. */
function lapse(pr: Profile, i: number, j: number): number {
  return ((valueAt(pr.t, i) - valueAt(pr.t, j)) / (valueAt(pr.z, j) - valueAt(pr.z, i))) * 1000;
}

function interpolateAt(pr: Profile, altitudeM: number): { temperatureK: number; pressureHpa: number | null } {
  const n = pr.z.length;
  let i = 0;
  while (i + 2 < n && valueAt(pr.z, i + 1) < altitudeM) i++;
  const z0 = valueAt(pr.z, i);
  const z1 = valueAt(pr.z, Math.min(i + 1, n - 1));
  const f = z1 > z0 ? Math.min(Math.max((altitudeM - z0) / (z1 - z0), 0), 1) : 0;
  const t0 = valueAt(pr.t, i);
  const t1 = valueAt(pr.t, Math.min(i + 1, n - 1));
  const p0 = valueAt(pr.p, i);
  const p1 = valueAt(pr.p, Math.min(i + 1, n - 1));
  const pressureHpa = p0 > 0 && p1 > 0 ? Math.exp(Math.log(p0) + f * (Math.log(p1) - Math.log(p0))) : null;
  return { temperatureK: t0 + f * (t1 - t0), pressureHpa };
}

/** Levels a and a + 1 are further apart than a data gap (more than two empty bins). */
function isGap(pr: Profile, a: number): boolean {
  return valueAt(pr.z, a + 1) - valueAt(pr.z, a) > pr.maxSpacingM;
}

function gapText(pr: Profile, a: number): string {
  return `${Math.round(valueAt(pr.z, a))} m to ${Math.round(valueAt(pr.z, a + 1))} m`;
}

/**
 * True when the tropopause could lie inside the gap between levels a and a + 1. The air above the
 * gap decides [P]: if the mean lapse rate from the gap's top to the highest level within 2 km above
 * it is 2 K/km or less, the air there is already stratospheric and the fall to 2 K/km may have
 * happened inside the gap; if it is steeper, the levels above the gap are tropospheric and no
 * tropopause lies below them. With no level above the gap's top, nothing rules it out.
 */
function gapMayHideTropopause(pr: Profile, a: number): boolean {
  const n = pr.z.length;
  const b = a + 1;
  const limitM = valueAt(pr.z, b) + WINDOW_M;
  let highest = -1;
  for (let j = b + 1; j < n && valueAt(pr.z, j) <= limitM; j++) highest = j;
  return highest < 0 || lapse(pr, b, highest) <= TROPOPAUSE_LAPSE_K_PER_KM;
}

/**
 * Lowest level k ≥ startIndex (and at or above floorM) meeting the 2 K/km rule. Every pair
 * (k, j) with z_j within 2 km above z_k is tested, not only the 2 km mean [P]. The reported
 * altitude interpolates the 2 K/km crossing between the mid-points of the layers below and above
 * level k. Gaps (more than two empty bins) are no evidence either way: measured levels beyond a
 * gap still reject a candidate; a candidate is found only when its whole 2 km window is measured;
 * a gap that may hide a lower tropopause makes the answer undetermined.
 */
function searchWmo(pr: Profile, startIndex: number, floorM: number): Search {
  const n = pr.z.length;
  const top = valueAt(pr.z, n - 1);
  for (let k = Math.max(startIndex, 0); k + 1 < n; k++) {
    const zk = valueAt(pr.z, k);
    if (k > startIndex && isGap(pr, k - 1) && zk > floorM && gapMayHideTropopause(pr, k - 1)) {
      return {
        status: "undetermined",
        reason: `a data gap from ${gapText(pr, k - 1)} may hide where the lapse rate fell to 2 K/km`,
        candidateAltitudeM: zk,
      };
    }
    if (zk < floorM) continue;
    if (isGap(pr, k) || lapse(pr, k, k + 1) > TROPOPAUSE_LAPSE_K_PER_KM) continue;
    const windowTop = zk + WINDOW_M;
    let rejected = false;
    let gap: string | null = null;
    for (let j = k + 1; j < n && valueAt(pr.z, j) <= windowTop; j++) {
      if (lapse(pr, k, j) > TROPOPAUSE_LAPSE_K_PER_KM) {
        rejected = true;
        break;
      }
    }
    if (rejected) continue;
    // Coverage of the window: a gap anywhere in it, including one that straddles its top.
    for (let a = k; a + 1 < n && valueAt(pr.z, a) < windowTop - pr.binM; a++) {
      if (isGap(pr, a)) {
        gap = `a data gap from ${gapText(pr, a)} lies within 2 km above the candidate`;
        break;
      }
    }
    if (gap !== null) return { status: "undetermined", reason: gap, candidateAltitudeM: zk };
    if (top < windowTop - pr.binM) {
      return {
        status: "undetermined",
        reason: `the profile ends at ${Math.round(top)} m, inside the 2 km test window above the candidate at ${Math.round(zk)} m`,
        candidateAltitudeM: zk,
      };
    }
    let altitudeM = zk;
    if (k > 0) {
      const below = lapse(pr, k - 1, k);
      const above = lapse(pr, k, k + 1);
      if (below > TROPOPAUSE_LAPSE_K_PER_KM && below > above) {
        const m0 = (valueAt(pr.z, k - 1) + zk) / 2;
        const m1 = (zk + valueAt(pr.z, k + 1)) / 2;
        altitudeM = m0 + ((below - TROPOPAUSE_LAPSE_K_PER_KM) / (below - above)) * (m1 - m0);
      }
    }
    const at = interpolateAt(pr, altitudeM);
    return { status: "found", index: k, altitudeM, temperatureK: at.temperatureK, pressureHpa: at.pressureHpa };
  }
  return { status: "not-found" };
}

/**
 * Whether the mean lapse rate from level i to every higher level within 1 km exceeds 3 K/km
 * (the WMO condition for looking for a second tropopause): "yes" only when that 1 km is measured
 * without a gap; "unknown" when a gap leaves it open. Callers stop before the profile top.
 */
function steepLayerAbove(pr: Profile, i: number): "yes" | "no" | "unknown" {
  const n = pr.z.length;
  const zi = valueAt(pr.z, i);
  const layerTop = zi + SEPARATION_WINDOW_M;
  let any = false;
  for (let j = i + 1; j < n && valueAt(pr.z, j) <= layerTop; j++) {
    any = true;
    if (lapse(pr, i, j) <= SECOND_TROPOPAUSE_SEPARATION_K_PER_KM) return "no";
  }
  if (!any) return "unknown";
  for (let a = i; a + 1 < n && valueAt(pr.z, a) < layerTop - pr.binM; a++) if (isGap(pr, a)) return "unknown";
  return "yes";
}

function publicResult(s: Search): TropopauseResult {
  if (s.status === "found") return { status: "found", altitudeM: s.altitudeM, temperatureK: s.temperatureK, pressureHpa: s.pressureHpa };
  return s;
}

/**
 * First and second WMO lapse-rate tropopause of one profile (levels in any order; altitudes in
 * m, temperatures in K). Only levels at or above floorM are searched so that surface inversions
 * are not taken for a tropopause [P]. "undetermined" when a data gap (more than two empty bins)
 * or the profile top leaves the test window of the lowest unrejected candidate open, or a gap may
 * hide a lower tropopause; the second tropopause is "undetermined" when a gap leaves the 1 km
 * steep-layer test open and no measured layer settles it.
 */
export function findTropopauses(
  levels: readonly ProfileLevel[],
  floorM: number,
): { first: TropopauseResult; second: TropopauseResult } {
  const pr = toProfile(levels);
  const n = pr.z.length;
  if (n < 3) return { first: { status: "not-found" }, second: { status: "not-found" } };
  const first = searchWmo(pr, 0, floorM);
  if (first.status !== "found") {
    const second: TropopauseResult =
      first.status === "undetermined"
        ? { status: "undetermined", reason: "the first tropopause is undetermined", candidateAltitudeM: null }
        : { status: "not-found" };
    return { first: publicResult(first), second };
  }
  const top = valueAt(pr.z, n - 1);
  let openLayer: string | null = null;
  for (let i = first.index + 1; i + 1 < n; i++) {
    if (top < valueAt(pr.z, i) + SEPARATION_WINDOW_M - pr.binM) break;
    const steep = steepLayerAbove(pr, i);
    if (steep === "unknown") {
      openLayer ??= `the 1 km above ${Math.round(valueAt(pr.z, i))} m is not fully measured, so a second tropopause cannot be ruled out`;
      continue;
    }
    if (steep === "no") continue;
    return { first: publicResult(first), second: publicResult(searchWmo(pr, i + 1, floorM)) };
  }
  const second: TropopauseResult = openLayer === null ? { status: "not-found" } : { status: "undetermined", reason: openLayer, candidateAltitudeM: null };
  return { first: publicResult(first), second };
}
