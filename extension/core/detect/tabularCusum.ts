/**
 * Tabular (two-sided) CUSUM of Page (1954) in the form of Montgomery, *Introduction to Statistical
 * Quality Control*, ch. 9: C⁺ᵢ = max(0, xᵢ − (μ₀ + K) + C⁺ᵢ₋₁), C⁻ᵢ = max(0, (μ₀ − K) − xᵢ + C⁻ᵢ₋₁),
 * with K = k·σ and H = h·σ, and counters N⁺/N⁻ of consecutive periods with C > 0.
 */

/** Parameters of the tabular CUSUM. */
export interface TabularCusumOptions {
  /** Target (in-control) mean μ₀, in the series' unit. */
  readonly targetMean: number;
  /** Process σ in the series' unit; must be > 0. */
  readonly sigma: number;
  /** Reference value in σ units (K = k·σ); 0.5 detects a 1σ shift quickly. Default 0.5. */
  readonly k?: number;
  /** Decision interval in σ units (H = h·σ). Default 5. */
  readonly h?: number;
  /** Restart both sums at 0 after a signal so later excursions are found too. Default false. */
  readonly isResetOnSignal?: boolean;
}

/** One out-of-control signal: the first index where C⁺ (or C⁻) exceeded H in an excursion. */
export interface CusumSignal {
  /** 0-based index of the observation at which C > H first. */
  readonly index: number;
  readonly direction: 'up' | 'down';
  /** C⁺ or C⁻ at the signal, in the series' unit. */
  readonly sum: number;
  /** N⁺ or N⁻ at the signal: consecutive periods the sum has been above 0. */
  readonly runLength: number;
  /** Estimated onset index = index − runLength + 1 (Montgomery §9.1). */
  readonly onsetIndex: number;
  /** New process mean μ̂ = μ₀ ± (K + C/N), in the series' unit. */
  readonly estimatedMean: number;
}

/** Full CUSUM trace (arrays of the input's length) and its signals. */
export interface TabularCusumResult {
  readonly upper: Float64Array;
  readonly lower: Float64Array;
  readonly upperRun: Int32Array;
  readonly lowerRun: Int32Array;
  readonly signals: readonly CusumSignal[];
}

/**
 * Runs the two-sided tabular CUSUM over `values`. NaN samples (gaps) carry the previous sums and
 * counters forward unchanged. A signal is reported once per excursion (when C first exceeds H),
 * not at every later point above H. Empty input gives empty arrays and no signals.
 * Throws only on invalid parameters (σ ≤ 0 or non-finite, negative k/h).
 */
export function computeTabularCusum(values: ArrayLike<number>, options: TabularCusumOptions): TabularCusumResult {
  const { targetMean, sigma } = options;
  const k = options.k ?? 0.5;
  const h = options.h ?? 5;
  if (!(sigma > 0) || !Number.isFinite(sigma)) throw new Error(`CUSUM: expected sigma > 0, got ${sigma}`);
  if (!(k >= 0) || !(h > 0)) throw new Error(`CUSUM: expected k ≥ 0 and h > 0, got k=${k}, h=${h}`);
  const bigK = k * sigma;
  const bigH = h * sigma;
  const n = values.length;
  const upper = new Float64Array(n);
  const lower = new Float64Array(n);
  const upperRun = new Int32Array(n);
  const lowerRun = new Int32Array(n);
  const signals: CusumSignal[] = [];
  let cPlus = 0, cMinus = 0, nPlus = 0, nMinus = 0;
  let isAboveUpper = false, isAboveLower = false;
  for (let i = 0; i < n; i++) {
    const x = values[i];
    if (!Number.isNaN(x)) {
      cPlus = Math.max(0, x - (targetMean + bigK) + cPlus);
      cMinus = Math.max(0, targetMean - bigK - x + cMinus);
      nPlus = cPlus > 0 ? nPlus + 1 : 0;
      nMinus = cMinus > 0 ? nMinus + 1 : 0;
    }
    upper[i] = cPlus; lower[i] = cMinus; upperRun[i] = nPlus; lowerRun[i] = nMinus;
    const isUpperSignal = cPlus > bigH && !isAboveUpper;
    const isLowerSignal = cMinus > bigH && !isAboveLower;
    isAboveUpper = cPlus > bigH;
    isAboveLower = cMinus > bigH;
    if (isUpperSignal) {
      signals.push({ index: i, direction: 'up', sum: cPlus, runLength: nPlus, onsetIndex: i - nPlus + 1,
        estimatedMean: targetMean + bigK + cPlus / nPlus });
    }
    if (isLowerSignal) {
      signals.push({ index: i, direction: 'down', sum: cMinus, runLength: nMinus, onsetIndex: i - nMinus + 1,
        estimatedMean: targetMean - bigK - cMinus / nMinus });
    }
    if ((isUpperSignal || isLowerSignal) && options.isResetOnSignal) {
      cPlus = 0; cMinus = 0; nPlus = 0; nMinus = 0; isAboveUpper = false; isAboveLower = false;
    }
  }
  return { upper, lower, upperRun, lowerRun, signals };
}

/**
 * Raw (cumulative sum) CUSUM sᵢ = Σⱼ≤ᵢ (xⱼ − target) as in Montgomery & Runger, *Applied Statistics
 * and Probability for Engineers*, Table 16-7. NaN samples add nothing (the sum is carried).
 */
export function computeRawCusum(values: ArrayLike<number>, target: number): Float64Array {
  const out = new Float64Array(values.length);
  let s = 0;
  for (let i = 0; i < values.length; i++) {
    const x = values[i];
    if (!Number.isNaN(x)) s += x - target;
    out[i] = s;
  }
  return out;
}

/** One level change found by re-targeted CUSUM. */
export interface LevelShift {
  /** Estimated first index at the new level (signal index − N + 1). */
  readonly onsetIndex: number;
  /** Index at which the CUSUM crossed H. */
  readonly signalIndex: number;
  readonly direction: 'up' | 'down';
  /** Level before and after (μ₀ and μ̂), in the series' unit. */
  readonly fromLevel: number;
  readonly toLevel: number;
}

/**
 * Sequential level shifts: runs the tabular CUSUM from `targetMean`; at each signal it records
 * the shift and restarts just after the signal with the estimated new mean μ̂ as target, so a
 * sustained shift is reported once and the return to the old level is reported as its own change.
 * NaN samples are skipped. Cost O(n·shifts) in the worst case; use on bounded stretches.
 */
export function detectSequentialShifts(values: ArrayLike<number>, options: TabularCusumOptions): LevelShift[] {
  const out: LevelShift[] = [];
  let start = 0;
  let target = options.targetMean;
  while (start < values.length) {
    const view = Array.prototype.slice.call(values, start) as number[];
    const first = computeTabularCusum(view, { ...options, targetMean: target, isResetOnSignal: false }).signals[0];
    if (!first) break;
    out.push({ onsetIndex: start + first.onsetIndex, signalIndex: start + first.index, direction: first.direction,
      fromLevel: target, toLevel: first.estimatedMean });
    target = first.estimatedMean;
    start += first.index + 1;
  }
  return out;
}
