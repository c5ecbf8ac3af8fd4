/** Straight-line fits for lapse rates: ordinary least squares and the Theil–Sen estimator. */

/** Spread of x, in ulps of its largest magnitude, below which x counts as constant (2^12: far above round-off). */
const X_SPREAD_ROUNDING_ULPS = 4096;

export interface LinearFit {
  slope: number;
  intercept: number;
  /** Standard error of the slope, same unit as slope; null when n < 3 or the residual variance is undefined. */
  slopeStdErr: number | null;
  /** Coefficient of determination; null when y has no variance. */
  rSquared: number | null;
  n: number;
}

/**
 * Ordinary least-squares line y = a + b·x with the textbook slope standard error
 * SE(b) = sqrt(SSres/(n − 2) / Sxx). Pairs with a non-finite coordinate are skipped.
 * Returns null when fewer than 2 usable points or x has no spread beyond rounding: when the x values' standard
 * deviation is within a few thousand ulps of their magnitude, Sxx is round-off and a slope from it (with a
 * standard error near 1e16) would be noise.
 */
import { valueAt } from "./typed-arrays";
export function fitOrdinaryLeastSquares(x: ArrayLike<number>, y: ArrayLike<number>): LinearFit | null {
  const len = Math.min(x.length, y.length);
  let n = 0;
  let sumX = 0;
  let sumY = 0;
  for (let i = 0; i < len; i++) {
    const xi = valueAt(x, i);
    const yi = valueAt(y, i);
    if (!Number.isFinite(xi) || !Number.isFinite(yi)) continue;
    n++;
    sumX += xi;
    sumY += yi;
  }
  if (n < 2) return null;
  const meanX = sumX / n;
  let maxAbsX = 0;
  const meanY = sumY / n;
  let sxx = 0;
  let sxy = 0;
  let syy = 0;
  for (let i = 0; i < len; i++) {
    const xi = valueAt(x, i);
    const yi = valueAt(y, i);
    if (!Number.isFinite(xi) || !Number.isFinite(yi)) continue;
    const dx = xi - meanX;
    const dy = yi - meanY;
    if (Math.abs(xi) > maxAbsX) maxAbsX = Math.abs(xi);
    sxx += dx * dx;
    sxy += dx * dy;
    syy += dy * dy;
  }
  if (!(sxx > 0) || Math.sqrt(sxx / n) <= X_SPREAD_ROUNDING_ULPS * Number.EPSILON * maxAbsX) return null;
  const slope = sxy / sxx;
  const intercept = meanY - slope * meanX;
  const ssRes = Math.max(syy - slope * sxy, 0);
  const slopeStdErr = n > 2 ? Math.sqrt(ssRes / (n - 2) / sxx) : null;
  const rSquared = syy > 0 ? Math.min(Math.max(1 - ssRes / syy, 0), 1) : null;
  return {
    slope,
    intercept,
    slopeStdErr: slopeStdErr !== null && Number.isFinite(slopeStdErr) ? slopeStdErr : null,
    rSquared,
    n,
  };
}

/**
 * k-th smallest (0-based) of values[0…count−1] by quickselect (Hoare partition); reorders that
 * part of the array. Average O(n), which keeps Theil–Sen on thousands of pairs cheap.
 */
