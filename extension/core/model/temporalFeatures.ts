import { getRowLength, SUMMARY_SLOT_COUNT, type WindowSpec } from './encode';
import { NAME_HINT_SLOT_COUNT } from '../frame/nameHints';

/**
 * The frozen per-metric temporal transform: a fixed, deterministic map from one encoded node row
 * (see WindowSpec) to NODE_FEATURE_COUNT numbers. It has no trained weights, so training computes
 * it once per example and the ONNX graph computes the same numbers with plain nodes
 * (MatMul, ReduceMax/Min/Mean, Relu, Abs, Greater/Less + Cast). Feature order:
 *   0      mean of the samples
 *   1..4   means of the four quarters (onset, persistence, recovery)
 *   5      least-squares slope over the window (per window length, unit: squashed z per window)
 *   6..8   DCT-II coefficients k = 1, 2, 3 (coarse shape)
 *   9..11  the summary slots (relative level, window length code, baseline length code)
 *   12..16 the name hints (vantage server, client, edge; inverted polarity; tail percentile), passed through
 *   17, 18 max, min of the samples
 *   19, 20 mean of positive part, mean of negative part
 *   21     mean absolute first difference (roughness: spikes, flapping)
 *   22..25 fraction of samples above +a, above +b, below −a, below −b (a, b = FRACTION_THRESHOLDS)
 */
export const NODE_FEATURE_COUNT = 9 + SUMMARY_SLOT_COUNT + NAME_HINT_SLOT_COUNT + 9;

/** Number of leading features computed by the linear projection (see {@link buildLinearProjection}). */
export const LINEAR_FEATURE_COUNT = NODE_FEATURE_COUNT - 9;

/** Index of the first feature after the linear ones: max of the samples. */
export const MAX_FEATURE = LINEAR_FEATURE_COUNT;

/** Thresholds (in squashed units: asinh(z)) of the exceedance fractions; asinh(z)=1.5 ↔ z≈2.1, 3 ↔ z≈10. */
export const FRACTION_THRESHOLDS: readonly [number, number] = [1.5, 3];

/**
 * The fixed projection matrix P, row-major [rowLength, LINEAR_FEATURE_COUNT], so that
 * linear features = row · P. Deterministic for a given spec.
 */
export function buildLinearProjection(spec: WindowSpec): Float32Array {
  const s = spec.sampleCount;
  const rowLength = getRowLength(spec);
  const k = LINEAR_FEATURE_COUNT;
  const p = new Float32Array(rowLength * k);
  const center = (s - 1) / 2;
  let sumSquares = 0;
  for (let t = 0; t < s; t++) sumSquares += (t - center) ** 2;
  const quarter = s / 4;
  for (let t = 0; t < s; t++) {
    p[t * k + 0] = 1 / s;
    const q = Math.min(3, Math.floor(t / quarter));
    p[t * k + 1 + q] = 1 / quarter;
    // Slope per whole window (× (s − 1)) so short and long resamplings read alike.
    p[t * k + 5] = ((t - center) / sumSquares) * (s - 1);
    for (let f = 1; f <= 3; f++) p[t * k + 5 + f] = Math.cos((Math.PI * f * (t + 0.5)) / s) * (2 / s);
  }
  for (let slot = 0; slot < rowLength - s; slot++) p[(s + slot) * k + 9 + slot] = 1;
  return p;
}

/**
 * Compute the node features of `rowCount` encoded rows (row-major [rowCount, rowLength]).
 * Returns row-major [rowCount, NODE_FEATURE_COUNT] float32. Rows of masked nodes (all zeros)
 * give the features of a flat series; callers mask them anyway. Input must be finite (encode guarantees it).
 */
export function computeNodeFeatures(values: Float32Array, rowCount: number, spec: WindowSpec, projection = buildLinearProjection(spec)): Float32Array {
  const s = spec.sampleCount;
  const rowLength = getRowLength(spec);
  const k = LINEAR_FEATURE_COUNT;
  const out = new Float32Array(rowCount * NODE_FEATURE_COUNT);
  const [a, b] = FRACTION_THRESHOLDS;
  for (let r = 0; r < rowCount; r++) {
    const row = values.subarray(r * rowLength, (r + 1) * rowLength);
    const o = r * NODE_FEATURE_COUNT;
    for (let f = 0; f < k; f++) {
      let acc = 0;
      for (let t = 0; t < rowLength; t++) acc += row[t] * projection[t * k + f];
      out[o + f] = acc;
    }
    let max = -Infinity;
    let min = Infinity;
    let pos = 0;
    let neg = 0;
    let rough = 0;
    const counts = [0, 0, 0, 0];
    for (let t = 0; t < s; t++) {
      const x = row[t];
      if (x > max) max = x;
      if (x < min) min = x;
      if (x > 0) pos += x; else neg -= x;
      if (t > 0) rough += Math.abs(x - row[t - 1]);
      if (x > a) counts[0]++;
      if (x > b) counts[1]++;
      if (x < -a) counts[2]++;
      if (x < -b) counts[3]++;
    }
    const m = o + MAX_FEATURE;
    out[m] = max;
    out[m + 1] = min;
    out[m + 2] = pos / s;
    out[m + 3] = neg / s;
    out[m + 4] = rough / (s - 1);
    for (let c = 0; c < 4; c++) out[m + 5 + c] = counts[c] / s;
  }
  return out;
}
