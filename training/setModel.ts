/**
 * The trained set model on top of the frozen temporal transform, as plain numbers: its weights,
 * a seeded initializer and a reference forward pass in plain TypeScript. The trainer (tfjs) and the
 * ONNX writer both follow exactly this forward pass; tests compare it with onnxruntime.
 *
 * Per node: standardized temporal features ⊕ one-hot family → two ReLU layers (width hiddenSize).
 * Readout, per family k over the unmasked members: mean and max of the node states, plus a
 * presence flag; and the mean over all unmasked nodes. Mean and max do not grow with the number of
 * members, so a family with many correlated copies (percentiles, pods) does not outweigh the rest,
 * and the result is exactly invariant to node order. → ReLU embedding → logits.
 */
import { FAMILIES } from '../extension/core/frame/types';
import { createMulberry32 } from '../extension/core/random';
import { NODE_FEATURE_COUNT } from '../extension/core/model/temporalFeatures';

export const FAMILY_COUNT = FAMILIES.length;

export interface SetModelShape {
  readonly featureCount: number;
  readonly hiddenSize: number;
  readonly embeddingSize: number;
  readonly classCount: number;
}

/** All weights row-major: wX is [inputs, outputs]. */
export interface SetModelWeights {
  readonly shape: SetModelShape;
  readonly featureMean: Float32Array;
  readonly featureStd: Float32Array;
  readonly w1: Float32Array; readonly b1: Float32Array;
  readonly w2: Float32Array; readonly b2: Float32Array;
  readonly wc: Float32Array; readonly bc: Float32Array;
  readonly wo: Float32Array; readonly bo: Float32Array;
}

/** Width of the pooled vector fed to the embedding layer. */
export function getPooledSize(shape: SetModelShape): number {
  return FAMILY_COUNT * 2 * shape.hiddenSize + FAMILY_COUNT + shape.hiddenSize;
}

/** Deterministic pseudo-random generator (mulberry32), so training is reproducible from a seed. */
export const createRandom = createMulberry32;

function initMatrix(rows: number, cols: number, random: () => number): Float32Array {
  // He-uniform initialization (He et al. 2015) for ReLU layers.
  const limit = Math.sqrt(6 / rows);
  const m = new Float32Array(rows * cols);
  for (let i = 0; i < m.length; i++) m[i] = (random() * 2 - 1) * limit;
  return m;
}

/** Fresh weights for `shape`, seeded; feature normalization starts as identity. */
export function initSetModel(shape: SetModelShape, seed: number): SetModelWeights {
  const random = createRandom(seed);
  const inputSize = shape.featureCount + FAMILY_COUNT;
  return {
    shape,
    featureMean: new Float32Array(shape.featureCount),
    featureStd: new Float32Array(shape.featureCount).fill(1),
    w1: initMatrix(inputSize, shape.hiddenSize, random), b1: new Float32Array(shape.hiddenSize),
    w2: initMatrix(shape.hiddenSize, shape.hiddenSize, random), b2: new Float32Array(shape.hiddenSize),
    wc: initMatrix(getPooledSize(shape), shape.embeddingSize, random), bc: new Float32Array(shape.embeddingSize),
    wo: initMatrix(shape.embeddingSize, shape.classCount, random), bo: new Float32Array(shape.classCount),
  };
}

/** Default architecture of the bundled model. */
export const DEFAULT_SHAPE: SetModelShape = { featureCount: NODE_FEATURE_COUNT, hiddenSize: 64, embeddingSize: 64, classCount: 8 };

function denseRelu(input: Float64Array, w: Float32Array, b: Float32Array, outSize: number, isRelu: boolean): Float64Array {
  const inSize = input.length;
  const out = new Float64Array(outSize);
  for (let j = 0; j < outSize; j++) out[j] = b[j];
  for (let i = 0; i < inSize; i++) {
    const x = input[i];
    if (x === 0) continue;
    const rowOffset = i * outSize;
    for (let j = 0; j < outSize; j++) out[j] += x * w[rowOffset + j];
  }
  if (isRelu) for (let j = 0; j < outSize; j++) if (out[j] < 0) out[j] = 0;
  return out;
}

/**
 * Reference forward pass for one example: node features [N, featureCount], family ids [N], mask [N].
 * Returns logits [classCount] and embedding [embeddingSize] in float64.
 */
export function forwardSetModel(weights: SetModelWeights, features: Float32Array, familyIds: ArrayLike<number>, mask: ArrayLike<number>): { logits: Float64Array; embedding: Float64Array } {
  const { featureCount: f, hiddenSize: h } = weights.shape;
  const nodeCount = mask.length;
  const famSum = new Float64Array(FAMILY_COUNT * h);
  const famMax = new Float64Array(FAMILY_COUNT * h);
  const famCount = new Float64Array(FAMILY_COUNT);
  const globalSum = new Float64Array(h);
  let total = 0;
  const input = new Float64Array(f + FAMILY_COUNT);
  for (let n = 0; n < nodeCount; n++) {
    input.fill(0);
    for (let i = 0; i < f; i++) input[i] = (features[n * f + i] - weights.featureMean[i]) / weights.featureStd[i];
    const family = familyIds[n];
    input[f + family] = 1;
    const state = denseRelu(denseRelu(input, weights.w1, weights.b1, h, true), weights.w2, weights.b2, h, true);
    const m = mask[n];
    famCount[family] += m;
    total += m;
    for (let j = 0; j < h; j++) {
      const v = state[j] * m;
      famSum[family * h + j] += v;
      if (v > famMax[family * h + j]) famMax[family * h + j] = v;
      globalSum[j] += v;
    }
  }
  const pooled = new Float64Array(getPooledSize(weights.shape));
  for (let k = 0; k < FAMILY_COUNT; k++) {
    for (let j = 0; j < h; j++) {
      pooled[k * h + j] = famSum[k * h + j] / Math.max(famCount[k], 1);
      pooled[FAMILY_COUNT * h + k * h + j] = famMax[k * h + j];
    }
    pooled[2 * FAMILY_COUNT * h + k] = Math.min(famCount[k], 1);
  }
  for (let j = 0; j < h; j++) pooled[2 * FAMILY_COUNT * h + FAMILY_COUNT + j] = globalSum[j] / Math.max(total, 1);
  const embedding = denseRelu(pooled, weights.wc, weights.bc, weights.shape.embeddingSize, true);
  const logits = denseRelu(embedding, weights.wo, weights.bo, weights.shape.classCount, false);
  return { logits, embedding };
}
