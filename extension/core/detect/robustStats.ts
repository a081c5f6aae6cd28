/**
 * Robust location and scale (median, MAD) and the modified z-score of Iglewicz & Hoaglin (1993).
 * All functions drop NaN samples (gaps) before computing; none of them throws on data.
 */

/** Consistency constant: 1.4826·MAD estimates σ for normal data (1 / Φ⁻¹(3/4)). */
export const MAD_TO_SIGMA = 1.4826;

/** Constant of the modified z-score, 0.6745 ≈ Φ⁻¹(3/4) (Iglewicz & Hoaglin 1993). */
export const MODIFIED_Z_CONSTANT = 0.6745;

/** IQR of a standard normal is 1.349σ, so IQR/1.349 estimates σ. */
export const IQR_TO_SIGMA = 1 / 1.349;

/**
 * Copy of the finite-or-infinite (non-NaN) samples, sorted ascending.
 * Returns an empty array for empty or all-NaN input.
 */
export function sortFinite(values: ArrayLike<number>): Float64Array {
  let count = 0;
  for (let i = 0; i < values.length; i++) if (!Number.isNaN(values[i])) count++;
  const out = new Float64Array(count);
  let k = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (!Number.isNaN(v)) out[k++] = v;
  }
  return out.sort();
}

/**
 * Quantile of an already sorted array by linear interpolation (type 7, the default of R and numpy).
 * `p` in [0, 1]. Returns NaN for an empty array.
 */
