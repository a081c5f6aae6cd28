import { cpus, loadavg } from 'node:os';
import type { BenchReport } from './run';
import { DEFAULT_WINDOW_SPEC } from '../extension/core/model/encode';
import { computeFeatureNormalization, encodeExamples } from '../training/buildDataset';
import { DEFAULT_SHAPE } from '../training/setModel';
import { buildSplits } from '../training/simulator';
import { trainSetModel } from '../training/trainSetModel';

/**
 * Training speed of the set model (the recipe's shape and options): examples per second for one
 * epoch over 6,000 simulated examples, with the two batch shards in worker threads and one after
 * the other in this thread. `npm run train` must stay under 30 minutes on 2 cores.
 */
export async function run(): Promise<BenchReport> {
  const examples = encodeExamples(buildSplits(7, { trainCount: 6000, calibrationCount: 0, testCount: 0, trainSystems: 60 }).train, DEFAULT_WINDOW_SPEC);
  const normalization = computeFeatureNormalization(examples);
  const options = { epochs: 1, batchSize: 64, learningRate: 3e-3, weightDecay: 1e-5, nodeDropoutRate: 0.5, seed: 1, shardCount: 2 };
  const time = async (useWorkers: boolean): Promise<number> => {
    const started = performance.now();
    await trainSetModel(examples, DEFAULT_SHAPE, normalization, { ...options, useWorkers });
    return examples.length / ((performance.now() - started) / 1000);
  };
  const inThread = await time(false);
  const inWorkers = await time(true);
  const note = `1-min load ${loadavg()[0]?.toFixed(1) ?? '?'} on ${cpus().length} cores`;
  return {
    suite: 'trainer',
    lines: [
      { name: 'training examples per second, shards in this thread', value: inThread, unit: 'ex/s', note },
      { name: 'training examples per second, shards in 2 worker threads', value: inWorkers, unit: 'ex/s', note },
    ],
  };
}
