/**
 * Metric signatures: a name-aware, model-free description of a window for the incident library.
 * A team's recurring incident shows on the same metrics (same names and labels) with the same
 * shape, which the bundled model's embedding partly washes out (it is trained to forget names).
 * A signature keeps, per metric id, a few of the frozen temporal features of the classifier's
 * encoding (temporalFeatures.ts); two windows compare by the cosine of those features over the
 * metric ids they share.
 */
import type { Family } from '../frame/types';
import { DEFAULT_WINDOW_SPEC, encodeMetricWindows, type WindowSpec } from './encode';
import { downsampleForLibrary } from './libraryEntry';
import { LIBRARY_MAX_POINTS } from './libraryTypes';
import { computeNodeFeatures, MAX_FEATURE, NODE_FEATURE_COUNT } from './temporalFeatures';
import type { MetricWindow } from './types';

/**
 * Node features kept in a signature (indices into computeNodeFeatures' output): the window mean,
 * the four quarter means (onset, persistence, recovery) and max/min. Chosen on the same-services
 * protocol of the few-shot evaluation; all are in squashed robust-z units
 * (asinh of deviations from the baseline median, in baseline robust scales).
 */
export const SIGNATURE_FEATURES: readonly number[] = [0, 1, 2, 3, 4, MAX_FEATURE, MAX_FEATURE + 1];

/**
 * Dead band of a signature feature (squashed units; asinh(z) = 1 ↔ robust z ≈ 1.18): each kept
 * feature x becomes sign(x)·max(|x| − SIGNATURE_DEAD_BAND, 0). The many metrics that only wander
 * inside their baseline's noise then weigh nothing in a cosine, so the few that carry an incident
 * decide it. Chosen on the few-shot evaluation's same-system groups (24 services a protocol, k = 3,
 * best gate setting within a 2-point budget: 0, 0.5, 1 and 1.5 measured; 1 and 1.5 alike, ahead of
 * no dead band by 1–5 points of held-out accuracy depending on the protocol).
 */
export const SIGNATURE_DEAD_BAND = 1;

/** One metric's data as a signature needs it: MetricWindow, LibraryMetricInput and stored entries all fit. */
export interface SignatureMetric {
  readonly id: string;
  readonly family: Family;
  readonly baseline: ArrayLike<number>;
  readonly window: ArrayLike<number>;
}

/** Per metric id, its SIGNATURE_FEATURES values (length SIGNATURE_FEATURES.length). */
export type MetricSignature = ReadonlyMap<string, Float64Array>;

/**
 * The signature of one window. Each metric is first thinned exactly as a library entry stores it
 * (window by bucket means, baseline by picking samples, ≤ LIBRARY_MAX_POINTS points each), so a
 * query read at full resolution and a stored entry of the same data give the same signature; then
 * encoded with `spec` (a fixed product setting, not the model's, so signatures survive model
 * changes), reduced to SIGNATURE_FEATURES and passed through the dead band. Metrics the encoder
 * cannot normalise (too short, baseline of gaps, window mostly gaps — see encodeMetricRow) are left
 * out. A repeated id keeps
 * its first metric. Empty input, or no usable metric, gives an empty signature.
 */
export function computeMetricSignature(metrics: readonly SignatureMetric[], spec: WindowSpec = DEFAULT_WINDOW_SPEC): MetricSignature {
  const thinned: MetricWindow[] = [];
  const seen = new Set<string>();
  for (const m of metrics) {
    if (seen.has(m.id)) continue;
    seen.add(m.id);
    thinned.push({ id: m.id, family: m.family, baseline: thinAsStored(m.baseline, 'pick'), window: thinAsStored(m.window, 'mean') });
  }
  const signature = new Map<string, Float64Array>();
  if (thinned.length === 0) return signature;
  const batch = encodeMetricWindows(thinned, spec);
  const features = computeNodeFeatures(batch.values, batch.nodeCount, spec);
  thinned.forEach((m, n) => {
    if (batch.mask[n] === 0) return;
    signature.set(m.id, Float64Array.from(SIGNATURE_FEATURES, (f) => applyDeadBand(features[n * NODE_FEATURE_COUNT + f])));
  });
  return signature;
}

/** x shrunk towards 0 by SIGNATURE_DEAD_BAND (soft thresholding). */
function applyDeadBand(x: number): number {
  return Math.sign(x) * Math.max(Math.abs(x) - SIGNATURE_DEAD_BAND, 0);
}

/**
 * A series as a library entry stores it. Short series are copied as they are: storage keeps them
 * whole (up to 7-digit rounding, far below anything the robust z-scores resolve), and skipping the
 * rounding keeps matching a large library fast.
 */
function thinAsStored(values: ArrayLike<number>, mode: 'pick' | 'mean'): Float64Array {
  if (values.length <= LIBRARY_MAX_POINTS) return Float64Array.from(values, (v) => (Number.isFinite(v) ? v : Number.NaN));
  return Float64Array.from(downsampleForLibrary(values, LIBRARY_MAX_POINTS, mode), (v) => (v === null ? Number.NaN : v));
}

/**
 * Cosine similarity of two signatures over the metric ids they share: the feature vectors of the
 * shared ids are concatenated (in `a`'s order) and compared as one vector. Returns a value in
 * −1..1; 0 when no id is shared or either side is all zeros there (nothing to compare, so no
 * evidence of similarity). Metrics present on one side only do not count: a window that exports
 * more metrics is not penalised for them.
 */
