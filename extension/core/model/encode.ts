import { FAMILIES } from '../frame/types';
import { NAME_HINT_SLOT_COUNT, writeNameHints } from '../frame/nameHints';
import { parseSeriesId } from '../ingest/seriesAccumulator';
import type { MetricWindow, NodeBatch } from './types';

/**
 * How one metric's baseline + window become one node row of the model input.
 * Row layout (length `sampleCount + SUMMARY_SLOT_COUNT + NAME_HINT_SLOT_COUNT`):
 *   [0, sampleCount)  window resampled to `sampleCount` points, each a squashed robust deviation
 *                     asinh((x − median_base) / scale_base), clipped to ±clip;
 *   sampleCount + 0   relative level change asinh((median_win − median_base) / max(|median_base|, scale)), clipped;
 *   sampleCount + 1   log2(window length in samples) / 9 (so 512 samples → 1);
 *   sampleCount + 2   log2(baseline length in samples) / 12;
 *   sampleCount + 3…  name hints (frame/nameHints.ts): vantage one-hot (server, client, edge),
 *                     1 for an inverted metric (idle, free, success…), 1 for a tail percentile.
 * Every value is unit-free, so byte counters and ratios share one scale.
 */
export interface WindowSpec {
  /** Resampled window length (points); the model's time axis. */
  readonly sampleCount: number;
  /** Shortest accepted incident window, in samples. */
  readonly minWindowSamples: number;
  /** Longest accepted incident window, in samples; longer windows are refused by the caller. */
  readonly maxWindowSamples: number;
  /** Fewest valid (non-NaN) baseline samples needed to normalize a metric. */
  readonly minBaselineSamples: number;
  /** Fraction of the window that must be valid (non-NaN) for the metric to count. */
  readonly minWindowValidFraction: number;
  /** Scale floor relative to |median_base|, so a flat baseline does not turn noise into huge z. */
  readonly relativeScaleFloor: number;
  /** Absolute scale floor (guards a baseline that is exactly zero and flat). */
  readonly absoluteScaleFloor: number;
  /** Squashed values are clipped to ±clip. */
  readonly clip: number;
}

/** Number of summary slots appended after the resampled samples (see {@link WindowSpec}). */
export const SUMMARY_SLOT_COUNT = 3;

/** Default spec used by training and inference. */
export const DEFAULT_WINDOW_SPEC: WindowSpec = {
  sampleCount: 32,
  minWindowSamples: 3,
  maxWindowSamples: 512,
  minBaselineSamples: 3,
  minWindowValidFraction: 0.5,
  relativeScaleFloor: 0.01,
  absoluteScaleFloor: 1e-9,
  clip: 7,
};

/** Row length (values per node) for a spec: samples, summary slots and name-hint slots. */
export function getRowLength(spec: WindowSpec = DEFAULT_WINDOW_SPEC): number {
  return spec.sampleCount + SUMMARY_SLOT_COUNT + NAME_HINT_SLOT_COUNT;
}

// Name hints per metric (id + name): a timeline encodes the same metrics thousands of times.
const hintCache = new Map<string, Float32Array>();
const HINT_CACHE_LIMIT = 20_000;

function findNameHints(metric: MetricWindow): Float32Array {
  const key = metric.name === undefined ? metric.id : `${metric.id}\u0000${metric.name}`;
  let hints = hintCache.get(key);
  if (!hints) {
    const parsed = metric.name === undefined ? parseSeriesId(metric.id) : { name: metric.name, labels: metric.labels ?? parseSeriesId(metric.id).labels };
    hints = new Float32Array(NAME_HINT_SLOT_COUNT);
    writeNameHints(parsed.name, parsed.labels, hints, 0);
    if (hintCache.size >= HINT_CACHE_LIMIT) hintCache.clear();
    hintCache.set(key, hints);
  }
  return hints;
}

/** Robust location/scale of a sample set, ignoring NaN. */
export interface RobustStats {
  readonly median: number;
  /** 1.4826·MAD, or 1.2533·mean absolute deviation when MAD is 0 (common practice: both are σ under normality). */
  readonly scale: number;
  readonly validCount: number;
}

let resampleScratch = new Float64Array(0);
// Reused scratch buffers: encoding runs ~10^5 times per timeline, and typed-array allocation dominated it.
let scratch = new Float64Array(1024);

/** Copy the finite values into the scratch buffer; returns how many there are. */
function collectFinite(values: ArrayLike<number>): number {
  if (scratch.length < values.length) scratch = new Float64Array(values.length * 2);
  let n = 0;
  for (let i = 0; i < values.length; i++) { const v = values[i]; if (Number.isFinite(v)) scratch[n++] = v; }
  return n;
}

