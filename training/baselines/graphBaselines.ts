/**
 * GCN-style and GIN-style baselines on the fully connected metric graph (one node per metric,
 * an edge between every pair of unmasked nodes).
 */
import * as tf from '@tensorflow/tfjs-core';
import {
  applyDense, applyNodeEncoder, createDense, createNodeEncoder, listDenseVariables, listEncoderVariables,
  poolMaskedMean, poolMaskedSum, type BatchTensors,
} from './layers';
import type { NodeSetModel, NodeSetModelSpec } from './nodeSetModel';

/**
 * Returns A + I of the complete graph over unmasked nodes, [B,N,N]: entry (i,j) = mask_i·mask_j,
 * which includes the self-loop (i,i) of every unmasked node and nothing for masked ones.
 */
export function buildCompleteAdjacency(mask: tf.Tensor2D): tf.Tensor3D {
  return tf.mul(tf.expandDims(mask, 2), tf.expandDims(mask, 1)) as tf.Tensor3D;
}

/**
 * Symmetric normalisation D^-1/2 Ã D^-1/2 of an adjacency that already holds its self-loops,
 * with D the row sums of Ã (Kipf & Welling 2017). Rows of degree 0 (masked nodes) stay 0.
 */
export function normalizeAdjacency(adjacencyWithSelfLoops: tf.Tensor3D): tf.Tensor3D {
  const degree = tf.sum(adjacencyWithSelfLoops, 2) as tf.Tensor2D;
  const inverseRoot = tf.where(tf.greater(degree, 0), tf.rsqrt(tf.maximum(degree, 1e-12)), tf.zerosLike(degree));
  return tf.mul(tf.mul(tf.expandDims(inverseRoot, 2), adjacencyWithSelfLoops), tf.expandDims(inverseRoot, 1)) as tf.Tensor3D;
}

/** One GCN propagation without the non-linearity: Â · H · W, with Â [B,N,N], H [B,N,F], W [F,F']. */
export function propagateGcn(normalizedAdjacency: tf.Tensor3D, h: tf.Tensor3D, weight: tf.Tensor2D): tf.Tensor3D {
  const [b, n, f] = h.shape;
  const transformed = tf.reshape(tf.matMul(tf.reshape(h, [b * n, f]), weight), [b, n, weight.shape[1]]) as tf.Tensor3D;
  return tf.matMul(normalizedAdjacency, transformed);
}

/** GCN-style baseline: node encoder, 2 GCN layers (ReLU), masked mean readout, 2-layer classifier. */
export function createGcnBaseline(spec: NodeSetModelSpec, random: () => number): NodeSetModel {
  const size = spec.hiddenSize;
  const encoder = createNodeEncoder(spec.windowLength, size, random);
  const layers = [createDense(size, size, random), createDense(size, size, random)];
  const head = [createDense(size, size, random), createDense(size, spec.classCount, random)];
  return {
    name: 'GCN (2 layers, mean readout)',
    variables: [...listEncoderVariables(encoder), ...listDenseVariables(layers), ...listDenseVariables(head)],
    computeLogits(input: BatchTensors): tf.Tensor2D {
      const adjacency = normalizeAdjacency(buildCompleteAdjacency(input.mask));
      let h = applyNodeEncoder(encoder, input);
      for (const layer of layers) {
        h = tf.relu(tf.add(propagateGcn(adjacency, h, layer.weight as tf.Tensor2D), layer.bias)) as tf.Tensor3D;
      }
      const pooled = poolMaskedMean(h, input.mask);
      return applyDense(head[1], tf.relu(applyDense(head[0], pooled)));
    },
  };
}

/**
 * GIN-style baseline (Xu et al. 2019): h' = MLP((1+ε)·h_i + Σ_{j≠i} h_j) over unmasked neighbours
 * on the complete graph, learnable ε per layer, 2 layers, sum readout, 2-layer classifier.
 */
export function createGinBaseline(spec: NodeSetModelSpec, random: () => number): NodeSetModel {
  const size = spec.hiddenSize;
  const encoder = createNodeEncoder(spec.windowLength, size, random);
  const mlps = [0, 1].map(() => [createDense(size, size, random), createDense(size, size, random)]);
  const epsilons = [tf.variable(tf.scalar(0)), tf.variable(tf.scalar(0))];
  const head = [createDense(size, size, random), createDense(size, spec.classCount, random)];
  return {
    name: 'GIN (2 layers, sum readout)',
    variables: [...listEncoderVariables(encoder), ...listDenseVariables(mlps.flat()), ...epsilons, ...listDenseVariables(head)],
    computeLogits(input: BatchTensors): tf.Tensor2D {
      const mask3 = tf.expandDims(input.mask, 2);
      let h = applyNodeEncoder(encoder, input);
      mlps.forEach((mlp, layer) => {
        // h is zero on masked nodes, so the set sum only sees real neighbours.
        const neighbourSum = tf.sub(tf.expandDims(poolMaskedSum(h, input.mask), 1), h);
        const combined = tf.add(tf.mul(tf.add(1, epsilons[layer]), h), neighbourSum) as tf.Tensor3D;
        h = tf.mul(tf.relu(applyDense(mlp[1], tf.relu(applyDense(mlp[0], combined)))), mask3) as tf.Tensor3D;
      });
      const pooled = poolMaskedSum(h, input.mask);
      return applyDense(head[1], tf.relu(applyDense(head[0], pooled)));
    },
  };
}
