/**
 * Worker thread of the trainer: computes the shards it is sent (training/trainShard.ts) on the
 * shared dataset and weights, into its own shared gradient arrays, and answers with the loss.
 */
import { parentPort, workerData } from 'node:worker_threads';
import type { GradSet } from './setModelGradient';
import { createShardRunner, type ShardContext } from './trainShard';

interface ShardRequest { readonly epoch: number; readonly from: number; readonly to: number; readonly scale: number }

const { context, grads } = workerData as { context: ShardContext; grads: GradSet };
const runner = createShardRunner(context);
parentPort?.on('message', (request: ShardRequest) => {
  parentPort?.postMessage({ loss: runner.run(request.epoch, request.from, request.to, request.scale, grads) });
});
