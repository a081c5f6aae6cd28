import { cpus, loadavg } from 'node:os';
import type { BenchReport } from './run';
import { measureSimulatorThroughput } from '../training/simulator/measureThroughput';

/**
 * Training-example generation speed of the fault simulator (issue target: ≥ 2,000 examples/s on
 * the 2-core machine). On a shared machine compare examples per CPU second; wall time follows load.
 */
export async function run(): Promise<BenchReport> {
  const t = measureSimulatorThroughput(2000);
  return {
    suite: 'simulator',
    lines: [
      { name: 'examples per second (wall)', value: t.examplesPerWallS, unit: 'ex/s', target: '≥ 2000' },
      { name: 'examples per CPU second', value: t.examplesPerCpuS, unit: 'ex/s', target: '≥ 2000', note: `1-min load ${loadavg()[0]?.toFixed(1) ?? '?'} on ${cpus().length} cores` },
      { name: 'metrics per example', value: t.metricsPerExample, unit: 'metrics' },
      { name: 'values per example', value: t.valuesPerExample, unit: 'values' },
    ],
  };
}
