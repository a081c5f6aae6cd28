/**
 * A worker thread running one of the training TypeScript modules. Training runs under tsx, so the
 * worker loads tsx's CommonJS hook first and then the module; `workerData` reaches it as usual.
 */
import { Worker } from 'node:worker_threads';

export function startTsWorker(entry: string, workerData: unknown): Worker {
  const hook = require.resolve('tsx/cjs');
  return new Worker(`require(${JSON.stringify(hook)}); require(${JSON.stringify(entry)});`, { eval: true, workerData });
}
