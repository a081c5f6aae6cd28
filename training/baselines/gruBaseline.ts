/**
 * The GRU baseline of gruNetwork.ts rebuilt in tfjs from the same parameters. Too slow to train
 * on the CPU backend, it serves as the independent reference (tfjs autodiff) that the hand-written
 * forward pass and gradients are tested against.
 */
import * as tf from '@tensorflow/tfjs-core';
import { applyHead, lookUpFamilies, poolMaskedMean, type BatchTensors, type Dense } from './layers';
import { getGruBlockShapes, GRU_BLOCKS, type GruBlock, type GruParameters } from './gruParameters';
import type { NodeSetModel } from './nodeSetModel';

/**
 * Splits node rows [B,N,row] into a time-major sequence [W, B·N, 2] (sample, 1) and summary slots
 * [B·N, S] in plain JS: inputs need no gradient, and strided slices are slow on the CPU backend.
 */
function splitRows(values: tf.Tensor3D, sequenceLength: number): { sequence: tf.Tensor3D; slots: tf.Tensor2D } {
  const [b, n, rowLength] = values.shape;
  const nodes = b * n;
  const slotCount = Math.max(1, rowLength - sequenceLength);
  const raw = values.dataSync();
  const sequence = new Float32Array(sequenceLength * nodes * 2);
  const slots = new Float32Array(nodes * slotCount);
  for (let i = 0; i < nodes; i++) {
    for (let t = 0; t < sequenceLength; t++) {
      sequence[(t * nodes + i) * 2] = raw[i * rowLength + t];
      sequence[(t * nodes + i) * 2 + 1] = 1;
    }
    for (let s = 0; s < rowLength - sequenceLength; s++) slots[i * slotCount + s] = raw[i * rowLength + sequenceLength + s];
  }
  return { sequence: tf.tensor3d(sequence, [sequenceLength, nodes, 2]), slots: tf.tensor2d(slots, [nodes, slotCount]) };
}

/** Returns tfjs variables holding a copy of each parameter block. */
export function toGruVariables(p: GruParameters): Record<GruBlock, tf.Variable> {
  const shapes = getGruBlockShapes(p.shape);
  const out = {} as Record<GruBlock, tf.Variable>;
  for (const block of GRU_BLOCKS) {
    const [rows, cols] = shapes[block];
    out[block] = tf.variable(tf.tensor2d(p.values.slice(p.offsets[block], p.offsets[block] + rows * cols), [rows, cols]));
  }
  return out;
}

/** A tfjs model computing exactly the network of gruNetwork.ts with the given variables. */
export function createGruReference(p: GruParameters, vars: Record<GruBlock, tf.Variable>): NodeSetModel {
  const size = p.shape.hiddenSize;
  const w = p.shape.sequenceLength;
  const gate = (input: GruBlock, bias: GruBlock): tf.Tensor2D => tf.concat([vars[input], vars[bias]], 0) as tf.Tensor2D;
  const head: [Dense, Dense] = [{ weight: vars.head1, bias: vars.head1Bias }, { weight: vars.head2, bias: vars.head2Bias }];
  return {
    name: `GRU per metric (hidden ${size}, mean pooling)`,
    variables: GRU_BLOCKS.map((b) => vars[b]),
    computeLogits(input: BatchTensors): tf.Tensor2D {
      const { batchSize: b, nodeCount: n } = input;
      const nodes = b * n;
      const { sequence, slots } = splitRows(input.values, w);
      const [inZ, inR, inN] = [gate('inputZ', 'biasZ'), gate('inputR', 'biasR'), gate('inputN', 'biasN')];
      let h: tf.Tensor2D = tf.zeros([nodes, size]);
      for (let t = 0; t < w; t++) {
        const x: tf.Tensor2D = tf.reshape(tf.slice(sequence, [t, 0, 0], [1, nodes, 2]), [nodes, 2]);
        const z = tf.sigmoid(tf.add(tf.matMul(x, inZ), tf.matMul(h, vars.stateZ as tf.Tensor2D)));
        const r = tf.sigmoid(tf.add(tf.matMul(x, inR), tf.matMul(h, vars.stateR as tf.Tensor2D)));
        const proposal = tf.tanh(tf.add(tf.matMul(x, inN), tf.mul(r, tf.matMul(h, vars.stateN as tf.Tensor2D))));
        h = tf.add(proposal, tf.mul(z, tf.sub(h, proposal)));
      }
      const slotTerm = tf.add(tf.matMul(slots, vars.slots as tf.Tensor2D), tf.matMul(tf.ones([nodes, 1]) as tf.Tensor2D, vars.slotBias as tf.Tensor2D));
      const nodeStates = tf.relu(tf.add(tf.add(h, lookUpFamilies(vars.family, input)), slotTerm));
      return applyHead(head, poolMaskedMean(tf.reshape(nodeStates, [b, n, size]), input));
    },
  };
}