export function computeSignatureCosine(a: MetricSignature, b: MetricSignature): number {
  let dot = 0;
  let normA = 0;
  let normB = 0;
  for (const [id, va] of a) {
    const vb = b.get(id);
    if (vb === undefined) continue;
    if (vb.length !== va.length) throw new Error(`expected signature vectors of length ${va.length}, got ${vb.length} for metric ${id}`);
    for (let i = 0; i < va.length; i++) { dot += va[i] * vb[i]; normA += va[i] * va[i]; normB += vb[i] * vb[i]; }
  }
  return normA > 0 && normB > 0 ? dot / Math.sqrt(normA * normB) : 0;
}

/** True when the two signatures have at least one metric id in common (else their cosine carries no evidence). */
export function hasSharedMetric(a: MetricSignature, b: MetricSignature): boolean {
  const [small, large] = a.size <= b.size ? [a, b] : [b, a];
  for (const id of small.keys()) if (large.has(id)) return true;
  return false;
}

/** Cosine similarity of two embeddings, −1..1; 0 when either is all zeros. Throws when lengths differ. */
export function computeEmbeddingCosine(a: ArrayLike<number>, b: ArrayLike<number>): number {
  if (a.length !== b.length) throw new Error(`expected embeddings of equal length, got ${a.length} and ${b.length}`);
  let dot = 0;
  let normA = 0;
  let normB = 0;
  for (let i = 0; i < a.length; i++) { dot += a[i] * b[i]; normA += a[i] * a[i]; normB += b[i] * b[i]; }
  return normA > 0 && normB > 0 ? dot / Math.sqrt(normA * normB) : 0;
}

/**
 * How the two similarities are put on one scale: each is standardised (z-score) with the mean and
 * standard deviation it has between incidents and library entries in the evaluation's calibration
 * data, then mixed with `signatureWeight` (1 = signature only, 0 = embedding only).
 */
export interface SimilarityScale {
  readonly signatureWeight: number;
  readonly signatureMean: number;
  readonly signatureSd: number;
  readonly embeddingMean: number;
  readonly embeddingSd: number;
}

/**
 * The combined similarity in standard-deviation units:
 * w·(sig − μ_sig)/σ_sig + (1 − w)·(emb − μ_emb)/σ_emb. When the signature is unknown (the caller
 * gave no metric data) the embedding term alone is used, and vice versa, so the scale stays
 * comparable. Both unknown → −Infinity (never accepted). Throws on a non-positive sd or a weight
 * outside 0..1 (programmer error).
 */
export function combineSimilarity(signatureCosine: number | undefined, embeddingCosine: number | undefined, scale: SimilarityScale): number {
  const w = scale.signatureWeight;
  if (!(w >= 0 && w <= 1)) throw new Error(`expected signatureWeight in 0..1, got ${w}`);
  if (!(scale.signatureSd > 0 && scale.embeddingSd > 0)) throw new Error(`expected positive sds, got ${scale.signatureSd} and ${scale.embeddingSd}`);
  const zSignature = signatureCosine === undefined ? undefined : (signatureCosine - scale.signatureMean) / scale.signatureSd;
  const zEmbedding = embeddingCosine === undefined ? undefined : (embeddingCosine - scale.embeddingMean) / scale.embeddingSd;
  if (zSignature !== undefined && zEmbedding !== undefined) return w * zSignature + (1 - w) * zEmbedding;
  return zSignature ?? zEmbedding ?? Number.NEGATIVE_INFINITY;
}

/** A metric that moved the same way in a window and in a library label's incidents. */
export interface SharedMover {
  readonly id: string;
  readonly direction: 'up' | 'down';
}

/**
 * The metrics that moved alike in `query` and in at least half of `entries` (one label's
 * incidents), strongest first, at most `count`: ids whose signature lies outside the dead band on
 * both sides with the same direction (the sign of the feature of largest magnitude). Strength is
 * the mean, over the entries that agree, of the smaller of the two vector norms (how far both
 * moved). Ties by id. With `familyOf`, the strongest mover of each family comes first (so three
 * percentiles of one latency do not fill the list), then the rest by strength. What the engineer
 * can check a library match against; not the match itself.
 */
export function findSharedMovers(query: MetricSignature, entries: readonly MetricSignature[], count = 3, familyOf?: (id: string) => string): SharedMover[] {
  const needed = Math.ceil(entries.length / 2);
  const movers: { id: string; direction: 'up' | 'down'; strength: number }[] = [];
  for (const [id, vector] of query) {
    const direction = readDirection(vector);
    if (direction === 0) continue;
    let agreeing = 0;
    let strength = 0;
    for (const entry of entries) {
      const other = entry.get(id);
      if (other === undefined || readDirection(other) !== direction) continue;
      agreeing += 1;
      strength += Math.min(norm(vector), norm(other));
    }
    if (agreeing > 0 && agreeing >= needed) movers.push({ id, direction: direction > 0 ? 'up' : 'down', strength: strength / agreeing });
  }
  movers.sort((a, b) => b.strength - a.strength || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0));
  const seenFamilies = new Set<string>();
  const leaders = familyOf === undefined ? movers : movers.filter((m) => {
    const family = familyOf(m.id);
    if (seenFamilies.has(family)) return false;
    seenFamilies.add(family);
    return true;
  });
  const ordered = [...leaders, ...movers.filter((m) => !leaders.includes(m))];
  return ordered.slice(0, Math.max(0, count)).map(({ id, direction }) => ({ id, direction }));
}

/** Sign (−1, 0, 1) of a signature vector's feature of largest magnitude (first of ties). */
function readDirection(vector: Float64Array): number {
  let best = 0;
  for (const x of vector) if (Math.abs(x) > Math.abs(best)) best = x;
  return Math.sign(best);
}

function norm(vector: Float64Array): number {
  let sum = 0;
  for (const x of vector) sum += x * x;
  return Math.sqrt(sum);
}
