/**
 * Small tfjs building blocks shared by the neural baselines: seeded dense layers, the per-node
 * input encoder (MLP over the window + family embedding), masked pooling and tensor conversion.
 */
import * as tf from '@tensorflow/tfjs-core';
import { FAMILIES } from '../../extension/core/frame/types';
import type { NodeBatch } from '../../extension/core/model/types';
import { drawGlorotUniform } from './seededRandom';

/** A fully connected layer y = x·W + b with W [in, out]. */
export interface Dense {
  readonly weight: tf.Variable;
  readonly bias: tf.Variable;
}

/** Creates a dense layer with Glorot-uniform weights drawn from `random` and zero bias. */
export function createDense(inSize: number, outSize: number, random: () => number): Dense {
  return {
    weight: tf.variable(tf.tensor2d(drawGlorotUniform(inSize, outSize, random), [inSize, outSize])),
    bias: tf.variable(tf.zeros([outSize])),
  };
}

/** Applies a dense layer to the last axis of a 2-D or 3-D tensor. */
export function applyDense<T extends tf.Tensor2D | tf.Tensor3D>(layer: Dense, x: T): T {
  const shape = x.shape;
  const inSize = shape[shape.length - 1];
  const flat = tf.reshape(x, [-1, inSize ?? 0]) as tf.Tensor2D;
  const y = tf.add(tf.matMul(flat, layer.weight as tf.Tensor2D), layer.bias);
  const outShape: number[] = [...shape.slice(0, -1), layer.weight.shape[1] ?? 0];
  return tf.reshape<tf.Rank>(y, outShape) as T;
}

/** The trainable variables of dense layers, for the optimiser. */
export function listDenseVariables(layers: readonly Dense[]): tf.Variable[] {
  return layers.flatMap((l) => [l.weight, l.bias]);
}

/** A NodeBatch as tensors: values [B,N,W] with NaN replaced by 0, family ids [B,N] int32, mask [B,N]. */
export interface BatchTensors {
  readonly values: tf.Tensor3D;
  readonly families: tf.Tensor2D;
  readonly mask: tf.Tensor2D;
}

/** Converts a NodeBatch to tensors; NaN values become 0 (the encoder's gap convention is kept by the mask). */
export function toBatchTensors(batch: NodeBatch): BatchTensors {
  const { batchSize: b, nodeCount: n, windowLength: w } = batch;
  const values = new Float32Array(batch.values.length);
  for (let i = 0; i < values.length; i++) values[i] = Number.isFinite(batch.values[i]) ? batch.values[i] : 0;
  const families = new Int32Array(b * n);
  for (let i = 0; i < families.length; i++) families[i] = Number(batch.families[i]);
  return {
    values: tf.tensor3d(values, [b, n, w]),
    families: tf.tensor2d(families, [b, n], 'int32'),
    mask: tf.tensor2d(batch.mask, [b, n]),
  };
}

/** Per-node input encoder: h0 = MLP(window values) + embedding(family), shape [B, N, H]. */
export interface NodeEncoder {
  readonly hidden: Dense;
  readonly out: Dense;
  readonly familyEmbedding: tf.Variable;
}

/** Creates a node encoder for windows of `windowLength` samples and hidden size `size`. */
export function createNodeEncoder(windowLength: number, size: number, random: () => number): NodeEncoder {
  return {
    hidden: createDense(windowLength, 2 * size, random),
    out: createDense(2 * size, size, random),
    familyEmbedding: tf.variable(tf.tensor2d(drawGlorotUniform(FAMILIES.length, size, random), [FAMILIES.length, size])),
  };
}

/** Applies the node encoder; masked nodes are zeroed so they carry nothing into any aggregation. */
export function applyNodeEncoder(encoder: NodeEncoder, input: BatchTensors): tf.Tensor3D {
  const perWindow = applyDense(encoder.out, tf.relu(applyDense(encoder.hidden, input.values)));
  const family = tf.gather(encoder.familyEmbedding, input.families) as unknown as tf.Tensor3D;
  return tf.mul(tf.relu(tf.add(perWindow, family)), tf.expandDims(input.mask, 2));
}

/** Variables of a node encoder. */
export function listEncoderVariables(encoder: NodeEncoder): tf.Variable[] {
  return [...listDenseVariables([encoder.hidden, encoder.out]), encoder.familyEmbedding];
}

/**
 * Sum over unmasked nodes, [B,N,H] → [B,H], written as mask[B,1,N] · h[B,N,H] because the CPU
 * backend reduces a middle axis through a slow element-wise transpose.
 */
export function poolMaskedSum(h: tf.Tensor3D, mask: tf.Tensor2D): tf.Tensor2D {
  const [b, , size] = h.shape;
  return tf.reshape(tf.matMul(tf.expandDims(mask, 1) as tf.Tensor3D, h), [b, size]);
}

/** Mean over unmasked nodes, [B,N,H] → [B,H]; an all-masked example gives zeros, not NaN. */
export function poolMaskedMean(h: tf.Tensor3D, mask: tf.Tensor2D): tf.Tensor2D {
  const count = tf.maximum(tf.sum(mask, 1, true), 1);
  return tf.div(poolMaskedSum(h, mask), count);
}
