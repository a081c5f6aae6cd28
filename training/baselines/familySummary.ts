/**
 * Per-family summary statistics for the non-neural baseline: a fixed-length vector per example
 * built from robust deviations of each metric's window against its own baseline.
 */
import { FAMILIES } from '../../extension/core/frame/types';
import type { MetricWindow } from '../../extension/core/model/types';

/** Statistics kept per family, in vector order. */
export const SUMMARY_STATS = ['meanAbsDeviation', 'maxAbsDeviation', 'signedShift', 'slope', 'presentCount'] as const;

/** Length of the vector returned by computeFamilySummary (11 families × 5 statistics). */
export const SUMMARY_LENGTH = FAMILIES.length * SUMMARY_STATS.length;

/** 1.4826 makes the MAD a consistent estimate of σ for normal data (common practice). */
const MAD_TO_SIGMA = 1.4826;

function medianOf(sorted: readonly number[]): number {
  const n = sorted.length;
  const mid = n >> 1;
  return n % 2 === 1 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

function finiteSorted(values: Float64Array): number[] {
  const out: number[] = [];
  for (const v of values) if (Number.isFinite(v)) out.push(v);
  return out.sort((a, b) => a - b);
}

/** Signed log compresses heavy tails (|z| of 1e4 after a flat baseline) without losing the sign. */
function compressSigned(z: number): number {
  return Math.sign(z) * Math.log1p(Math.abs(z));
}

interface MetricStats {
  readonly meanAbs: number;
  readonly maxAbs: number;
  readonly mean: number;
  readonly slope: number;
}

/**
 * Robust deviation statistics of one metric, or undefined when its baseline or window has no
 * finite sample (the metric then counts as absent). Scale = MAD·1.4826, floored so that a flat
 * baseline does not divide by zero: max(scale, 1% of |median|, 1e-9).
 */
export function computeMetricStats(metric: MetricWindow): MetricStats | undefined {
  const base = finiteSorted(metric.baseline);
  if (base.length === 0) return undefined;
  const center = medianOf(base);
  const mad = medianOf(base.map((v) => Math.abs(v - center)).sort((a, b) => a - b));
  const scale = Math.max(mad * MAD_TO_SIGMA, Math.abs(center) * 0.01, 1e-9);
  let count = 0, sumAbs = 0, maxAbs = 0, sum = 0;
  let sumT = 0, sumZ = 0, sumTT = 0, sumTZ = 0;
  const length = metric.window.length;
  for (let t = 0; t < length; t++) {
    const v = metric.window[t];
    if (!Number.isFinite(v)) continue;
    const z = compressSigned((v - center) / scale);
    // Time in window fractions (0..1) so the slope is comparable across window lengths.
    const u = length > 1 ? t / (length - 1) : 0;
    count++; sumAbs += Math.abs(z); maxAbs = Math.max(maxAbs, Math.abs(z)); sum += z;
    sumT += u; sumZ += z; sumTT += u * u; sumTZ += u * z;
  }
  if (count === 0) return undefined;
  const denominator = count * sumTT - sumT * sumT;
  const slope = denominator > 1e-12 ? (count * sumTZ - sumT * sumZ) / denominator : 0;
  return { meanAbs: sumAbs / count, maxAbs, mean: sum / count, slope };
}

/**
 * Returns the summary vector of one example, length SUMMARY_LENGTH, laid out family-major
 * (FAMILIES order) × SUMMARY_STATS. Per family: mean over its metrics of mean |z|, max of max |z|,
 * mean signed shift, mean slope (z per window), and log1p(count of usable metrics). Averaging
 * (not summing) keeps a family with many correlated members from dominating. Absent families and
 * metrics whose baseline or window is all NaN contribute zeros. Never returns NaN.
 */
export function computeFamilySummary(metrics: readonly MetricWindow[]): Float64Array {
  const statCount = SUMMARY_STATS.length;
  const out = new Float64Array(SUMMARY_LENGTH);
  const counts = new Int32Array(FAMILIES.length);
  for (const metric of metrics) {
    const f = FAMILIES.indexOf(metric.family);
    const stats = computeMetricStats(metric);
    if (f < 0 || stats === undefined) continue;
    const o = f * statCount;
    out[o] += stats.meanAbs;
    out[o + 1] = Math.max(out[o + 1], stats.maxAbs);
    out[o + 2] += stats.mean;
    out[o + 3] += stats.slope;
    counts[f]++;
  }
  for (let f = 0; f < FAMILIES.length; f++) {
    const o = f * statCount;
    const n = counts[f];
    if (n > 0) { out[o] /= n; out[o + 2] /= n; out[o + 3] /= n; }
    out[o + 4] = Math.log1p(n);
  }
  return out;
}
