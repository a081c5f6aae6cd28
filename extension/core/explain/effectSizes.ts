/**
 * Baseline-vs-incident effect sizes of one metric (REFERENCE.md §4.2): robust shift z,
 * Hodges–Lehmann shift, Cliff's δ / Vargha–Delaney A, Mann–Whitney U and two-sample KS with
 * indicative p-values. Rank by effect size; p-values overstate significance on autocorrelated data.
 */
import { computeRobustScale, computeSortedQuantile, sortFinite, type RobustScaleMethod } from '../detect/robustStats';
import { computeKolmogorovSmirnov, computeMannWhitney, type PValueMethod } from './rankTests';

/** Pairwise differences above this count are thinned for the Hodges–Lehmann median. */
const HL_EXACT_PAIRS = 1_000_000;
const HL_THINNED_SIZE = 1000;

/** Hodges–Lehmann shift estimate. */
export interface HodgesLehmannResult {
  /** median(yⱼ − xᵢ) over all pairs, in the metric's unit; NaN when a sample is empty. */
  readonly shift: number;
  /** True when the samples were thinned to evenly spaced order statistics (m·n > 1e6). */
  readonly isApproximate: boolean;
}

/** Thins a sorted sample to `size` evenly spaced order statistics (keeps both ends). */
function thinSorted(sorted: Float64Array, size: number): Float64Array {
  if (sorted.length <= size) return sorted;
  return Float64Array.from({ length: size }, (_, k) => computeSortedQuantile(sorted, k / (size - 1)));
}

/**
 * Hodges–Lehmann two-sample shift: the median of all pairwise differences y − x (Hodges &
 * Lehmann 1963). NaN samples are dropped; above 1e6 pairs both samples are thinned to 1000
 * order statistics first (flagged isApproximate).
 */
export function computeHodgesLehmann(xIn: ArrayLike<number>, yIn: ArrayLike<number>): HodgesLehmannResult {
  let x = sortFinite(xIn), y = sortFinite(yIn);
  if (x.length === 0 || y.length === 0) return { shift: Number.NaN, isApproximate: false };
  const isApproximate = x.length * y.length > HL_EXACT_PAIRS;
  if (isApproximate) { x = thinSorted(x, HL_THINNED_SIZE); y = thinSorted(y, HL_THINNED_SIZE); }
  const diffs = new Float64Array(x.length * y.length);
  let k = 0;
  for (let j = 0; j < y.length; j++) for (let i = 0; i < x.length; i++) diffs[k++] = y[j] - x[i];
  return { shift: computeSortedQuantile(diffs.sort(), 0.5), isApproximate };
}

/** All effect sizes of one metric between its baseline and incident samples. */
export interface MetricEffectSizes {
  readonly baselineCount: number;
  readonly incidentCount: number;
  readonly baselineMedian: number;
  readonly incidentMedian: number;
  /** (median_incident − median_baseline) / robust σ of the baseline. */
  readonly robustZ: number;
  /** Robust σ of the baseline in the metric's unit, and the rule that gave it. */
  readonly baselineScale: number;
  readonly baselineScaleMethod: RobustScaleMethod;
  /** Hodges–Lehmann shift incident − baseline, in the metric's unit. */
  readonly hodgesLehmann: number;
  readonly isHodgesLehmannApproximate: boolean;
  /** Cliff's δ = P(incident > baseline) − P(incident < baseline), in [−1, 1]. */
  readonly cliffsDelta: number;
  /** Vargha–Delaney A = P(incident > baseline) + ½P(tie), in [0, 1]. */
  readonly varghaDelaneyA: number;
  /** Mann–Whitney U of the incident sample and its indicative two-sided p. */
  readonly mannWhitneyU: number;
  readonly mannWhitneyP: number;
  readonly mannWhitneyMethod: 'exact' | 'normal';
  readonly ksD: number;
  readonly ksP: number;
  readonly ksMethod: 'exact' | 'asymptotic';
  /** Always true: samples of a time series are autocorrelated, so p-values are only indicative. */
  readonly isPValueIndicative: true;
}

/**
 * Effect sizes of `incident` against `baseline` (NaN samples dropped). When either side has no
 * samples every statistic is NaN (counts tell which side). The robust z uses the baseline's MAD_n,
 * falling back to IQR/1.349, then `relativeEpsilon`·|median| (default 0.01), then 1, so it never
 * divides by zero.
 */
export function computeEffectSizes(baseline: ArrayLike<number>, incident: ArrayLike<number>,
  options: { readonly pValueMethod?: PValueMethod; readonly relativeEpsilon?: number } = {}): MetricEffectSizes {
  const b = sortFinite(baseline), x = sortFinite(incident);
  const baseScale = computeRobustScale(b, options.relativeEpsilon ?? 0.01);
  const incidentMedian = computeSortedQuantile(x, 0.5);
  const mw = computeMannWhitney(x, b, options.pValueMethod);
  const ks = computeKolmogorovSmirnov(b, x, options.pValueMethod);
  const hl = computeHodgesLehmann(b, x);
  const pairs = b.length * x.length;
  const a = pairs > 0 ? mw.u / pairs : Number.NaN;
  return {
    baselineCount: b.length, incidentCount: x.length,
    baselineMedian: baseScale.median, incidentMedian,
    robustZ: (incidentMedian - baseScale.median) / baseScale.scale,
    baselineScale: baseScale.scale, baselineScaleMethod: baseScale.method,
    hodgesLehmann: hl.shift, isHodgesLehmannApproximate: hl.isApproximate,
    cliffsDelta: 2 * a - 1, varghaDelaneyA: a,
    mannWhitneyU: mw.u, mannWhitneyP: mw.p, mannWhitneyMethod: mw.method,
    ksD: ks.d, ksP: ks.p, ksMethod: ks.method, isPValueIndicative: true,
  };
}

/** Conventional magnitude of Cliff's δ (Romano et al. 2006 thresholds .147 / .33 / .474). */
export function describeCliffsDelta(delta: number): 'negligible' | 'small' | 'medium' | 'large' | 'unknown' {
  const d = Math.abs(delta);
  if (Number.isNaN(d)) return 'unknown';
  if (d < 0.147) return 'negligible';
  if (d < 0.33) return 'small';
  if (d < 0.474) return 'medium';
  return 'large';
}
