/** Minibatch training and prediction of the plain-JS GRU baseline (gruNetwork.ts). */
import type { NodeBatch } from '../../extension/core/model/types';
import { accumulateGruGradient, computeGruLogits, GruWorkspace } from './gruNetwork';
import { applyAdam, createAdamState, type GruParameters } from './gruParameters';
import { shuffleInPlace } from './seededRandom';
import { computeClassWeights, type TrainOptions } from './trainNodeSetModel';

/**
 * Trains `p` in place on single-example encodings with class indices `labels` (inverse-frequency
 * class weights, loss averaged over each minibatch, Adam with the learning rate decayed from
 * `options.learningRate` to 0 on a cosine over the run, as our own trainer does, Loshchilov & Hutter
 * 2017). Returns the last epoch's mean loss; the epoch log also gives the largest minibatch
 * gradient norm, to show whether the recurrence ever blows up.
 */
export async function trainGruNetwork(p: GruParameters, examples: readonly NodeBatch[], labels: Int32Array, options: TrainOptions): Promise<number> {
  const classWeights = computeClassWeights(labels, p.shape.classCount);
  const adam = createAdamState(p.values.length);
  const gradient = new Float64Array(p.values.length);
  const workspace = new GruWorkspace(p.shape);
  const stepsPerEpoch = Math.ceil(labels.length / options.batchSize);
  let lastLoss = Number.NaN;
  for (let epoch = 0; epoch < options.epochs; epoch++) {
    const order = shuffleInPlace(Array.from(labels.keys()), options.random);
    let lossSum = 0;
    let largestNorm = 0;
    for (let start = 0; start < order.length; start += options.batchSize) {
      const indices = order.slice(start, start + options.batchSize);
      gradient.fill(0);
      for (const i of indices) lossSum += accumulateGruGradient(p, examples[i], 0, labels[i], classWeights[labels[i]] / indices.length, gradient, workspace) * indices.length;
      let squares = 0;
      for (let k = 0; k < gradient.length; k++) squares += gradient[k] * gradient[k];
      largestNorm = Math.max(largestNorm, Math.sqrt(squares));
      const progress = (epoch * stepsPerEpoch + start / options.batchSize) / (options.epochs * stepsPerEpoch);
      applyAdam(p.values, gradient, adam, options.learningRate * 0.5 * (1 + Math.cos(Math.PI * progress)));
    }
    lastLoss = order.length > 0 ? lossSum / order.length : Number.NaN;
    options.log?.(`GRU: epoch ${epoch + 1}/${options.epochs} loss ${lastLoss.toFixed(4)}, largest gradient norm ${largestNorm.toFixed(3)}`);
    await new Promise((resolve) => setImmediate(resolve));
  }
  return lastLoss;
}

/** Returns the arg-max class per single-example encoding. */
export function predictGruNetwork(p: GruParameters, examples: readonly NodeBatch[]): Int32Array {
  const c = p.shape.classCount;
  const out = new Int32Array(examples.length);
  const workspace = new GruWorkspace(p.shape);
  examples.forEach((example, i) => {
    const logits = computeGruLogits(p, example, workspace);
    let best = 0;
    for (let k = 1; k < c; k++) if (logits[k] > logits[best]) best = k;
    out[i] = best;
  });
  return out;
}

