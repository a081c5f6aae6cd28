import { cpus, loadavg } from 'node:os';
import type { BenchReport } from './run';
import { measureSimulatorThroughput } from '../training/simulator/measureThroughput';
import { encodeInWorkers } from '../training/encodeInWorkers';
import { describeSplits } from '../training/simulator';

/**
 * Training-example generation speed of the fault simulator (our target: ≥ 2,000 examples/s on the
 * 2-core machine, so the data of a 150,000-example recipe takes a small part of `npm run train`).
 * On a shared machine compare examples per CPU second; wall time follows load. The last line is
 * the training pipeline's own path: drawn and encoded on two worker threads.
 */
export async function run(): Promise<BenchReport> {
  const t = measureSimulatorThroughput(2000);
  const options = describeSplits(11, { trainCount: 8000, trainSystems: 200 }).train;
  await encodeInWorkers({ ...options, count: 1000 });
  const started = performance.now();
  await encodeInWorkers(options);
  const parallelPerS = options.count / ((performance.now() - started) / 1000);
  return {
    suite: 'simulator',
    lines: [
      { name: 'examples per second (wall)', value: t.examplesPerWallS, unit: 'ex/s', target: '≥ 2000' },
      { name: 'examples per CPU second', value: t.examplesPerCpuS, unit: 'ex/s', target: '≥ 2000', note: `1-min load ${loadavg()[0]?.toFixed(1) ?? '?'} on ${cpus().length} cores` },
      { name: 'metrics per example', value: t.metricsPerExample, unit: 'metrics' },
      { name: 'values per example', value: t.valuesPerExample, unit: 'values' },
      { name: 'examples per second drawn and encoded, 2 worker threads (wall)', value: parallelPerS, unit: 'ex/s', target: '≥ 2000', note: `1-min load ${loadavg()[0]?.toFixed(1) ?? '?'}` },
    ],
  };
}
