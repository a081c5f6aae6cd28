/**
 * Per-metric recurrent baseline: one GRU (Cho et al. 2014, the reset gate applied to U·h as in the
 * common cuDNN/PyTorch variant) runs over each metric's window samples; its last state plus a
 * family embedding and a projection of the row's summary slots is mean-pooled over unmasked
 * metrics and classified.
 */
import * as tf from '@tensorflow/tfjs-core';
import { FAMILIES } from '../../extension/core/frame/types';
import { applyDense, createDense, listDenseVariables, poolMaskedMean, type BatchTensors, type Dense } from './layers';
import type { NodeSetModel, NodeSetModelSpec } from './nodeSetModel';
import { drawGlorotUniform } from './seededRandom';

interface Gate {
  /** Input weight [1, H] (the input is one sample per step) and bias [H]. */
  readonly input: Dense;
  /** State weight [H, H]. */
  readonly state: tf.Variable;
}

function createGate(size: number, random: () => number): Gate {
  return {
    input: createDense(1, size, random),
    state: tf.variable(tf.tensor2d(drawGlorotUniform(size, size, random), [size, size])),
  };
}

function applyGate(gate: Gate, x: tf.Tensor2D, h: tf.Tensor2D): tf.Tensor2D {
  return tf.add(tf.add(tf.mul(x, gate.input.weight), gate.input.bias), tf.matMul(h, gate.state as tf.Tensor2D));
}

/**
 * Splits node rows [B,N,row] into a time-major sequence [W, B·N] and summary slots [B·N, S] in
 * plain JS: inputs need no gradient, and the CPU backend's strided slice is element-by-element slow.
 */
function splitRows(values: tf.Tensor3D, sequenceLength: number): { sequence: tf.Tensor2D; slots: tf.Tensor2D } {
  const [b, n, rowLength] = values.shape;
  const nodes = b * n;
  const slotCount = Math.max(1, rowLength - sequenceLength);
  const raw = values.dataSync();
  const sequence = new Float32Array(sequenceLength * nodes);
  const slots = new Float32Array(nodes * slotCount);
  for (let i = 0; i < nodes; i++) {
    for (let t = 0; t < sequenceLength; t++) sequence[t * nodes + i] = raw[i * rowLength + t];
    for (let s = 0; s < rowLength - sequenceLength; s++) slots[i * slotCount + s] = raw[i * rowLength + sequenceLength + s];
  }
  return { sequence: tf.tensor2d(sequence, [sequenceLength, nodes]), slots: tf.tensor2d(slots, [nodes, slotCount]) };
}

/** GRU baseline with hidden size spec.hiddenSize over the first spec.sequenceLength entries of each row. */
export function createGruBaseline(spec: NodeSetModelSpec, random: () => number): NodeSetModel {
  const size = spec.hiddenSize;
  const [update, reset, candidate] = [0, 1, 2].map(() => createGate(size, random));
  const slotWeights = createDense(Math.max(1, spec.windowLength - spec.sequenceLength), size, random);
  const familyEmbedding = tf.variable(tf.tensor2d(drawGlorotUniform(FAMILIES.length, size, random), [FAMILIES.length, size]));
  const head = [createDense(size, size, random), createDense(size, spec.classCount, random)];
  return {
    name: `GRU per metric (hidden ${size}, mean pooling)`,
    variables: [
      ...[update, reset, candidate].flatMap((g) => [g.input.weight, g.input.bias, g.state]),
      ...listDenseVariables([slotWeights]), familyEmbedding, ...listDenseVariables(head),
    ],
    computeLogits(input: BatchTensors): tf.Tensor2D {
      const [b, n] = input.values.shape;
      const nodes = b * n;
      const { sequence, slots } = splitRows(input.values, spec.sequenceLength);
      let h: tf.Tensor2D = tf.zeros([nodes, size]);
      for (let t = 0; t < spec.sequenceLength; t++) {
        const x: tf.Tensor2D = tf.reshape(tf.slice(sequence, [t, 0], [1, nodes]), [nodes, 1]);
        const z = tf.sigmoid(applyGate(update, x, h));
        const r = tf.sigmoid(applyGate(reset, x, h));
        const proposal = tf.tanh(tf.add(tf.add(tf.mul(x, candidate.input.weight), candidate.input.bias),
          tf.mul(r, tf.matMul(h, candidate.state as tf.Tensor2D))));
        h = tf.add(tf.mul(tf.sub(1, z), proposal), tf.mul(z, h));
      }
      const family = tf.reshape(tf.gather(familyEmbedding, tf.reshape(input.families, [nodes])), [nodes, size]);
      const nodeStates = tf.relu(tf.add(tf.add(h, family), applyDense(slotWeights, slots)));
      const pooled = poolMaskedMean(tf.reshape(nodeStates, [b, n, size]), input.mask);
      return applyDense(head[1], tf.relu(applyDense(head[0], pooled)));
    },
  };
}
