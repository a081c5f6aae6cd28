import assert from 'node:assert/strict';
import { buildFrame, FrameTooLargeError } from '../../../extension/core/frame';
import { convertCounterToRate } from '../../../extension/core/frame/alignSeries';
import { readExportText } from '../../../extension/core/ingest';
import type { IngestResult, RawSeries, SeriesKind } from '../../../extension/core/ingest/types';

function rawSeries(name: string, timesS: readonly number[], values: readonly number[], kind: SeriesKind = 'gauge'): RawSeries {
  return { id: name, name, labels: {}, kind, timesMs: Float64Array.from(timesS, (t) => t * 1000), values: Float64Array.from(values) };
}
function result(...series: RawSeries[]): IngestResult {
  return { file: 'x', format: 'long-csv', series, issues: [], assumptions: [] };
}
const close = (actual: ArrayLike<number>, expected: readonly number[], tolerance = 1e-4): void => {
  assert.equal(actual.length, expected.length);
  for (let i = 0; i < expected.length; i++) {
    if (Number.isNaN(expected[i])) assert.ok(Number.isNaN(actual[i]), `index ${i}: expected NaN, got ${actual[i]}`);
    else assert.ok(Math.abs(actual[i] - expected[i]) <= tolerance, `index ${i}: expected ${expected[i]}, got ${actual[i]}`);
  }
};

describe('buildFrame', () => {
  it('turns a counter with a reset into per-second rates (REFERENCE.md §4.3 check value 9; PromQL rate() reset rule)', () => {
    // v = [100,160,220,10,70] at 60 s → rates [1, 1, 10/60, 1] /s; the first point has no rate.
    const frame = buildFrame(result(rawSeries('orders_total', [0, 60, 120, 180, 240], [100, 160, 220, 10, 70], 'counter')));
    assert.equal(frame.stepMs, 60_000);
    close(frame.series[0].values, [NaN, 1, 1, 0.1667, 1]);
    assert.equal(frame.series[0].isConvertedToRate, true);
    assert.equal(frame.series[0].unit, '1/s');
    assert.match(frame.warnings.join(' '), /1 counter reset/);
    assert.equal(convertCounterToRate(Float64Array.of(0, 60_000, 120_000, 180_000, 240_000), Float64Array.of(100, 160, 220, 10, 70)).resetCount, 1);
  });

  it('reads the same check value through the OTLP counter and the wide CSV `_total` column', () => {
    const csv = readExportText('time,requests_total\n0,100\n60,160\n120,220\n180,10\n240,70\n', 'c.csv', 'wide-csv');
    close(buildFrame(csv).series[0].values, [NaN, 1, 1, 0.1667, 1]);
  });

  it('sorts unsorted input and keeps the last value written for a duplicate timestamp', () => {
    const frame = buildFrame(result(rawSeries('g', [120, 0, 60, 60, 180], [3, 1, 2, 9, 4])));
    close(frame.series[0].values, [1, 9, 3, 4]);
    assert.equal(frame.duplicateCount, 1);
    assert.match(frame.warnings.join(' '), /not in time order/);
    assert.match(frame.warnings.join(' '), /1 duplicate timestamps resolved/);
  });

  it('keeps gaps as NaN with a gap fraction, filling only a single missing grid point', () => {
    // Samples every 60 s with 120 missing, then nothing from 420 to 540: one step filled, the long run stays empty.
    const frame = buildFrame(result(rawSeries('g', [0, 60, 180, 240, 300, 360, 600], [1, 2, 4, 5, 6, 7, 8])));
    close(frame.series[0].values, [1, 2, 2, 4, 5, 6, 7, NaN, NaN, NaN, 8]);
    assert.equal(frame.series[0].gapFraction, 3 / 11);
  });

  it('never fills a NaN written in the export (a recorded gap)', () => {
    const frame = buildFrame(result(rawSeries('g', [0, 60, 120], [1, NaN, 3])));
    close(frame.series[0].values, [1, NaN, 3]);
  });

  it('aligns series with different cadences on the median step and absorbs jitter', () => {
    const frame = buildFrame(result(
      rawSeries('a', [0, 61, 119, 180, 242], [1, 2, 3, 4, 5]),
      rawSeries('b', [0, 60, 120, 180, 240], [1, 1, 1, 1, 1]),
      rawSeries('c', [0, 60, 120, 180, 240], [2, 2, 2, 2, 2]),
    ));
    assert.equal(frame.stepMs, 60_000);
    close(frame.series[0].values, [1, 2, 3, 4, 5]);
    assert.deepEqual(frame.series.map((s) => s.family), ['other', 'other', 'other']);
  });

  it('tags families from names via the lexicon', () => {
    const frame = buildFrame(result(rawSeries('node_cpu_seconds_total', [0, 60], [1, 2], 'counter'), rawSeries('http_request_duration_seconds', [0, 60], [1, 2])));
    assert.deepEqual(frame.series.map((s) => s.family), ['cpu', 'latency']);
  });

  it('handles no series, no samples and a single sample', () => {
    assert.equal(buildFrame(result()).timesMs.length, 0);
    const one = buildFrame(result(rawSeries('g', [5], [7])));
    assert.deepEqual([...one.timesMs], [5000]);
    assert.equal(one.stepMs, 0);
    close(one.series[0].values, [7]);
    const empty = buildFrame(result(rawSeries('g', [], [])));
    assert.equal(empty.series[0].gapFraction, 1);
  });

  it('places series of one sample each at their own times (the step comes from all their times), none dropped', () => {
    const frame = buildFrame(result(rawSeries('a', [0], [1]), rawSeries('b', [60], [2]), rawSeries('c', [120], [3])));
    assert.deepEqual([...frame.timesMs], [0, 60_000, 120_000]);
    assert.equal(frame.stepMs, 60_000);
    close(frame.series[1].values, [NaN, 2, NaN]);
    close(frame.series[2].values, [NaN, NaN, 3]);
  });

  it('decimates (widens the step) past maxGridPoints and says so', () => {
    const times = Array.from({ length: 1000 }, (_, i) => i);
    const frame = buildFrame(result(rawSeries('g', times, times)), { maxGridPoints: 100 });
    assert.equal(frame.stepMs, 10_000);
    assert.equal(frame.timesMs.length, 100);
    assert.match(frame.warnings[0], /exceeds 100: step widened 10×/);
  });

  it('refuses a frame beyond maxCells with an error naming the sizes', () => {
    const times = Array.from({ length: 100 }, (_, i) => i);
    assert.throws(() => buildFrame(result(rawSeries('a', times, times), rawSeries('b', times, times)), { maxCells: 150 }),
      (err: unknown) => err instanceof FrameTooLargeError && /expected at most 150 grid cells, got 100 points × 2 series/.test(err.message));
  });

  it('turns delta series into rates over their interval', () => {
    const frame = buildFrame(result(rawSeries('d', [0, 10, 20], [5, 20, 30], 'delta')));
    close(frame.series[0].values, [NaN, 2, 3]);
  });
});
