/**
 * Worker thread of the GRU baseline's trainer: computes the shards it is sent (gruShards.ts) on the
 * shared encodings and weights, into its own shared gradient array, and answers with the loss.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { createGruShardRunner, type GruShardContext } from './gruShards';

interface ShardRequest { readonly from: number; readonly to: number; readonly scale: number }

const { context, gradient } = workerData as { context: GruShardContext; gradient: Float64Array };
const runner = createGruShardRunner(context);
parentPort?.on('message', (request: ShardRequest) => {
  parentPort?.postMessage({ loss: runner.run(request.from, request.to, request.scale, gradient) });
});
