/** Minibatch training and prediction of the plain-JS GRU baseline (gruNetwork.ts). */
import type { NodeBatch } from '../../extension/core/model/types';
import { accumulateGruGradient, computeGruLogits, GruWorkspace } from './gruNetwork';
import { applyAdam, createAdamState, type GruParameters } from './gruParameters';
import { shuffleInPlace } from './seededRandom';
import { computeClassWeights, type TrainOptions } from './trainNodeSetModel';

/**
 * Trains `p` in place on single-example encodings with class indices `labels` (inverse-frequency
 * class weights, loss averaged over each minibatch, Adam). Returns the last epoch's mean loss.
 */
export async function trainGruNetwork(p: GruParameters, examples: readonly NodeBatch[], labels: Int32Array, options: TrainOptions): Promise<number> {
  const classWeights = computeClassWeights(labels, p.shape.classCount);
  const adam = createAdamState(p.values.length);
  const gradient = new Float64Array(p.values.length);
  const workspace = new GruWorkspace(p.shape);
  let lastLoss = Number.NaN;
  for (let epoch = 0; epoch < options.epochs; epoch++) {
    const order = shuffleInPlace(Array.from(labels.keys()), options.random);
    let lossSum = 0;
    for (let start = 0; start < order.length; start += options.batchSize) {
      const indices = order.slice(start, start + options.batchSize);
      gradient.fill(0);
      for (const i of indices) lossSum += accumulateGruGradient(p, examples[i], 0, labels[i], classWeights[labels[i]] / indices.length, gradient, workspace) * indices.length;
      applyAdam(p.values, gradient, adam, options.learningRate);
    }
    lastLoss = order.length > 0 ? lossSum / order.length : Number.NaN;
    options.log?.(`GRU: epoch ${epoch + 1}/${options.epochs} loss ${lastLoss.toFixed(4)}`);
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

