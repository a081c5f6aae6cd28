/** Minibatch training and prediction for the neural baselines (Adam, softmax cross-entropy). */
import * as tf from '@tensorflow/tfjs-core';
// tfjs-core alone registers no gradients; training needs them.
import '@tensorflow/tfjs-core/dist/register_all_gradients';
import type { NodeBatch } from '../../extension/core/model/types';
import { toBatchTensors } from './layers';
import type { NodeSetModel } from './nodeSetModel';
import { concatPadded, groupBySize } from './padBatches';
import { shuffleInPlace } from './seededRandom';

/** Options of {@link trainNodeSetModel}. */
export interface TrainOptions {
  readonly epochs: number;
  readonly batchSize: number;
  readonly learningRate: number;
  readonly random: () => number;
  readonly log?: (line: string) => void;
}

/**
 * Trains `model` on single-example encodings `examples` with class indices `labels`, in place.
 * Classes are weighted by inverse frequency so that macro-F1 (the reported score) is not traded
 * for the majority class. Returns the mean loss of the last epoch (NaN if there was no batch).
 */
export async function trainNodeSetModel(
  model: NodeSetModel, examples: readonly NodeBatch[], labels: Int32Array, classCount: number, options: TrainOptions,
): Promise<number> {
  const optimizer = tf.train.adam(options.learningRate);
  const classWeights = computeClassWeights(labels, classCount);
  const nodeCounts = examples.map((e) => e.nodeCount);
  let lastLoss = Number.NaN;
  for (let epoch = 0; epoch < options.epochs; epoch++) {
    const order = shuffleInPlace(Array.from(labels.keys()), options.random);
    const batches = shuffleInPlace(groupBySize(order, nodeCounts, options.batchSize), options.random);
    let lossSum = 0;
    for (const indices of batches) {
      const lossValue = tf.tidy(() => {
        const input = toBatchTensors(concatPadded(indices.map((i) => examples[i])));
        const targets = tf.oneHot(tf.tensor1d(indices.map((i) => labels[i]), 'int32'), classCount);
        const weights = tf.tensor1d(indices.map((i) => classWeights[labels[i]]));
        const loss = optimizer.minimize(
          () => tf.losses.softmaxCrossEntropy(targets, model.computeLogits(input), weights) as tf.Scalar,
          true, model.variables as tf.Variable[],
        );
        return loss === null ? Number.NaN : loss.dataSync()[0];
      });
      lossSum += lossValue;
    }
    lastLoss = batches.length > 0 ? lossSum / batches.length : Number.NaN;
    options.log?.(`${model.name}: epoch ${epoch + 1}/${options.epochs} loss ${lastLoss.toFixed(4)}`);
    // Yield to the event loop between epochs so a caller's timers and logs are not starved.
    await new Promise((resolve) => setImmediate(resolve));
  }
  optimizer.dispose();
  return lastLoss;
}

/** Inverse-frequency weights normalised to mean 1 over the training examples; absent classes get 0. */
export function computeClassWeights(labels: Int32Array, classCount: number): Float32Array {
  const counts = new Float64Array(classCount);
  for (const c of labels) counts[c]++;
  const present = counts.filter((c) => c > 0).length;
  const weights = new Float32Array(classCount);
  counts.forEach((c, k) => { weights[k] = c > 0 ? labels.length / (present * c) : 0; });
  return weights;
}

/** Returns the arg-max class per example, predicting in size-grouped batches of `batchSize`. */
export function predictNodeSetModel(model: NodeSetModel, examples: readonly NodeBatch[], batchSize = 128): Int32Array {
  const out = new Int32Array(examples.length);
  const order = Array.from(examples.keys());
  for (const indices of groupBySize(order, examples.map((e) => e.nodeCount), batchSize)) {
    const predicted = tf.tidy(() => tf.argMax(model.computeLogits(toBatchTensors(concatPadded(indices.map((i) => examples[i])))), 1).dataSync());
    indices.forEach((i, k) => { out[i] = predicted[k]; });
  }
  return out;
}
