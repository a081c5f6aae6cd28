/**
 * First paint of the metric viewer on a 100-series × 10,000-point export, as measured inside the
 * real editor by the screen tests (performance marks in the webview: from the `init` message to
 * the frame after the visible charts are drawn). Running the editor takes minutes, so this bench
 * reports the latest measurement from test/artifacts/ and says how old it is; run
 * `npm run test:editor` to refresh it. It also times the pure view-model build for the same size.
 */
import { existsSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import type { FrameSeries, MetricFrame } from '../extension/core/frame/types';
import { buildSeriesGroups } from '../extension/core/view/buildViewerModel';
import type { BenchLine, BenchReport } from './run';

interface FirstPaintRecord {
  readonly initToFirstPaintMs: number;
  readonly pageToFirstPaintMs: number;
  readonly seriesCount: number;
  readonly pointCount: number;
  readonly measuredAt: string;
  readonly loadAverage1m?: number;
}

function makeFrame(seriesCount: number, pointCount: number): MetricFrame {
  const timesMs = Float64Array.from({ length: pointCount }, (_, i) => i * 15_000);
  const series: FrameSeries[] = Array.from({ length: seriesCount }, (_, k) => ({
    id: `m${k}`, name: `metric_${k}`, labels: { service: `svc-${k % 5}` }, family: 'cpu', kind: 'gauge', isConvertedToRate: false,
    values: Float64Array.from(timesMs, (_, i) => Math.sin(i / (50 + k)) + (i % 97) / 97), gapFraction: 0,
  }));
  return { timesMs, stepMs: 15_000, series, warnings: [], assumptions: [], duplicateCount: 0 };
}

export async function run(): Promise<BenchReport> {
  const lines: BenchLine[] = [];
  const file = join(__dirname, '..', 'test', 'artifacts', 'editor-first-paint.json');
  if (existsSync(file)) {
    const record = JSON.parse(readFileSync(file, 'utf8')) as FirstPaintRecord;
    const ageHours = (Date.now() - statSync(file).mtimeMs) / 3_600_000;
    const note = `${record.seriesCount}×${record.pointCount} export, measured ${record.measuredAt} (${ageHours.toFixed(1)} h ago) by npm run test:editor, load average ${record.loadAverage1m?.toFixed(1) ?? 'n/a'}`;
    lines.push({ name: 'viewer first paint after init (real editor)', value: record.initToFirstPaintMs, unit: 'ms', target: '≤ 1000 ms', note });
    lines.push({ name: 'viewer first paint after page start (real editor)', value: record.pageToFirstPaintMs, unit: 'ms', note });
  } else {
    lines.push({ name: 'viewer first paint (real editor)', value: Number.NaN, unit: 'ms', target: '≤ 1000 ms', note: 'not measured yet: run npm run test:editor' });
  }
  const frame = makeFrame(100, 10_000);
  const started = performance.now();
  const groups = buildSeriesGroups(frame);
  const elapsedMs = performance.now() - started;
  const points = groups.reduce((n, g) => n + g.series.reduce((m, s) => m + s.timesMs.length, 0), 0);
  lines.push({ name: 'view model: decimate 100×10,000 for the webview', value: elapsedMs, unit: 'ms', note: `${points} points sent` });
  lines.push({ name: 'view model: init payload size (series only)', value: JSON.stringify(groups).length / 1024, unit: 'KiB' });
  return { suite: 'editor', lines };
}
