/**
 * Small tfjs building blocks shared by the neural baselines: seeded dense layers, the per-node
 * input encoder (MLP over the row + family embedding), masked pooling and tensor conversion.
 *
 * Speed note (measured, tfjs-backend-cpu 4.22): element-wise ops that broadcast a size-1 axis,
 * gathers and reductions over a non-last axis fall back to per-element index arithmetic and were
 * 10–100× slower than matMul here. So masks, pooling weights, one-hot families and the graph
 * adjacency are precomputed in plain JS per batch, and every broadcast is written as a matMul.
 */
import * as tf from '@tensorflow/tfjs-core';
import { FAMILIES } from '../../extension/core/frame/types';
import type { NodeBatch } from '../../extension/core/model/types';
import { drawGlorotUniform } from './seededRandom';

/** A fully connected layer y = x·W + b with W [in, out] and b stored as [1, out]. */
export interface Dense {
  readonly weight: tf.Variable;
  readonly bias: tf.Variable;
}

/** Creates a dense layer with Glorot-uniform weights drawn from `random` and zero bias. */
export function createDense(inSize: number, outSize: number, random: () => number): Dense {
  return {
    weight: tf.variable(tf.tensor2d(drawGlorotUniform(inSize, outSize, random), [inSize, outSize])),
    bias: tf.variable(tf.zeros([1, outSize])),
  };
}

/** x·W + 1·b for x [M, in]; the bias goes through a matMul so its gradient is a matMul too. */
export function applyDense2d(layer: Dense, x: tf.Tensor2D): tf.Tensor2D {
  const ones = tf.ones([x.shape[0], 1]) as tf.Tensor2D;
  return tf.add(tf.matMul(x, layer.weight as tf.Tensor2D), tf.matMul(ones, layer.bias as tf.Tensor2D));
}

/** Applies a dense layer to the last axis of a 3-D tensor [B, N, in] → [B, N, out]. */
export function applyDense3d(layer: Dense, x: tf.Tensor3D): tf.Tensor3D {
  const [b, n, inSize] = x.shape;
  const y = applyDense2d(layer, tf.reshape(x, [b * n, inSize]));
  return tf.reshape(y, [b, n, layer.weight.shape[1] ?? 0]);
}

/** The trainable variables of dense layers, for the optimiser. */
export function listDenseVariables(layers: readonly Dense[]): tf.Variable[] {
  return layers.flatMap((l) => [l.weight, l.bias]);
}

/** A NodeBatch as tensors plus the constants every baseline needs, all computed once per batch. */
export interface BatchTensors {
  readonly batchSize: number;
  readonly nodeCount: number;
  /** [B, N, row] with NaN replaced by 0. */
  readonly values: tf.Tensor3D;
  /** [B·N, FAMILIES.length] one-hot family ids. */
  readonly familyOneHot: tf.Tensor2D;
  /** [B, N] 1 for real metrics, 0 for padding. */
  readonly mask: tf.Tensor2D;
  /** [B·N, 1] the mask as a column, for matMul broadcasting. */
  readonly maskColumn: tf.Tensor2D;
  /** [B, 1, N] = mask / max(1, count): multiplying gives the masked mean over nodes. */
  readonly meanWeights: tf.Tensor3D;
  /** [B, 1, N] = mask: multiplying gives the masked sum over nodes. */
  readonly sumWeights: tf.Tensor3D;
}

/** Converts a NodeBatch to tensors; NaN values become 0 (the encoder's gap convention is kept by the mask). */
export function toBatchTensors(batch: NodeBatch): BatchTensors {
  const { batchSize: b, nodeCount: n, windowLength: w } = batch;
  const values = new Float32Array(batch.values.length);
  for (let i = 0; i < values.length; i++) values[i] = Number.isFinite(batch.values[i]) ? batch.values[i] : 0;
  const familyCount = FAMILIES.length;
  const oneHot = new Float32Array(b * n * familyCount);
  for (let i = 0; i < b * n; i++) oneHot[i * familyCount + Number(batch.families[i])] = 1;
  const meanWeights = new Float32Array(b * n);
  for (let e = 0; e < b; e++) {
    let count = 0;
    for (let j = 0; j < n; j++) count += batch.mask[e * n + j];
    for (let j = 0; j < n; j++) meanWeights[e * n + j] = batch.mask[e * n + j] / Math.max(1, count);
  }
  return {
    batchSize: b,
    nodeCount: n,
    values: tf.tensor3d(values, [b, n, w]),
    familyOneHot: tf.tensor2d(oneHot, [b * n, familyCount]),
    mask: tf.tensor2d(batch.mask, [b, n]),
    maskColumn: tf.tensor2d(batch.mask, [b * n, 1]),
    meanWeights: tf.tensor3d(meanWeights, [b, 1, n]),
    sumWeights: tf.tensor3d(batch.mask, [b, 1, n]),
  };
}

