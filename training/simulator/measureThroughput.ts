/**
 * Throughput of example generation, for a benchmark to report (never asserted in tests).
 * CPU time is reported beside wall time because the development machine is shared.
 */
import { sampleExamples } from './sampleExamples';

export interface SimulatorThroughput {
  readonly examplesPerWallS: number;
  readonly examplesPerCpuS: number;
  readonly valuesPerExample: number;
  readonly metricsPerExample: number;
}

/**
 * Generates `count` examples from 100 systems and times it, after a warm-up of 300 examples from
 * 20 other systems (so the timed run measures optimised code, not the compiler getting there).
 */
export function measureSimulatorThroughput(count = 2000): SimulatorThroughput {
  sampleExamples({ seed: 1, count: 300, systemSeeds: Array.from({ length: 20 }, (_, k) => 1000 + k) });
  const cpu0 = process.cpuUsage();
  const wall0 = performance.now();
  const examples = sampleExamples({ seed: 2, count, systemSeeds: Array.from({ length: 100 }, (_, k) => k + 1) });
  const wallS = (performance.now() - wall0) / 1000;
  const cpu = process.cpuUsage(cpu0);
  let values = 0;
  let metrics = 0;
  for (const e of examples) {
    metrics += e.metrics.length;
    for (const m of e.metrics) values += m.baseline.length + m.window.length;
  }
  return {
    examplesPerWallS: count / wallS,
    examplesPerCpuS: count / ((cpu.user + cpu.system) / 1e6),
    valuesPerExample: values / Math.max(1, count),
    metricsPerExample: metrics / Math.max(1, count),
  };
}