export function computeSortedQuantile(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length;
  if (n === 0) return Number.NaN;
  const h = (n - 1) * Math.min(1, Math.max(0, p));
  const lo = Math.floor(h);
  const hi = Math.min(n - 1, lo + 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

/** Copy of the non-NaN samples, in input order (no sort). */
function copyFinite(values: ArrayLike<number>): Float64Array {
  let count = 0;
  for (let i = 0; i < values.length; i++) if (!Number.isNaN(values[i])) count++;
  const out = new Float64Array(count);
  let k = 0;
  for (let i = 0; i < values.length; i++) if (!Number.isNaN(values[i])) out[k++] = values[i];
  return out;
}

/** Rearranges `a` so a[k] is the k-th smallest (Hoare quickselect, median-of-three pivot). */
function selectKth(a: Float64Array, k: number): number {
  let lo = 0, hi = a.length - 1;
  while (hi > lo) {
    const mid = (lo + hi) >> 1;
    if (a[mid] < a[lo]) swap(a, mid, lo);
    if (a[hi] < a[lo]) swap(a, hi, lo);
    if (a[hi] < a[mid]) swap(a, hi, mid);
    const pivot = a[mid];
    let i = lo, j = hi;
    while (i <= j) {
      while (a[i] < pivot) i++;
      while (a[j] > pivot) j--;
      if (i <= j) { swap(a, i, j); i++; j--; }
    }
    if (k <= j) hi = j; else if (k >= i) lo = i; else return a[k];
  }
  return a[k];
}

function swap(a: Float64Array, i: number, j: number): void { const t = a[i]; a[i] = a[j]; a[j] = t; }

/**
 * Type-7 quantile of an unsorted scratch array in O(n) expected time (the array is reordered).
 * NaN for an empty array.
 */
export function computeQuantileInPlace(scratch: Float64Array, p: number): number {
  const n = scratch.length;
  if (n === 0) return Number.NaN;
  const h = (n - 1) * Math.min(1, Math.max(0, p));
  const lo = Math.floor(h);
  const low = selectKth(scratch, lo);
  if (h === lo || lo + 1 >= n) return low;
  let next = Number.POSITIVE_INFINITY;
  for (let i = lo + 1; i < n; i++) if (scratch[i] < next) next = scratch[i];
  return low + (h - lo) * (next - low);
}

/** Median of the non-NaN samples; NaN when there are none. Even counts average the middle pair. */
export function computeMedian(values: ArrayLike<number>): number {
  return computeQuantileInPlace(copyFinite(values), 0.5);
}

/**
 * Median absolute deviation from the median (raw, not scaled), over non-NaN samples.
 * Returns NaN for empty input and 0 for constant input.
 */
export function computeMad(values: ArrayLike<number>, center?: number): number {
  const finite = copyFinite(values);
  if (finite.length === 0) return Number.NaN;
  const med = center ?? computeQuantileInPlace(finite, 0.5);
  for (let i = 0; i < finite.length; i++) finite[i] = Math.abs(finite[i] - med);
  return computeQuantileInPlace(finite, 0.5);
}

/** MAD_n = 1.4826·MAD, a σ estimate that is consistent under normality. NaN for empty input. */
export function computeMadN(values: ArrayLike<number>): number {
  return MAD_TO_SIGMA * computeMad(values);
}

/** How a robust scale was obtained (fallback order when MAD = 0). */
export type RobustScaleMethod = 'mad' | 'iqr' | 'relative' | 'unit';

/** A robust σ estimate and the rule that produced it. */
export interface RobustScale {
  /** Location: median of the non-NaN samples (NaN if none). */
  readonly median: number;
  /** σ estimate, always > 0 and finite unless the input had no samples (then NaN). */
  readonly scale: number;
  readonly method: RobustScaleMethod;
}

/**
 * Robust σ with guards for MAD = 0 (REFERENCE.md §4.2): MAD_n; if 0, IQR/1.349; if 0,
 * `relativeEpsilon`·|median|; if the median is 0 too, 1 (so callers never divide by zero).
 * Empty or all-NaN input gives `{ median: NaN, scale: NaN, method: 'unit' }`.
 */
export function computeRobustScale(values: ArrayLike<number>, relativeEpsilon = 0.01): RobustScale {
  const finite = copyFinite(values);
  if (finite.length === 0) return { median: Number.NaN, scale: Number.NaN, method: 'unit' };
  const median = computeQuantileInPlace(finite, 0.5);
  const madN = MAD_TO_SIGMA * computeMad(finite, median);
  if (madN > 0 && Number.isFinite(madN)) return { median, scale: madN, method: 'mad' };
  const iqr = computeQuantileInPlace(finite, 0.75) - computeQuantileInPlace(finite, 0.25);
  if (iqr > 0 && Number.isFinite(iqr)) return { median, scale: iqr * IQR_TO_SIGMA, method: 'iqr' };
  const relative = relativeEpsilon * Math.abs(median);
  if (relative > 0 && Number.isFinite(relative)) return { median, scale: relative, method: 'relative' };
  return { median, scale: 1, method: 'unit' };
}

/**
 * Modified z-scores Mᵢ = 0.6745(xᵢ − x̃)/MAD (Iglewicz & Hoaglin 1993; |M| > 3.5 flags an outlier).
 * When MAD = 0 (more than half the samples equal) it uses their MAD = 0 rule:
 * Mᵢ = (xᵢ − x̃)/(1.253314·MeanAD); when MeanAD is 0 too, every sample equals the median and all
 * scores are 0. NaN inputs give NaN outputs; the result has the input's length.
 */
export function computeModifiedZ(values: ArrayLike<number>): Float64Array {
  const out = new Float64Array(values.length);
  const sorted = copyFinite(values);
  if (sorted.length === 0) return out.fill(Number.NaN);
  const med = computeQuantileInPlace(sorted, 0.5);
  const mad = computeMad(sorted, med);
  let factor: number;
  if (mad > 0) {
    factor = MODIFIED_Z_CONSTANT / mad;
  } else {
    let sum = 0;
    for (let i = 0; i < sorted.length; i++) sum += Math.abs(sorted[i] - med);
    const meanAd = sum / sorted.length;
    factor = meanAd > 0 ? 1 / (1.253314 * meanAd) : 0;
  }
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    out[i] = Number.isNaN(v) ? Number.NaN : (v - med) * factor;
  }
  return out;
}
