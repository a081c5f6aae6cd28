/**
 * Per-metric robust deviation against a reference: z_t = (x_t − expected_t)/σ̂, where expected is
 * the series median or, when the series has a real daily/weekly cycle, the seasonal baseline, and
 * σ̂ is a robust scale of the residual.
 */
import { computeRobustScale, computeMedian, type RobustScaleMethod } from './robustStats';
import { chooseSeasonPeriod } from './seasonalBaseline';

/** |z| is clamped to this so infinite samples do not poison later sums. */
const Z_LIMIT = 1e6;

/** How the expected value was formed. */
export type ReferenceMethod = 'median' | 'seasonal';

/** Robust z-scores of one series and how they were obtained. */
export interface RobustDeviation {
  /** Robust z per step (NaN at gaps and where no seasonal reference exists). */
  readonly z: Float64Array;
  readonly referenceMethod: ReferenceMethod;
  /** Seasonal period in steps when referenceMethod is 'seasonal'. */
  readonly periodSteps?: number;
  /** Residual σ̂ in the series' unit. */
  readonly scale: number;
  readonly scaleMethod: RobustScaleMethod | 'mean-abs';
}

/**
 * Robust deviation of `values` sampled every `stepMs`. Residual scale falls back, when more than
 * half the residuals are equal (MAD = IQR = 0), to 1.2533·mean|residual| (Iglewicz & Hoaglin's
 * MAD = 0 rule), then to 1% of the median level, then to 1; a constant series gives all-zero z.
 * Empty or all-NaN input gives all-NaN z; ±Infinity samples give z = ±1e6.
 */
export function computeRobustDeviation(values: Float64Array, stepMs: number, isSeasonalEnabled = true): RobustDeviation {
  const n = values.length;
  const season = isSeasonalEnabled ? chooseSeasonPeriod(values, stepMs) : undefined;
  const expected = season?.expected;
  const residual = new Float64Array(n);
  const level = expected ? 0 : computeMedian(values);
  for (let i = 0; i < n; i++) residual[i] = values[i] - (expected ? expected[i] : level);
  const robust = computeRobustScale(residual, 0);
  let scale = robust.scale;
  let scaleMethod: RobustDeviation['scaleMethod'] = robust.method;
  if (robust.method === 'unit' || robust.method === 'relative') {
    ({ scale, scaleMethod } = computeDegenerateScale(residual, robust.median, values));
  }
  const z = new Float64Array(n);
  const center = Number.isNaN(robust.median) ? 0 : robust.median;
  // ±Infinity samples (OpenMetrics allows them) become a very large but finite z, so sums,
  // block means and PELT costs downstream stay finite.
  for (let i = 0; i < n; i++) z[i] = Math.max(-Z_LIMIT, Math.min(Z_LIMIT, (residual[i] - center) / scale));
  return { z, referenceMethod: season ? 'seasonal' : 'median', periodSteps: season?.periodSteps, scale, scaleMethod };
}

function computeDegenerateScale(residual: Float64Array, center: number, values: Float64Array):
  { scale: number; scaleMethod: RobustDeviation['scaleMethod'] } {
  let sum = 0, count = 0;
  for (let i = 0; i < residual.length; i++) {
    const r = residual[i];
    if (!Number.isNaN(r)) { sum += Math.abs(r - center); count++; }
  }
  const meanAbs = count > 0 ? (1.253314 * sum) / count : 0;
  if (meanAbs > 0 && Number.isFinite(meanAbs)) return { scale: meanAbs, scaleMethod: 'mean-abs' };
  const relative = 0.01 * Math.abs(computeMedian(values));
  if (relative > 0 && Number.isFinite(relative)) return { scale: relative, scaleMethod: 'relative' };
  return { scale: 1, scaleMethod: 'unit' };
}