/** k-th smallest of a[0..n) by quickselect (Hoare 1961), reordering a in place so a[0..k) ≤ a[k]. */
function selectKth(a: Float64Array, n: number, k: number): number {
  let lo = 0;
  let hi = n - 1;
  while (hi > lo) {
    const pivot = a[(lo + hi) >> 1];
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (a[i] < pivot) i++;
      while (a[j] > pivot) j--;
      if (i <= j) { const t = a[i]; a[i] = a[j]; a[j] = t; i++; j--; }
    }
    if (k <= j) hi = j; else if (k >= i) lo = i; else break;
  }
  return a[k];
}

/** Median of a[0..n) (reorders a); NaN when n = 0. */
function medianInPlace(a: Float64Array, n: number): number {
  if (n === 0) return Number.NaN;
  const mid = n >> 1;
  const upper = selectKth(a, n, mid);
  if (n % 2 === 1) return upper;
  let lower = -Infinity;
  for (let i = 0; i < mid; i++) if (a[i] > lower) lower = a[i];
  return (lower + upper) / 2;
}

/** Median of the finite values (NaN when there are none). */
export function computeMedian(values: ArrayLike<number>): number {
  return medianInPlace(scratch, collectFinite(values));
}

/**
 * Median and robust scale (MAD_n = 1.4826·MAD; Iglewicz & Hoaglin 1993) of the finite values.
 * Returns NaN median and 0 scale when no value is finite.
 */
export function computeRobustStats(values: ArrayLike<number>): RobustStats {
  const validCount = collectFinite(values);
  const median = medianInPlace(scratch, validCount);
  if (validCount === 0) return { median, scale: 0, validCount };
  let meanAbs = 0;
  for (let i = 0; i < validCount; i++) { const d = Math.abs(scratch[i] - median); scratch[i] = d; meanAbs += d; }
  meanAbs /= validCount;
  const mad = medianInPlace(scratch, validCount);
  // A baseline that is mostly one value with rare spikes has MAD 0; the mean deviation still sees the spikes.
  const scale = mad > 0 ? 1.4826 * mad : 1.2533 * meanAbs;
  return { median, scale, validCount };
}

function squash(z: number, clip: number): number {
  const s = Math.asinh(z);
  return s > clip ? clip : s < -clip ? -clip : s;
}

/**
 * Resample `values` (NaN = gap) to `count` points: bin means when shrinking, linear interpolation
 * when stretching. Remaining NaN points take the nearest valid point. Returns null when no value is valid.
 * `out` (length `count`) may be passed to avoid an allocation; it is overwritten and returned.
 */
export function resampleWindow(values: ArrayLike<number>, count: number, out = new Float64Array(count)): Float64Array | null {
  const length = values.length;
  out.fill(Number.NaN);
  if (length >= count) {
    for (let i = 0; i < count; i++) {
      const start = Math.floor((i * length) / count);
      const end = Math.max(start + 1, Math.floor(((i + 1) * length) / count));
      let sum = 0;
      let n = 0;
      for (let j = start; j < end; j++) if (Number.isFinite(values[j])) { sum += values[j]; n++; }
      if (n > 0) out[i] = sum / n;
    }
  } else {
    for (let i = 0; i < count; i++) {
      const position = Math.min(length - 1, Math.max(0, ((i + 0.5) * length) / count - 0.5));
      const lo = Math.floor(position);
      const hi = Math.min(length - 1, lo + 1);
      const a = values[lo];
      const b = values[hi];
      const t = position - lo;
      if (Number.isFinite(a) && Number.isFinite(b)) out[i] = a + (b - a) * t;
      else if (Number.isFinite(a)) out[i] = a;
      else if (Number.isFinite(b)) out[i] = b;
    }
  }
  return fillFromNearest(out);
}

function fillFromNearest(out: Float64Array): Float64Array | null {
  let lastValid = -1;
  for (let i = 0; i < out.length; i++) {
    if (Number.isFinite(out[i])) {
      for (let j = lastValid + 1; j < i; j++) {
        // Gap between two valid points (or before the first): the nearer side wins.
        out[j] = lastValid < 0 || j - lastValid > i - j ? out[i] : out[lastValid];
      }
      lastValid = i;
    }
  }
  if (lastValid < 0) return null;
  for (let j = lastValid + 1; j < out.length; j++) out[j] = out[lastValid];
  return out;
}

