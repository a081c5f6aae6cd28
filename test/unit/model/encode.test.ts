import { strict as assert } from 'node:assert';
import {
  computeRobustStats, DEFAULT_WINDOW_SPEC, encodeBatch, encodeMetricWindows, getRowLength, resampleWindow, SUMMARY_SLOT_COUNT,
} from '../../../extension/core/model/encode';
import { NAME_HINT_SLOT_COUNT } from '../../../extension/core/frame/nameHints';
import type { MetricWindow } from '../../../extension/core/model/types';

const W = DEFAULT_WINDOW_SPEC.sampleCount;

function metric(id: string, baseline: number[], window: number[], family: MetricWindow['family'] = 'cpu'): MetricWindow {
  return { id, family, baseline: Float64Array.from(baseline), window: Float64Array.from(window) };
}

describe('encode: robust statistics', () => {
  it('matches the MAD / modified-z check value (REFERENCE.md §4.3 item 7, Iglewicz & Hoaglin 1993)', () => {
    // x = [2.1,2.3,2.2,2.4,2.2,9.8,2.3] → median 2.3, MAD 0.1, MAD_n = 0.14826; M(9.8) = 50.588.
    const stats = computeRobustStats([2.1, 2.3, 2.2, 2.4, 2.2, 9.8, 2.3]);
    assert.ok(Math.abs(stats.median - 2.3) < 1e-12);
    assert.ok(Math.abs(stats.scale - 0.14826) < 1e-9);
    // The published M uses 0.6745 ≈ 1/1.4826, so it differs from (x − median)/MAD_n in the 4th digit.
    assert.ok(Math.abs((9.8 - stats.median) / stats.scale - 50.588) < 2e-3);
  });

  it('falls back to the mean absolute deviation when MAD is zero', () => {
    // Five zeros and one 6: MAD = 0; mean |x - 0| = 1; 1.2533 = sqrt(pi/2) (σ from mean deviation under normality, common practice).
    const stats = computeRobustStats([0, 0, 0, 0, 0, 6]);
    assert.equal(stats.median, 0);
    assert.ok(Math.abs(stats.scale - 1.2533) < 1e-12);
  });

  it('agrees with a sort-based median and MAD on random samples with ties', () => {
    // Reference: the textbook definition via Array#sort (common practice).
    let state = 7;
    const rand = (): number => { state = (state * 16807) % 2147483647; return state / 2147483647; };
    const medianBySort = (xs: number[]): number => { const s = [...xs].sort((a, b) => a - b); const m = s.length >> 1; return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2; };
    for (let trial = 0; trial < 500; trial++) {
      const xs = Array.from({ length: 1 + Math.floor(rand() * 80) }, () => Math.round(rand() * 10));
      const med = medianBySort(xs);
      const mad = medianBySort(xs.map((x) => Math.abs(x - med)));
      const stats = computeRobustStats(xs);
      assert.equal(stats.median, med);
      if (mad > 0) assert.ok(Math.abs(stats.scale - 1.4826 * mad) < 1e-12);
    }
  });

  it('ignores NaN gaps and reports the valid count', () => {
    const stats = computeRobustStats([1, Number.NaN, 3, Number.NaN, 2]);
    assert.equal(stats.validCount, 3);
    assert.equal(stats.median, 2);
  });
});

