/**
 * Classifier benchmarks with the bundled model: one window of 100 metrics, a 1,440-step stride-1
 * timeline of 100 metrics, and peak memory. Measures; never asserts.
 */
import { join } from 'node:path';
import type { FrameSeries, MetricFrame } from '../extension/core/frame/types';
import { FAMILIES } from '../extension/core/frame/types';
import { createClassifier } from '../extension/core/model/classifier';
import { loadClassifierModel } from '../extension/runtime/onnxRunner';
import type { BenchReport } from './run';

function buildFrame(metricCount: number, steps: number): MetricFrame {
  let state = 42;
  const random = (): number => { state = (state * 1664525 + 1013904223) >>> 0; return state / 4294967296; };
  const series: FrameSeries[] = Array.from({ length: metricCount }, (_, m) => {
    const level = 10 + random() * 100;
    const values = Float64Array.from({ length: steps }, (_, t) => level * (1 + 0.1 * Math.sin((2 * Math.PI * t) / 1440) + 0.05 * (random() - 0.5)) + (t > 1000 && m % 3 === 0 ? level : 0));
    return { id: `m${m}`, name: `m${m}`, labels: {}, family: FAMILIES[m % FAMILIES.length], kind: 'gauge', isConvertedToRate: false, values, gapFraction: 0 };
  });
  return { timesMs: Float64Array.from({ length: steps }, (_, t) => t * 60_000), stepMs: 60_000, series, warnings: [], assumptions: [], duplicateCount: 0 };
}

export async function run(): Promise<BenchReport> {
  const model = await loadClassifierModel(join(__dirname, '..', 'media', 'model'));
  const classifier = createClassifier(model.runner, model.spec);
  let peakRss = process.memoryUsage().rss;
  const sample = (): void => { peakRss = Math.max(peakRss, process.memoryUsage().rss); };
  const frame = buildFrame(100, 1440 + 12);
  const incident = { startIndex: 1001, endIndex: 1030 };
  const baseline = { startIndex: 900, endIndex: 1000 };
  await classifier.classifyWindow(frame, incident, baseline); // warm-up: session creation
  const repeats = 50;
  let started = performance.now();
  const windowCpuBefore = process.cpuUsage();
  for (let i = 0; i < repeats; i++) { await classifier.classifyWindow(frame, incident, baseline); sample(); }
  const windowMs = (performance.now() - started) / repeats;
  const windowCpu = process.cpuUsage(windowCpuBefore);
  const windowCpuMs = (windowCpu.user + windowCpu.system) / 1000 / repeats;
  started = performance.now();
  const cpuBefore = process.cpuUsage();
  const points = await classifier.timeline(frame, { windowSteps: 10, baselineSteps: 60 });
  const timelineMs = performance.now() - started;
  const cpu = process.cpuUsage(cpuBefore);
  const timelineCpuMs = (cpu.user + cpu.system) / 1000;
  sample();
  const value = classifier.createSubsetValue(frame, incident, baseline, 0);
  const coalitions = Array.from({ length: 256 }, (_, i) => Uint8Array.from({ length: 100 }, (_, k) => ((i * 31 + k * 17) % 3 === 0 ? 1 : 0)));
  started = performance.now();
  await value(coalitions);
  const subsetMs = performance.now() - started;
  sample();
  await model.runner.release();
  return {
    suite: 'classifier (bundled ONNX model, onnxruntime-node CPU)',
    lines: [
      { name: 'one window, 100 metrics (mean of 50)', value: windowMs, unit: 'ms', target: '≤ 20 ms' },
      { name: 'one window CPU time of this process (user + system)', value: windowCpuMs, unit: 'ms' },
      { name: `timeline, 100 metrics, ${points.length} steps, stride 1`, value: timelineMs, unit: 'ms', target: '≤ 2000 ms' },
      { name: 'timeline CPU time of this process (user + system)', value: timelineCpuMs, unit: 'ms', note: 'wall time above includes waiting for a shared CPU' },
      { name: 'subset values, 256 coalitions of 100 metrics', value: subsetMs, unit: 'ms' },
      { name: 'peak resident memory', value: peakRss / 1024 / 1024, unit: 'MiB' },
    ],
  };
}