/**
 * Encode one metric into `row` (length {@link getRowLength}). Returns false, leaving `row` zero,
 * when the metric cannot be used: a window shorter than `minWindowSamples`, fewer than `minBaselineSamples` valid baseline samples, or
 * less than `minWindowValidFraction` of the window valid, or an empty window.
 */
export function encodeMetricRow(metric: MetricWindow, spec: WindowSpec, row: Float32Array): boolean {
  row.fill(0);
  const windowLength = metric.window.length;
  if (windowLength < Math.max(1, spec.minWindowSamples)) return false;
  const base = computeRobustStats(metric.baseline);
  if (base.validCount < spec.minBaselineSamples) return false;
  let windowValid = 0;
  for (let i = 0; i < windowLength; i++) if (Number.isFinite(metric.window[i])) windowValid++;
  if (windowValid < Math.max(1, spec.minWindowValidFraction * windowLength)) return false;
  if (resampleScratch.length !== spec.sampleCount) resampleScratch = new Float64Array(spec.sampleCount);
  const resampled = resampleWindow(metric.window, spec.sampleCount, resampleScratch);
  if (resampled === null) return false;
  const scale = Math.max(base.scale, spec.relativeScaleFloor * Math.abs(base.median), spec.absoluteScaleFloor);
  for (let i = 0; i < spec.sampleCount; i++) row[i] = squash((resampled[i] - base.median) / scale, spec.clip);
  const windowMedian = computeMedian(metric.window);
  const levelScale = Math.max(Math.abs(base.median), scale);
  row[spec.sampleCount] = squash((windowMedian - base.median) / levelScale, spec.clip);
  row[spec.sampleCount + 1] = Math.log2(windowLength) / 9;
  row[spec.sampleCount + 2] = Math.log2(Math.max(1, metric.baseline.length)) / 12;
  row.set(findNameHints(metric), spec.sampleCount + SUMMARY_SLOT_COUNT);
  return true;
}

const FAMILY_ID_BIGINTS: readonly bigint[] = FAMILIES.map((_, i) => BigInt(i));

/** Family id (index in FAMILIES) of a metric; unknown strings map to 'other'. */
export function getFamilyId(family: string): number {
  const index = (FAMILIES as readonly string[]).indexOf(family);
  return index >= 0 ? index : FAMILIES.indexOf('other');
}

/**
 * Encode one window's metrics as a batch of 1: values [1, N, rowLength], families [1, N], mask [1, N].
 * A metric that cannot be normalized (see {@link encodeMetricRow}) gets mask 0 and zero values.
 * Empty input gives N = 0 (callers should treat that as "nothing to classify").
 */
export function encodeMetricWindows(metrics: readonly MetricWindow[], spec: WindowSpec = DEFAULT_WINDOW_SPEC): NodeBatch {
  return encodeBatch([metrics], spec);
}

/**
 * Encode several windows into one batch [B, N, rowLength]; N = the largest metric count, shorter
 * examples are padded with mask-0 rows (the model ignores them exactly).
 * @throws RangeError when a window is longer than `spec.maxWindowSamples` (programmer error: callers cut windows).
 */
export function encodeBatch(examples: readonly (readonly MetricWindow[])[], spec: WindowSpec = DEFAULT_WINDOW_SPEC): NodeBatch {
  const rowLength = getRowLength(spec);
  const batchSize = examples.length;
  let nodeCount = 0;
  for (const ex of examples) nodeCount = Math.max(nodeCount, ex.length);
  const values = new Float32Array(batchSize * nodeCount * rowLength);
  const families = new BigInt64Array(batchSize * nodeCount);
  const mask = new Float32Array(batchSize * nodeCount);
  const otherId = FAMILY_ID_BIGINTS[FAMILIES.indexOf('other')];
  families.fill(otherId);
  for (let b = 0; b < batchSize; b++) {
    const example = examples[b];
    for (let n = 0; n < example.length; n++) {
      const metric = example[n];
      if (metric.window.length > spec.maxWindowSamples) {
        throw new RangeError(`metric "${metric.id}": expected a window of at most ${spec.maxWindowSamples} samples, got ${metric.window.length}`);
      }
      const offset = (b * nodeCount + n) * rowLength;
      const row = values.subarray(offset, offset + rowLength);
      const isValid = encodeMetricRow(metric, spec, row);
      families[b * nodeCount + n] = FAMILY_ID_BIGINTS[getFamilyId(metric.family)];
      mask[b * nodeCount + n] = isValid ? 1 : 0;
    }
  }
  return { batchSize, nodeCount, windowLength: rowLength, values, families, mask };
}