export function selectKth(values: Float64Array, count: number, k: number): number {
  let lo = 0;
  let hi = count - 1;
  while (hi > lo) {
    const mid = lo + ((hi - lo) >> 1);
    // Median-of-three pivot guards against sorted input.
    const a = valueAt(values, lo);
    const b = valueAt(values, mid);
    const c = valueAt(values, hi);
    const pivot = a < b ? (b < c ? b : a < c ? c : a) : a < c ? a : b < c ? c : b;
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (valueAt(values, i) < pivot) i++;
      while (valueAt(values, j) > pivot) j--;
      if (i <= j) {
        const t = valueAt(values, i);
        values[i] = valueAt(values, j);
        values[j] = t;
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return valueAt(values, k);
  }
  return valueAt(values, k);
}

/** Median of values[0…count−1] (reorders that part of the array). */
export function medianInPlace(values: Float64Array, count: number): number {
  const mid = count >> 1;
  const upper = selectKth(values, count, mid);
  if (count % 2 === 1) return upper;
  // After selection everything below index mid is ≤ upper; the lower middle is their maximum.
  let lower = -Infinity;
  for (let i = 0; i < mid; i++) if (valueAt(values, i) > lower) lower = valueAt(values, i);
  return (lower + upper) / 2;
}

/**
 * Theil–Sen slope: the median of the slopes of all point pairs with distinct x
 * (Sen 1968, J. Am. Stat. Assoc. 63). Null when no such pair exists. O(n²) pairs.
 */
export function theilSenSlope(x: ArrayLike<number>, y: ArrayLike<number>): number | null {
  const len = Math.min(x.length, y.length);
  const xs: number[] = [];
  const ys: number[] = [];
  for (let i = 0; i < len; i++) {
    const xi = valueAt(x, i);
    const yi = valueAt(y, i);
    if (Number.isFinite(xi) && Number.isFinite(yi)) {
      xs.push(xi);
      ys.push(yi);
    }
  }
  const n = xs.length;
  if (n < 2) return null;
  const slopes = new Float64Array((n * (n - 1)) / 2);
  let count = 0;
  for (let i = 0; i < n; i++) {
    const xi = valueAt(xs, i);
    const yi = valueAt(ys, i);
    for (let j = i + 1; j < n; j++) {
      const dx = valueAt(xs, j) - xi;
      if (dx === 0) continue;
      slopes[count++] = (valueAt(ys, j) - yi) / dx;
    }
  }
  if (count === 0) return null;
  const m = medianInPlace(slopes, count);
  return Number.isFinite(m) ? m : null;
}

/**
 * Linear least squares for an over-determined system A·c ≈ b (rows × cols, row-major design)
 * by Householder QR, which stays accurate for the badly scaled designs of calibration fits
 * (e.g. 1, ln R, (ln R)³). Returns null when A is rank-deficient.
 */
export function solveLeastSquares(design: readonly (readonly number[])[], rhs: readonly number[]): number[] | null {
  const m = design.length;
  const first = design[0];
  if (!first || rhs.length !== m) return null;
  const n = first.length;
  if (n === 0 || m < n) return null;
  // Column scaling first so the rank test is independent of units.
  const scale = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    let s = 0;
    for (let i = 0; i < m; i++) s = Math.max(s, Math.abs(design[i]?.[j] ?? 0));
    scale[j] = s > 0 ? s : 1;
  }
  const a: Float64Array[] = [];
  for (let i = 0; i < m; i++) {
    const row = new Float64Array(n);
    for (let j = 0; j < n; j++) {
      const v = design[i]?.[j] ?? Number.NaN;
      row[j] = v / valueAt(scale, j);
    }
    a.push(row);
  }
  const b = Float64Array.from(rhs);
  for (let i = 0; i < m; i++) {
    const row = valueAt(a, i);
    for (let j = 0; j < n; j++) if (!Number.isFinite(valueAt(row, j))) return null;
    if (!Number.isFinite(valueAt(b, i))) return null;
  }
  const diag = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    let norm = 0;
    for (let i = k; i < m; i++) {
      const v = valueAt(valueAt(a, i), k);
      norm += v * v;
    }
    norm = Math.sqrt(norm);
    if (norm < 1e-12) return null;
    const akk = valueAt(valueAt(a, k), k);
    const alpha = akk > 0 ? -norm : norm;
    // Householder vector v = x − alpha·e1 stored in column k.
    valueAt(a, k)[k] = akk - alpha;
    let vnorm2 = 0;
    for (let i = k; i < m; i++) {
      const v = valueAt(valueAt(a, i), k);
      vnorm2 += v * v;
    }
    if (vnorm2 > 0) {
      for (let j = k + 1; j < n; j++) {
        let dot = 0;
        for (let i = k; i < m; i++) dot += valueAt(valueAt(a, i), k) * valueAt(valueAt(a, i), j);
        const f = (2 * dot) / vnorm2;
        for (let i = k; i < m; i++) {
          const row = valueAt(a, i);
          row[j] = valueAt(row, j) - f * valueAt(row, k);
        }
      }
      let dot = 0;
      for (let i = k; i < m; i++) dot += valueAt(valueAt(a, i), k) * valueAt(b, i);
      const f = (2 * dot) / vnorm2;
      for (let i = k; i < m; i++) b[i] = valueAt(b, i) - f * valueAt(valueAt(a, i), k);
    }
    diag[k] = alpha;
  }
  const maxDiag = Math.max(...Array.from(diag, Math.abs));
  const c = new Float64Array(n);
  for (let k = n - 1; k >= 0; k--) {
    const dk = valueAt(diag, k);
    if (Math.abs(dk) <= 1e-10 * maxDiag) return null;
    let s = valueAt(b, k);
    for (let j = k + 1; j < n; j++) s -= valueAt(valueAt(a, k), j) * valueAt(c, j);
    c[k] = s / dk;
  }
  const out: number[] = [];
  for (let j = 0; j < n; j++) out.push(valueAt(c, j) / valueAt(scale, j));
  return out.every(Number.isFinite) ? out : null;
}
