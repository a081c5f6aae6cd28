import type { RawSeries } from '../ingest/types';

/** How to turn one raw time array into sorted, de-duplicated samples (shareable across series). */
export interface SamplePlan {
  /** Clean times: sorted, unique, finite. */
  readonly timesMs: Float64Array;
  /** Raw index to take for each clean time; undefined when the raw array is already clean. */
  readonly order: Uint32Array | undefined;
  readonly duplicateCount: number;
  readonly wasUnsorted: boolean;
}

/**
 * Plans sorting (stable, so among equal timestamps the order of writing is kept) and
 * de-duplication (the last value written for a timestamp wins) for a raw time array. Samples with
 * a non-finite time are dropped. Already clean input is detected in one pass and not copied.
 */
export function planSamples(rawTimesMs: Float64Array): SamplePlan {
  const n = rawTimesMs.length;
  let isClean = true;
  for (let i = 0; i < n && isClean; i++) {
    if (!Number.isFinite(rawTimesMs[i]) || (i > 0 && !(rawTimesMs[i] > rawTimesMs[i - 1]))) isClean = false;
  }
  if (isClean) return { timesMs: rawTimesMs, order: undefined, duplicateCount: 0, wasUnsorted: false };
  let isSorted = true;
  for (let i = 1; i < n && isSorted; i++) if (rawTimesMs[i] < rawTimesMs[i - 1]) isSorted = false;
  let sorted: Uint32Array;
  if (isSorted) {
    sorted = new Uint32Array(n);
    for (let i = 0; i < n; i++) sorted[i] = i;
  } else {
    const indices = Array.from({ length: n }, (_, i) => i);
    indices.sort((a, b) => (rawTimesMs[a] - rawTimesMs[b]) || (a - b));
    sorted = Uint32Array.from(indices);
  }
  const order = new Uint32Array(n);
  const timesMs = new Float64Array(n);
  let count = 0;
  let duplicateCount = 0;
  for (let k = 0; k < n; k++) {
    const i = sorted[k];
    const t = rawTimesMs[i];
    if (!Number.isFinite(t)) continue;
    if (count > 0 && timesMs[count - 1] === t) { order[count - 1] = i; duplicateCount++; continue; }
    timesMs[count] = t;
    order[count] = i;
    count++;
  }
  return { timesMs: timesMs.slice(0, count), order: order.slice(0, count), duplicateCount, wasUnsorted: !isSorted };
}

/** Values reordered by a plan (the raw array itself when the plan needs no reordering). */
export function applySamplePlan(plan: SamplePlan, rawValues: Float64Array): Float64Array {
  if (plan.order === undefined) return rawValues;
  const out = new Float64Array(plan.order.length);
  for (let k = 0; k < out.length; k++) out[k] = rawValues[plan.order[k]];
  return out;
}

/**
 * Per-second rate of a cumulative counter. The first sample has no rate (NaN). A drop is a reset,
 * so the increase is the new value itself (PromQL `rate()` rule); with `startTimesMs` (OTLP), a
 * later start time is a reset too, even when the value rose. Gaps (NaN) are bridged from the last
 * finite sample, over the longer interval. Returns the rates and the number of resets seen.
 */
export function convertCounterToRate(timesMs: Float64Array, values: Float64Array, startTimesMs?: Float64Array): { rates: Float64Array; resetCount: number } {
  const rates = new Float64Array(values.length).fill(NaN);
  let resetCount = 0;
  let lastValue = NaN;
  let lastTimeMs = NaN;
  let lastStartMs = NaN;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (!Number.isFinite(v)) continue;
    const startMs = startTimesMs === undefined ? NaN : startTimesMs[i];
    if (Number.isFinite(lastValue)) {
      const elapsedS = (timesMs[i] - lastTimeMs) / 1000;
      let increase = v - lastValue;
      // A drop, or a later start of accumulation (OTLP restart), means the counter began again.
      if (increase < 0 || startMs > lastStartMs) { increase = v; resetCount++; }
      rates[i] = elapsedS > 0 ? increase / elapsedS : NaN;
    }
    lastValue = v;
    lastTimeMs = timesMs[i];
    lastStartMs = startMs;
  }
  return { rates, resetCount };
}

/**
 * Per-second rate of a delta series: each value is the increase since the previous point, so it is
 * divided by the time since that point. The first point has no interval (NaN).
 */
export function convertDeltaToRate(timesMs: Float64Array, values: Float64Array): Float64Array {
  const rates = new Float64Array(values.length).fill(NaN);
  for (let i = 1; i < values.length; i++) {
    const elapsedS = (timesMs[i] - timesMs[i - 1]) / 1000;
    if (elapsedS > 0) rates[i] = values[i] / elapsedS;
  }
  return rates;
}

/**
 * Median of the positive differences between consecutive times, in ms; NaN when there are fewer
 * than two distinct times. For long series a strided sample of 10,001 differences is used.
 */
export function computeMedianStepMs(timesMs: Float64Array): number {
  const n = timesMs.length;
  if (n < 2) return NaN;
  const stride = Math.max(1, Math.floor((n - 1) / 10_001));
  const diffs: number[] = [];
  for (let i = 1; i < n; i += stride) {
    const d = timesMs[i] - timesMs[i - 1];
    if (d > 0) diffs.push(d);
  }
  return median(diffs);
}

/** Median of numbers (NaN for none); sorts a copy. */
export function median(values: readonly number[]): number {
  if (values.length === 0) return NaN;
  const sorted = Float64Array.from(values).sort();
  const mid = sorted.length >> 1;
  return sorted.length % 2 === 1 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

/** Nearest grid point index of each time on the grid `t0Ms + k·stepMs` (computed once per time array). */
export function computeGridIndex(timesMs: Float64Array, t0Ms: number, stepMs: number): Int32Array {
  const out = new Int32Array(timesMs.length);
  for (let i = 0; i < timesMs.length; i++) out[i] = Math.round((timesMs[i] - t0Ms) / stepMs);
  return out;
}

/**
 * Places samples on the grid `t0 + k·stepMs` (nearest point; the last sample landing on a point
 * wins). A grid point left empty between two points that received samples is forward-filled from
 * the previous one — at most one step, to absorb sampling jitter — while longer runs stay NaN.
 * NaN values written in the export stay NaN (they are gaps, not missing samples).
 */
export function placeOnGrid(gridIndex: Int32Array, values: Float64Array, length: number): Float64Array {
  const out = new Float64Array(length).fill(NaN);
  const isFilled = new Uint8Array(length);
  for (let i = 0; i < gridIndex.length; i++) {
    const k = gridIndex[i];
    if (k < 0 || k >= length) continue;
    out[k] = values[i];
    isFilled[k] = 1;
  }
  for (let k = 1; k < length - 1; k++) {
    if (isFilled[k] === 0 && isFilled[k - 1] === 1 && isFilled[k + 1] === 1) out[k] = out[k - 1];
  }
  return out;
}