describe('encode: rows', () => {
  it('writes asinh of the robust z of each sample (z = 50.588 for the check-value outlier)', () => {
    const base = [2.1, 2.3, 2.2, 2.4, 2.2, 9.8, 2.3];
    const batch = encodeMetricWindows([metric('a', base, [9.8, 9.8, 9.8])]);
    assert.equal(batch.windowLength, getRowLength());
    assert.equal(batch.mask[0], 1);
    for (let i = 0; i < W; i++) assert.ok(Math.abs(batch.values[i] - Math.asinh(50.5868)) < 1e-4);
    assert.ok(Math.abs(batch.values[W + 1] - Math.log2(3) / 9) < 1e-6);
  });

  it('is unit-free: scaling a metric by 1000 gives the same row', () => {
    const base = [5, 6, 5.5, 6.2, 5.1, 5.9];
    const win = [7, 8, 9, 12, 14];
    const a = encodeMetricWindows([metric('a', base, win)]);
    const b = encodeMetricWindows([metric('b', base.map((v) => v * 1000), win.map((v) => v * 1000))]);
    for (let i = 0; i < a.values.length; i++) assert.ok(Math.abs(a.values[i] - b.values[i]) < 1e-5);
  });

  it('keeps heavy tails bounded by the clip', () => {
    const batch = encodeMetricWindows([metric('a', [0, 0, 0, 0], [1e12, 1e12, -1e12])]);
    for (let i = 0; i < W; i++) assert.ok(Math.abs(batch.values[i]) <= DEFAULT_WINDOW_SPEC.clip);
  });

  it('masks a metric whose baseline has fewer than 3 valid samples or whose window is mostly gaps', () => {
    const nan = Number.NaN;
    const batch = encodeMetricWindows([
      metric('few-baseline', [1, nan, nan, 2], [1, 2, 3]),
      metric('gappy-window', [1, 2, 3, 4], [nan, nan, nan, 5]),
      metric('ok', [1, 2, 3, 4], [nan, 2, 3, 5]),
      metric('too-short', [1, 2, 3, 4], [5, 6]),
    ]);
    assert.deepEqual(Array.from(batch.mask), [0, 0, 1, 0]);
    for (const v of batch.values) assert.ok(Number.isFinite(v));
  });

  it('pads shorter examples with mask-0 rows in a batch', () => {
    const m = metric('a', [1, 2, 3, 4], [5, 6, 7]);
    const batch = encodeBatch([[m], [m, m, m]]);
    assert.equal(batch.nodeCount, 3);
    assert.deepEqual(Array.from(batch.mask), [1, 0, 0, 1, 1, 1]);
  });

  it('writes the name hints after the summary slots, from name and labels or else from the series id', () => {
    const hintsAt = W + SUMMARY_SLOT_COUNT;
    const hints = (m: MetricWindow): number[] => {
      const batch = encodeMetricWindows([m]);
      return Array.from(batch.values.subarray(hintsAt, hintsAt + NAME_HINT_SLOT_COUNT));
    };
    const base = [1, 2, 3, 4];
    const win = [5, 6, 7];
    // node_cpu_seconds_total{mode="idle"}: the node exporter's idle CPU (REFERENCE.md §2) falls when the host gets busy.
    assert.deepEqual(hints(metric('node_cpu_seconds_total{cpu="0",mode="idle"}', base, win)), [0, 0, 0, 1, 0]);
    assert.deepEqual(hints({ ...metric('x', base, win), name: 'http.client.request.duration', labels: { quantile: '0.99' } }), [0, 1, 0, 0, 1]);
    assert.deepEqual(hints(metric('http.server.request.duration', base, win)), [1, 0, 0, 0, 0]);
    assert.equal(getRowLength(), W + SUMMARY_SLOT_COUNT + NAME_HINT_SLOT_COUNT);
  });

  it('refuses a window longer than the spec allows, naming the metric and both lengths', () => {
    const long = new Array(600).fill(1);
    assert.throws(() => encodeMetricWindows([metric('disk.busy', [1, 2, 3], long)]), /disk\.busy.*at most 512.*got 600/);
  });
});

describe('encode: resampling', () => {
  it('averages bins when shrinking and interpolates when stretching', () => {
    const shrunk = resampleWindow([1, 3, 5, 7], 2);
    assert.deepEqual(Array.from(shrunk ?? []), [2, 6]);
    const stretched = resampleWindow([0, 10], 4);
    // Positions (i+0.5)*2/4-0.5 = -0.25, 0.25, 0.75, 1.25 → clamped 0, 0.25, 0.75, 1.
    assert.deepEqual(Array.from(stretched ?? []), [0, 2.5, 7.5, 10]);
  });

  it('fills gaps from the nearest valid point and returns null when nothing is valid', () => {
    const nan = Number.NaN;
    assert.deepEqual(Array.from(resampleWindow([nan, 1, nan, nan, nan, 9], 6) ?? []), [1, 1, 1, 1, 9, 9]);
    assert.equal(resampleWindow([nan, nan], 4), null);
  });
});
