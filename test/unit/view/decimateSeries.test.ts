import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { decimateMinMax, findIndexRange } from '../../../extension/core/view/decimateSeries';

/** NAB realKnownCause machine temperature (open data, MIT; test/fixtures/nab-cloud/README.md). */
function readNabSeries(): { timesMs: Float64Array; values: Float64Array } {
  const file = join(__dirname, '../../fixtures/nab-cloud/series/realKnownCause__machine_temperature_system_failure.csv');
  const rows = readFileSync(file, 'utf8').trim().split('\n').slice(1).map((line) => line.split(','));
  return { timesMs: Float64Array.from(rows, (r) => Date.parse(r[0])), values: Float64Array.from(rows, (r) => Number(r[1])) };
}

describe('decimateMinMax', () => {
  it('keeps the extremes of a real 22,695-point series within 2 points per bucket (NAB machine temperature)', () => {
    const { timesMs, values } = readNabSeries();
    assert.equal(values.length, 22695);
    const out = decimateMinMax(timesMs, values, 300);
    assert.ok(out.timesMs.length <= 600, `got ${out.timesMs.length} points`);
    let min = Infinity;
    let max = -Infinity;
    for (const v of values) { min = Math.min(min, v); max = Math.max(max, v); }
    const kept = out.valuesY.filter((v): v is number => v !== null);
    // The min-max rule (common practice, chart.js 'min-max' decimation) must keep the global extremes.
    assert.equal(Math.min(...kept), min);
    assert.equal(Math.max(...kept), max);
    for (let i = 1; i < out.timesMs.length; i++) assert.ok(out.timesMs[i] > out.timesMs[i - 1], 'time order kept');
    assert.equal(out.timesMs[0], timesMs[0]);
  });

  it('keeps a gap visible as a null point instead of bridging it', () => {
    const times = Array.from({ length: 1000 }, (_, i) => i * 1000);
    const values = times.map((_, i) => (i >= 500 && i < 510 ? NaN : Math.sin(i / 50)));
    const out = decimateMinMax(times, values, 50);
    const gapAt = out.valuesY.indexOf(null);
    assert.ok(gapAt >= 0);
    assert.ok(out.timesMs[gapAt] >= 500_000 && out.timesMs[gapAt] < 510_000);
  });

  it('copies short ranges unchanged and gives empty output for empty ranges', () => {
    assert.deepEqual(decimateMinMax([1, 2, 3], [5, NaN, 7], 10), { timesMs: [1, 2, 3], valuesY: [5, null, 7] });
    assert.deepEqual(decimateMinMax([], [], 10), { timesMs: [], valuesY: [] });
    assert.deepEqual(decimateMinMax([1, 2, 3], [1, 2, 3], 10, 2, 1), { timesMs: [], valuesY: [] });
  });

  it('never returns more than 3 points per bucket and every point is a source sample', () => {
    fc.assert(fc.property(fc.array(fc.oneof(fc.double({ noNaN: true, min: -1e6, max: 1e6 }), fc.constant(NaN)), { maxLength: 400 }), fc.integer({ min: 1, max: 50 }), (values, buckets) => {
      const times = values.map((_, i) => i);
      const out = decimateMinMax(times, values, buckets);
      assert.ok(out.timesMs.length <= Math.max(values.length <= buckets * 2 ? values.length : 0, buckets * 3));
      out.timesMs.forEach((t, k) => {
        const source = values[t];
        assert.equal(out.valuesY[k], Number.isFinite(source) ? source : null);
      });
    }));
  });
});

describe('findIndexRange', () => {
  it('finds the inclusive time range by binary search', () => {
    const times = [0, 10, 20, 30, 40];
    assert.deepEqual(findIndexRange(times, 10, 30), { from: 1, to: 4 });
    assert.deepEqual(findIndexRange(times, 11, 19), { from: 2, to: 2 });
    assert.deepEqual(findIndexRange(times, -5, 100), { from: 0, to: 5 });
  });
});
