/**
 * Detection speed: suggestWindows on 100 metrics × 10,000 steps (1-minute steps, so a daily
 * period exists and the seasonal path runs), with a shift injected in a third of the metrics.
 */
import type { BenchReport } from './run';
import type { Family, FrameSeries, MetricFrame } from '../extension/core/frame/types';
import { FAMILIES } from '../extension/core/frame/types';
import { suggestWindows } from '../extension/core/detect/suggestWindows';
import { createMulberry32 } from '../extension/core/explain/computeShapley';

function buildFrame(metricCount: number, stepCount: number): MetricFrame {
  const random = createMulberry32(99);
  const stepMs = 60_000;
  const series: FrameSeries[] = [];
  for (let m = 0; m < metricCount; m++) {
    const values = new Float64Array(stepCount);
    const isDaily = m % 2 === 0;
    for (let t = 0; t < stepCount; t++) {
      const cycle = isDaily ? 20 * Math.sin((2 * Math.PI * t) / 1440) : 0;
      const shift = m % 3 === 0 && t >= 7000 && t < 7120 ? 15 : 0;
      values[t] = 100 + cycle + 3 * (random() + random() + random() - 1.5) + shift;
    }
    if (m % 10 === 0) for (let t = 500; t < 530; t++) values[t] = Number.NaN;
    const family: Family = FAMILIES[m % FAMILIES.length];
    series.push({ id: `larkspur_metric_${m}`, name: `larkspur_metric_${m}`, labels: {}, family, kind: 'gauge',
      isConvertedToRate: false, values, gapFraction: 0 });
  }
  return { timesMs: Float64Array.from({ length: stepCount }, (_, i) => i * stepMs), stepMs, series, warnings: [], assumptions: [], duplicateCount: 0 };
}

export async function run(): Promise<BenchReport> {
  const frame = buildFrame(100, 10_000);
  suggestWindows(frame); // warm-up (JIT)
  const times: number[] = [];
  const cpuTimes: number[] = [];
  let found = '';
  for (let k = 0; k < 3; k++) {
    const t0 = performance.now();
    const c0 = process.cpuUsage();
    const r = suggestWindows(frame);
    const c1 = process.cpuUsage(c0);
    times.push(performance.now() - t0);
    // CPU time of this process: less sensitive than wall time to other work on a shared machine.
    cpuTimes.push((c1.user + c1.system) / 1000);
    found = r.incident ? `${r.incident.startIndex}-${r.incident.endIndex}` : r.status;
  }
  times.sort((a, b) => a - b);
  cpuTimes.sort((a, b) => a - b);
  return { suite: 'detect', lines: [
    { name: 'suggestWindows 100 metrics × 10,000 steps (median of 3)', value: times[1], unit: 'ms', target: '≤ 1000 ms',
      note: `injected 7000-7119, found ${found}` },
    { name: 'suggestWindows 100 × 10,000, process CPU time (median of 3)', value: cpuTimes[1], unit: 'ms', target: '≤ 1000 ms',
      note: 'includes GC' },
  ] };
}
