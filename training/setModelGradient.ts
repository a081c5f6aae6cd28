/**
 * Exact backpropagation through the forward pass of `forwardSetModel` (training/setModel.ts) for one
 * example: weighted softmax cross-entropy, gradients accumulated into a GradSet. All per-node
 * states live in one reusable workspace, so an example allocates nothing; rows of a ReLU that is
 * off, families an example does not have and zero inputs are skipped, which is exact.
 */
import type { EncodedExample } from './buildDataset';
import { FAMILY_COUNT, getPooledSize, type SetModelShape, type SetModelWeights } from './setModel';

export const PARAM_NAMES = ['w1', 'b1', 'w2', 'b2', 'wc', 'bc', 'wo', 'bo'] as const;
export type ParamName = (typeof PARAM_NAMES)[number];
export type ParamSet = Record<ParamName, Float32Array>;
export type GradSet = Record<ParamName, Float64Array>;

/** Gradient arrays shaped like `w`, zero; in `buffer`s of shared memory when `isShared`. */
export function zeroGrads(w: ParamSet, isShared = false): GradSet {
  const g = {} as GradSet;
  for (const name of PARAM_NAMES) {
    const length = w[name].length;
    g[name] = isShared ? new Float64Array(new SharedArrayBuffer(length * 8)) : new Float64Array(length);
  }
  return g;
}

/** Scratch buffers of one thread, grown on demand to the largest example seen. */
export class GradientWorkspace {
  x = new Float64Array(0);
  h1 = new Float64Array(0);
  h2 = new Float64Array(0);
  nodeFamily = new Int32Array(0);
  readonly famCount = new Float64Array(FAMILY_COUNT);
  readonly pooled: Float64Array;
  readonly dPooled: Float64Array;
  readonly argMax: Int32Array;
  readonly e: Float64Array;
  readonly de: Float64Array;
  readonly logits: Float64Array;
  readonly da2: Float64Array;
  readonly dh1: Float64Array;

  constructor(readonly shape: SetModelShape) {
    const pooledSize = getPooledSize(shape);
    this.pooled = new Float64Array(pooledSize);
    this.dPooled = new Float64Array(pooledSize);
    this.argMax = new Int32Array(FAMILY_COUNT * shape.hiddenSize);
    this.e = new Float64Array(shape.embeddingSize);
    this.de = new Float64Array(shape.embeddingSize);
    this.logits = new Float64Array(shape.classCount);
    this.da2 = new Float64Array(shape.hiddenSize);
    this.dh1 = new Float64Array(shape.hiddenSize);
  }

  reserve(nodeCount: number): void {
    if (this.nodeFamily.length >= nodeCount) return;
    const capacity = Math.max(nodeCount, 2 * this.nodeFamily.length);
    this.x = new Float64Array(capacity * this.shape.featureCount);
    this.h1 = new Float64Array(capacity * this.shape.hiddenSize);
    this.h2 = new Float64Array(capacity * this.shape.hiddenSize);
    this.nodeFamily = new Int32Array(capacity);
  }
}

/** The per-node MLP for every unmasked node into the workspace; returns how many nodes it kept. */
function forwardNodes(w: SetModelWeights, ex: EncodedExample, mask: ArrayLike<number>, ws: GradientWorkspace): number {
  const { featureCount: f, hiddenSize: h } = w.shape;
  const { x, h1, h2, nodeFamily, famCount } = ws;
  const { w1, b1, w2, b2, featureMean, featureStd } = w;
  famCount.fill(0);
  let count = 0;
  for (let n = 0; n < mask.length; n++) {
    if (mask[n] === 0) continue;
    const xo = count * f;
    const ho = count * h;
    for (let i = 0; i < f; i++) x[xo + i] = (ex.features[n * f + i] - featureMean[i]) / featureStd[i];
    const family = ex.familyIds[n];
    // Layer 1: the family's one-hot input selects one row of w1.
    const familyRow = (f + family) * h;
    for (let j = 0; j < h; j++) h1[ho + j] = b1[j] + w1[familyRow + j];
    for (let i = 0; i < f; i++) {
      const v = x[xo + i];
      if (v === 0) continue;
      const r = i * h;
      for (let j = 0; j < h; j++) h1[ho + j] += v * w1[r + j];
    }
    for (let j = 0; j < h; j++) if (h1[ho + j] < 0) h1[ho + j] = 0;
    for (let j = 0; j < h; j++) h2[ho + j] = b2[j];
    for (let i = 0; i < h; i++) {
      const v = h1[ho + i];
      if (v === 0) continue;
      const r = i * h;
      for (let j = 0; j < h; j++) h2[ho + j] += v * w2[r + j];
    }
    for (let j = 0; j < h; j++) if (h2[ho + j] < 0) h2[ho + j] = 0;
    nodeFamily[count] = family;
    famCount[family] += 1;
    count++;
  }
  return count;
}

/**
 * Loss (weighted softmax cross-entropy) of one example, accumulating gradients scaled by `scale`
 * into `g` (none when null). `mask` may be a thinned copy of the example's mask. Returns the
 * unscaled, weighted loss.
 */
