/**
 * GCN-style and GIN-style baselines on the fully connected metric graph (one node per metric,
 * an edge between every pair of unmasked nodes).
 */
import * as tf from '@tensorflow/tfjs-core';
import {
  applyDense3d, applyHead, applyNodeEncoder, createDense, createNodeEncoder, expandMask, listDenseVariables,
  listEncoderVariables, poolMaskedMean, poolMaskedSum, type BatchTensors, type Dense,
} from './layers';
import type { NodeSetModel, NodeSetModelSpec } from './nodeSetModel';

/**
 * Returns Ã = A + I of the complete graph over unmasked nodes, row-major [B, N, N]: entry (i,j) =
 * mask_i·mask_j, which includes the self-loop of every unmasked node and nothing for masked ones.
 */
export function buildCompleteAdjacency(mask: ArrayLike<number>, batchSize: number, nodeCount: number): Float32Array {
  const out = new Float32Array(batchSize * nodeCount * nodeCount);
  for (let b = 0; b < batchSize; b++) {
    for (let i = 0; i < nodeCount; i++) {
      for (let j = 0; j < nodeCount; j++) out[(b * nodeCount + i) * nodeCount + j] = mask[b * nodeCount + i] * mask[b * nodeCount + j];
    }
  }
  return out;
}

/**
 * Symmetric normalisation D^-1/2 Ã D^-1/2 of adjacencies [B, N, N] that already hold their
 * self-loops, with D the row sums of Ã (Kipf & Welling 2017). Rows of degree 0 (masked nodes) stay 0.
 */
export function normalizeAdjacency(adjacencyWithSelfLoops: ArrayLike<number>, batchSize: number, nodeCount: number): Float32Array {
  const n = nodeCount;
  const out = new Float32Array(batchSize * n * n);
  const inverseRoot = new Float64Array(n);
  for (let b = 0; b < batchSize; b++) {
    const offset = b * n * n;
    for (let i = 0; i < n; i++) {
      let degree = 0;
      for (let j = 0; j < n; j++) degree += adjacencyWithSelfLoops[offset + i * n + j];
      inverseRoot[i] = degree > 0 ? 1 / Math.sqrt(degree) : 0;
    }
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) out[offset + i * n + j] = inverseRoot[i] * adjacencyWithSelfLoops[offset + i * n + j] * inverseRoot[j];
    }
  }
  return out;
}

/** One GCN propagation without bias or non-linearity: Â · H · W, with Â [B,N,N], H [B,N,F], W [F,F']. */
export function propagateGcn(normalizedAdjacency: tf.Tensor3D, h: tf.Tensor3D, weight: tf.Tensor2D): tf.Tensor3D {
  const [b, n, f] = h.shape;
  const transformed = tf.reshape(tf.matMul(tf.reshape(h, [b * n, f]), weight), [b, n, weight.shape[1]]) as tf.Tensor3D;
  return tf.matMul(normalizedAdjacency, transformed);
}

function toAdjacencyTensor(input: BatchTensors, isNormalized: boolean): tf.Tensor3D {
  const { batchSize: b, nodeCount: n } = input;
  const complete = buildCompleteAdjacency(input.mask.dataSync(), b, n);
  return tf.tensor3d(isNormalized ? normalizeAdjacency(complete, b, n) : complete, [b, n, n]);
}

/** GCN-style baseline: node encoder, 2 GCN layers (ReLU), masked mean readout, 2-layer classifier. */
export function createGcnBaseline(spec: NodeSetModelSpec, random: () => number): NodeSetModel {
  const size = spec.hiddenSize;
  const encoder = createNodeEncoder(spec.windowLength, size, random);
  const layers = [createDense(size, size, random), createDense(size, size, random)];
  const head: [Dense, Dense] = [createDense(size, size, random), createDense(size, spec.classCount, random)];
  return {
    name: 'GCN (2 layers, mean readout)',
    variables: [...listEncoderVariables(encoder), ...listDenseVariables(layers), ...listDenseVariables(head)],
    computeLogits(input: BatchTensors): tf.Tensor2D {
      const adjacency = toAdjacencyTensor(input, true);
      let h = applyNodeEncoder(encoder, input);
      for (const layer of layers) {
        // Â(HW + 1b) = ÂHW + Âb: the bias goes in before propagation so it stays a matMul.
        h = tf.relu(tf.matMul(adjacency, applyDense3d(layer, h))) as tf.Tensor3D;
      }
      return applyHead(head, poolMaskedMean(h, input));
    },
  };
}

/**
 * Layer normalisation over the hidden axis of every node (no learned gain/bias), [B,N,H] → same.
 * Means are taken with a matMul against a constant (1/H) matrix so no op broadcasts a size-1 axis.
 */
export function normalizeNodeFeatures(h: tf.Tensor3D): tf.Tensor3D {
  const [b, n, size] = h.shape;
  const flat = tf.reshape(h, [b * n, size]) as tf.Tensor2D;
  const averaging = tf.fill([size, size], 1 / size) as tf.Tensor2D;
  const centered = tf.sub(flat, tf.matMul(flat, averaging));
  const variance = tf.matMul(tf.square(centered), averaging);
  return tf.reshape(tf.mul(centered, tf.rsqrt(tf.add(variance, 1e-5))), [b, n, size]);
}

/**
 * GIN-style baseline (Xu et al. 2019): h' = MLP((1+ε)·h_i + Σ_{j≠i} h_j) over unmasked neighbours
 * on the complete graph, learnable ε per layer, 2 layers, sum readout, 2-layer classifier. Each
 * layer's output is layer-normalised (the paper normalises with BatchNorm; without any
 * normalisation the sums over ~20–45 metrics gave initial losses above 250 and training diverged).
 * Per-node LayerNorm keeps a prediction independent of the other examples in its batch.
 */
export function createGinBaseline(spec: NodeSetModelSpec, random: () => number): NodeSetModel {
  const size = spec.hiddenSize;
  const encoder = createNodeEncoder(spec.windowLength, size, random);
  const mlps = [0, 1].map(() => [createDense(size, size, random), createDense(size, size, random)] as const);
  const epsilons = [tf.variable(tf.scalar(0)), tf.variable(tf.scalar(0))];
  const head: [Dense, Dense] = [createDense(size, size, random), createDense(size, spec.classCount, random)];
  return {
    name: 'GIN (2 layers, sum readout)',
    variables: [...listEncoderVariables(encoder), ...listDenseVariables(mlps.flat()), ...epsilons, ...listDenseVariables(head)],
    computeLogits(input: BatchTensors): tf.Tensor2D {
      // Ã·h = Σ_j h_j over unmasked j (self included), so (1+ε)h_i + Σ_{j≠i} h_j = ε·h_i + (Ã·h)_i.
      const adjacency = toAdjacencyTensor(input, false);
      const maskFull = expandMask(input, size);
      let h = applyNodeEncoder(encoder, input);
      mlps.forEach((mlp, layer) => {
        const combined = tf.add(tf.mul(epsilons[layer], h), tf.matMul(adjacency, h)) as tf.Tensor3D;
        h = tf.mul(tf.relu(normalizeNodeFeatures(applyDense3d(mlp[1], tf.relu(applyDense3d(mlp[0], combined))))), maskFull);
      });
      return applyHead(head, poolMaskedSum(h, input));
    },
  };
}
