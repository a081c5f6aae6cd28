/**
 * Minibatch training and prediction of the plain-JS GRU baseline (gruNetwork.ts).
 *
 * Each minibatch is cut into `shardCount` contiguous shards whose gradients are summed on their own
 * (gruShards.ts) and then added in shard order; the shards run in worker threads (one per shard) or
 * one after the other in this thread, with the same numbers either way, as in our own trainer.
 */
import { join } from 'node:path';
import type { NodeBatch } from '../../extension/core/model/types';
import { startTsWorker } from '../startTsWorker';
import { computeGruLogits, GruWorkspace } from './gruNetwork';
import { applyAdam, createAdamState, type GruParameters } from './gruParameters';
import { createGruShardRunner, packGruData, type GruShardContext } from './gruShards';
import { shuffleInPlace } from './seededRandom';
import { computeClassWeights, type TrainOptions } from './trainNodeSetModel';

/** Options of {@link trainGruNetwork}. */
export interface GruTrainOptions extends TrainOptions {
  /** Shards per minibatch (default 2); part of the recipe, since it fixes the order of the sums. */
  readonly shardCount?: number;
  /** Run the shards in worker threads (default true when there is more than one). */
  readonly useWorkers?: boolean;
}

type ShardCall = (shard: number, from: number, to: number, scale: number) => Promise<number>;

/** Worker threads for the shards, one per shard; a worker that stops mid-shard fails the step. */
function startGruWorkers(context: GruShardContext, gradients: readonly Float64Array[]): { call: ShardCall; stop: () => Promise<void> } {
  const workers = gradients.map((gradient) => startTsWorker(join(__dirname, 'gruWorker.ts'), { context, gradient }));
  const pending = new Map<number, { resolve: (loss: number) => void; reject: (error: Error) => void }>();
  workers.forEach((worker, shard) => {
    worker.on('message', (message: { loss: number }) => { pending.get(shard)?.resolve(message.loss); pending.delete(shard); });
    worker.on('error', (error: Error) => { pending.get(shard)?.reject(error); pending.delete(shard); });
    worker.on('exit', (code: number) => { pending.get(shard)?.reject(new Error(`GRU trainer worker ${shard} stopped (exit code ${code}) while computing a shard`)); pending.delete(shard); });
  });
  return {
    call: (shard, from, to, scale) => new Promise<number>((resolve, reject) => {
      pending.set(shard, { resolve, reject });
      workers[shard].postMessage({ from, to, scale });
    }),
    stop: async () => { await Promise.all(workers.map((w) => w.terminate())); },
  };
}

/**
 * Trains `p` in place on single-example encodings with class indices `labels` (inverse-frequency
 * class weights, loss averaged over each minibatch, Adam with the learning rate decayed from
 * `options.learningRate` to 0 on a cosine over the run, as our own trainer does, Loshchilov & Hutter
 * 2017). Returns the last epoch's mean loss; the epoch log also gives the largest minibatch
 * gradient norm, to show whether the recurrence ever blows up.
 */
export async function trainGruNetwork(p: GruParameters, examples: readonly NodeBatch[], labels: Int32Array, options: GruTrainOptions): Promise<number> {
  const shardCount = options.shardCount ?? 2;
  if (!Number.isInteger(shardCount) || shardCount < 1) throw new Error(`trainGruNetwork: expected shardCount as a positive integer, got ${shardCount}`);
  const values = new Float32Array(new SharedArrayBuffer(p.values.length * 4));
  values.set(p.values);
  const order = new Int32Array(new SharedArrayBuffer(Math.max(1, labels.length) * 4));
  const context: GruShardContext = {
    shape: p.shape, offsets: p.offsets, values, data: packGruData(examples, labels), order, classWeights: computeClassWeights(labels, p.shape.classCount),
  };
  const useWorkers = (options.useWorkers ?? true) && shardCount > 1;
  const gradients = Array.from({ length: shardCount }, () => (useWorkers ? new Float64Array(new SharedArrayBuffer(p.values.length * 8)) : new Float64Array(p.values.length)));
  const local = useWorkers ? undefined : createGruShardRunner(context);
  const workers = useWorkers ? startGruWorkers(context, gradients) : undefined;
  const runShard: ShardCall = workers ? workers.call : async (shard, from, to, scale) => (local as ReturnType<typeof createGruShardRunner>).run(from, to, scale, gradients[shard]);
  try {
    return await runGruEpochs(context, gradients, runShard, options);
  } finally {
    await workers?.stop();
    p.values.set(values);
  }
}

async function runGruEpochs(context: GruShardContext, gradients: readonly Float64Array[], runShard: ShardCall, options: GruTrainOptions): Promise<number> {
  const { values, order } = context;
  const count = context.data.labels.length;
  const adam = createAdamState(values.length);
  const total = new Float64Array(values.length);
  const stepsPerEpoch = Math.ceil(count / options.batchSize);
  let lastLoss = Number.NaN;
  for (let epoch = 0; epoch < options.epochs; epoch++) {
    order.set(shuffleInPlace(Array.from({ length: count }, (_, i) => i), options.random));
    let lossSum = 0;
    let largestNorm = 0;
    for (let step = 0; step < stepsPerEpoch; step++) {
      const from = step * options.batchSize;
      const to = Math.min(count, from + options.batchSize);
      const bounds = gradients.map((_, k) => [from + Math.floor(((to - from) * k) / gradients.length), from + Math.floor(((to - from) * (k + 1)) / gradients.length)] as const);
      const losses = await Promise.all(bounds.map(([a, b], k) => runShard(k, a, b, 1 / (to - from))));
      for (const loss of losses) lossSum += loss * (to - from);
      total.set(gradients[0]);
      for (let k = 1; k < gradients.length; k++) { const part = gradients[k]; for (let i = 0; i < total.length; i++) total[i] += part[i]; }
      let squares = 0;
      for (let i = 0; i < total.length; i++) squares += total[i] * total[i];
      largestNorm = Math.max(largestNorm, Math.sqrt(squares));
      const progress = (epoch * stepsPerEpoch + step) / (options.epochs * stepsPerEpoch);
      applyAdam(values, total, adam, options.learningRate * 0.5 * (1 + Math.cos(Math.PI * progress)));
    }
    lastLoss = count > 0 ? lossSum / count : Number.NaN;
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
