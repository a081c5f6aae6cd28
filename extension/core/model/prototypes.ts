/**
 * Few-shot recognition of the team's own incidents: prototypical networks (Snell, Swersky, Zemel,
 * NeurIPS 2017). A class prototype is the mean embedding of its library examples; a query's
 * probability per library class is a softmax of the negative squared Euclidean distances, divided
 * by a temperature. Embeddings are L2-normalised first by default, which makes distances lie in
 * [0, 4] whatever the model version, so the calibrated thresholds below survive a model change.
 */
import { CLASSES } from './types';

/** How embeddings are prepared before distances: `l2` = unit length (cosine geometry), `none` = raw. */
export type EmbeddingNormalization = 'l2' | 'none';

/** A labelled embedding (a library entry or anything shaped like one). */
export interface LabelledEmbedding {
  readonly label: string;
  readonly embedding: ArrayLike<number>;
}

/** Mean embedding of one label. */
export interface Prototype {
  readonly label: string;
  readonly centroid: Float64Array;
  readonly exampleCount: number;
  readonly isBuiltInClass: boolean;
}

/** Distance and probability of one library class for a query. */
export interface PrototypeScore {
  readonly label: string;
  readonly squaredDistance: number;
  readonly probability: number;
  readonly exampleCount: number;
  readonly isBuiltInClass: boolean;
}

/** Options shared by prototype scoring and blending. */
export interface PrototypeOptions {
  readonly normalization: EmbeddingNormalization;
  /** Softmax temperature in squared-distance units; smaller = sharper. */
  readonly temperature: number;
}

/**
 * Defaults from training/evaluateFewShot.ts with the bundled model 0.1.0: l2 geometry (it matched
 * or beat raw distances on the simulator's held-out fault types) and a temperature of about 5 % of
 * the median prototype distance. Callers may override them.
 */
export const DEFAULT_PROTOTYPE_OPTIONS: PrototypeOptions = { normalization: 'l2', temperature: 0.016 };

/**
 * The embedding prepared for distances: a Float64Array copy, unit length when `normalization` is
 * `l2`. A zero vector stays zero (no direction to keep). Throws on NaN/Infinity (programmer error:
 * the classifier never emits them, and a NaN distance would silently rank last).
 */
export function prepareEmbedding(embedding: ArrayLike<number>, normalization: EmbeddingNormalization): Float64Array {
  const out = Float64Array.from(embedding);
  let norm = 0;
  for (let i = 0; i < out.length; i++) {
    if (!Number.isFinite(out[i])) throw new Error(`expected a finite embedding, got ${out[i]} at index ${i}`);
    norm += out[i] * out[i];
  }
  if (normalization === 'l2' && norm > 0) {
    const scale = 1 / Math.sqrt(norm);
    for (let i = 0; i < out.length; i++) out[i] *= scale;
  }
  return out;
}

/**
 * One prototype per label, in order of first appearance: the mean of the (prepared) embeddings.
 * Empty input gives no prototypes. Throws when embeddings differ in length (mixing model versions).
 */
export function computePrototypes(examples: readonly LabelledEmbedding[], normalization: EmbeddingNormalization): Prototype[] {
  const sums = new Map<string, { sum: Float64Array; count: number }>();
  let size = -1;
  for (const example of examples) {
    const v = prepareEmbedding(example.embedding, normalization);
    if (size === -1) size = v.length;
    if (v.length !== size) throw new Error(`expected embeddings of length ${size}, got ${v.length} for label ${example.label}`);
    const slot = sums.get(example.label) ?? { sum: new Float64Array(size), count: 0 };
    for (let i = 0; i < size; i++) slot.sum[i] += v[i];
    slot.count += 1;
    sums.set(example.label, slot);
  }
  return [...sums].map(([label, { sum, count }]) => ({
    label, centroid: sum.map((s) => s / count), exampleCount: count,
    isBuiltInClass: (CLASSES as readonly string[]).includes(label),
  }));
}

/** Squared Euclidean distance; throws when lengths differ. */
export function squaredDistance(a: ArrayLike<number>, b: ArrayLike<number>): number {
  if (a.length !== b.length) throw new Error(`expected vectors of equal length, got ${a.length} and ${b.length}`);
  let d = 0;
  for (let i = 0; i < a.length; i++) { const t = a[i] - b[i]; d += t * t; }
  return d;
}

/**
 * Probability per prototype for a query embedding: softmax(−d²/temperature) over the prototypes,
 * sorted by distance (nearest first). No prototypes → empty array. The probabilities say which
 * library class is nearest, not whether the query is near any; blendVerdict gates that.
 */
export function scorePrototypes(embedding: ArrayLike<number>, prototypes: readonly Prototype[], options: PrototypeOptions): PrototypeScore[] {
  if (!(options.temperature > 0)) throw new Error(`expected temperature > 0, got ${options.temperature}`);
  if (prototypes.length === 0) return [];
  const query = prepareEmbedding(embedding, options.normalization);
  const distances = prototypes.map((p) => squaredDistance(query, p.centroid));
  const logits = distances.map((d) => -d / options.temperature);
  const probabilities = softmax(logits);
  return prototypes
    .map((p, i) => ({ label: p.label, squaredDistance: distances[i], probability: probabilities[i], exampleCount: p.exampleCount, isBuiltInClass: p.isBuiltInClass }))
    .sort((a, b) => a.squaredDistance - b.squaredDistance);
}

/** Numerically stable softmax (subtracts the max logit). */
export function softmax(logits: readonly number[]): number[] {
  const max = Math.max(...logits);
  const exps = logits.map((l) => Math.exp(l - max));
  const total = exps.reduce((s, e) => s + e, 0);
  return exps.map((e) => e / total);
}