export function accumulateExampleGradient(w: SetModelWeights, ex: EncodedExample, mask: ArrayLike<number>, g: GradSet | null, scale: number, lossWeight = 1, ws = new GradientWorkspace(w.shape)): number {
  const { featureCount: f, hiddenSize: h, embeddingSize: d, classCount: c } = w.shape;
  ws.reserve(mask.length);
  const count = forwardNodes(w, ex, mask, ws);
  const { x, h1, h2, nodeFamily, famCount, pooled, dPooled, argMax, e, de, logits, da2, dh1 } = ws;
  const maxOffset = FAMILY_COUNT * h;
  const presenceOffset = 2 * FAMILY_COUNT * h;
  const globalOffset = presenceOffset + FAMILY_COUNT;
  const total = Math.max(count, 1);
  pooled.fill(0);
  argMax.fill(-1);
  for (let idx = 0; idx < count; idx++) {
    const k = nodeFamily[idx];
    const divisor = Math.max(famCount[k], 1);
    const ho = idx * h;
    for (let j = 0; j < h; j++) {
      const v = h2[ho + j];
      pooled[k * h + j] += v / divisor;
      if (v > pooled[maxOffset + k * h + j]) { pooled[maxOffset + k * h + j] = v; argMax[k * h + j] = idx; }
      pooled[globalOffset + j] += v / total;
    }
  }
  for (let k = 0; k < FAMILY_COUNT; k++) pooled[presenceOffset + k] = Math.min(famCount[k], 1);
  const { wc, bc, wo, bo } = w;
  for (let j = 0; j < d; j++) e[j] = bc[j];
  for (let i = 0; i < pooled.length; i++) {
    const v = pooled[i];
    if (v === 0) continue;
    const r = i * d;
    for (let j = 0; j < d; j++) e[j] += v * wc[r + j];
  }
  for (let j = 0; j < d; j++) if (e[j] < 0) e[j] = 0;
  let maxLogit = -Infinity;
  for (let k = 0; k < c; k++) {
    let acc = bo[k];
    for (let j = 0; j < d; j++) acc += e[j] * wo[j * c + k];
    logits[k] = acc;
    if (acc > maxLogit) maxLogit = acc;
  }
  let sum = 0;
  for (let k = 0; k < c; k++) { logits[k] = Math.exp(logits[k] - maxLogit); sum += logits[k]; }
  for (let k = 0; k < c; k++) logits[k] /= sum; // now the probabilities
  const loss = -Math.log(Math.max(logits[ex.label], 1e-12)) * lossWeight;
  if (!g) return loss;
  // Output layer.
  for (let k = 0; k < c; k++) logits[k] = (logits[k] - (k === ex.label ? 1 : 0)) * scale * lossWeight;
  for (let k = 0; k < c; k++) g.bo[k] += logits[k];
  for (let j = 0; j < d; j++) {
    const v = e[j];
    const r = j * c;
    let acc = 0;
    for (let k = 0; k < c; k++) {
      if (v !== 0) g.wo[r + k] += v * logits[k];
      acc += wo[r + k] * logits[k];
    }
    de[j] = v > 0 ? acc : 0;
  }
  // Embedding layer: weights of zero inputs get no gradient; only pooled slots with nodes behind
  // them (mean and max of present families, the global mean) pass a gradient down.
  for (let j = 0; j < d; j++) g.bc[j] += de[j];
  for (let i = 0; i < pooled.length; i++) {
    const v = pooled[i];
    if (v === 0) continue;
    const r = i * d;
    for (let j = 0; j < d; j++) g.wc[r + j] += v * de[j];
  }
  const rowGradient = (i: number): number => {
    const r = i * d;
    let acc = 0;
    for (let j = 0; j < d; j++) acc += wc[r + j] * de[j];
    return acc;
  };
  for (let k = 0; k < FAMILY_COUNT; k++) {
    if (famCount[k] === 0) continue;
    for (let j = 0; j < h; j++) {
      dPooled[k * h + j] = rowGradient(k * h + j);
      dPooled[maxOffset + k * h + j] = argMax[k * h + j] >= 0 ? rowGradient(maxOffset + k * h + j) : 0;
    }
  }
  for (let j = 0; j < h; j++) dPooled[globalOffset + j] = rowGradient(globalOffset + j);
  // Node layers.
  const { w2 } = w;
  for (let idx = 0; idx < count; idx++) {
    const k = nodeFamily[idx];
    const divisor = Math.max(famCount[k], 1);
    const ho = idx * h;
    let isQuiet = true;
    for (let j = 0; j < h; j++) {
      let grad = dPooled[k * h + j] / divisor + dPooled[globalOffset + j] / total;
      if (argMax[k * h + j] === idx) grad += dPooled[maxOffset + k * h + j];
      da2[j] = h2[ho + j] > 0 ? grad : 0;
      if (da2[j] !== 0) isQuiet = false;
    }
    if (isQuiet) continue;
    for (let j = 0; j < h; j++) g.b2[j] += da2[j];
    for (let i = 0; i < h; i++) {
      const v = h1[ho + i];
      if (v === 0) { dh1[i] = 0; continue; }
      const r = i * h;
      let acc = 0;
      for (let j = 0; j < h; j++) {
        g.w2[r + j] += v * da2[j];
        acc += w2[r + j] * da2[j];
      }
      dh1[i] = acc;
    }
    for (let j = 0; j < h; j++) g.b1[j] += dh1[j];
    const xo = idx * f;
    for (let i = 0; i < f; i++) {
      const v = x[xo + i];
      if (v === 0) continue;
      const r = i * h;
      for (let j = 0; j < h; j++) g.w1[r + j] += v * dh1[j];
    }
    const familyRow = (f + k) * h;
    for (let j = 0; j < h; j++) g.w1[familyRow + j] += dh1[j];
  }
  return loss;
}