/** Returns the mask repeated over a hidden axis of `size`, [B, N, size] (a constant, no gradient). */
export function expandMask(input: BatchTensors, size: number): tf.Tensor3D {
  return tf.reshape(tf.matMul(input.maskColumn, tf.ones([1, size]) as tf.Tensor2D), [input.batchSize, input.nodeCount, size]);
}

/** Per-node input encoder: h0 = ReLU(MLP(row) + embedding(family)), shape [B, N, H]. */
export interface NodeEncoder {
  readonly hidden: Dense;
  readonly out: Dense;
  readonly familyEmbedding: tf.Variable;
}

/** Creates a node encoder for rows of `rowLength` values and hidden size `size`. */
export function createNodeEncoder(rowLength: number, size: number, random: () => number): NodeEncoder {
  return {
    hidden: createDense(rowLength, 2 * size, random),
    out: createDense(2 * size, size, random),
    familyEmbedding: createFamilyEmbedding(size, random),
  };
}

/** A [FAMILIES.length, size] embedding table. */
export function createFamilyEmbedding(size: number, random: () => number): tf.Variable {
  return tf.variable(tf.tensor2d(drawGlorotUniform(FAMILIES.length, size, random), [FAMILIES.length, size]));
}

/** Embedding rows of each node's family, [B·N, size]. */
export function lookUpFamilies(embedding: tf.Variable, input: BatchTensors): tf.Tensor2D {
  return tf.matMul(input.familyOneHot, embedding as tf.Tensor2D);
}

/** Applies the node encoder; masked nodes are zeroed so they carry nothing into any aggregation. */
export function applyNodeEncoder(encoder: NodeEncoder, input: BatchTensors): tf.Tensor3D {
  const { batchSize: b, nodeCount: n } = input;
  const rows = tf.reshape(input.values, [b * n, input.values.shape[2]]) as tf.Tensor2D;
  const perRow = applyDense2d(encoder.out, tf.relu(applyDense2d(encoder.hidden, rows)));
  const h = tf.relu(tf.add(perRow, lookUpFamilies(encoder.familyEmbedding, input)));
  const size = encoder.out.weight.shape[1] ?? 0;
  return tf.mul(tf.reshape(h, [b, n, size]), expandMask(input, size));
}

/** Variables of a node encoder. */
export function listEncoderVariables(encoder: NodeEncoder): tf.Variable[] {
  return [...listDenseVariables([encoder.hidden, encoder.out]), encoder.familyEmbedding];
}

/** Sum over unmasked nodes, [B,N,H] → [B,H]. */
export function poolMaskedSum(h: tf.Tensor3D, input: BatchTensors): tf.Tensor2D {
  return tf.reshape(tf.matMul(input.sumWeights, h), [input.batchSize, h.shape[2]]);
}

/** Mean over unmasked nodes, [B,N,H] → [B,H]; an all-masked example gives zeros, not NaN. */
export function poolMaskedMean(h: tf.Tensor3D, input: BatchTensors): tf.Tensor2D {
  return tf.reshape(tf.matMul(input.meanWeights, h), [input.batchSize, h.shape[2]]);
}

/** Two-layer classifier head on pooled features: logits = W2·ReLU(W1·x + b1) + b2. */
export function applyHead(head: readonly [Dense, Dense], pooled: tf.Tensor2D): tf.Tensor2D {
  return applyDense2d(head[1], tf.relu(applyDense2d(head[0], pooled)));
}
