import assert from 'node:assert/strict';
import { readExportText } from '../../../extension/core/ingest';
import { buildFrame } from '../../../extension/core/frame';
import { extractLibraryMetrics, findIndexWindow } from '../../../extension/core/model/libraryFrame';
import { createLibraryEntry } from '../../../extension/core/model/libraryEntry';

// A tiny RFC 4180 wide CSV export of the invented basket-api service (one-minute step, one gap).
const CSV = [
  'time,basket_api_cpu_utilization,pantry_db_pool_pending',
  '2026-11-04T14:00:00Z,0.20,1',
  '2026-11-04T14:01:00Z,0.22,0',
  '2026-11-04T14:02:00Z,0.21,2',
  '2026-11-04T14:03:00Z,0.90,40',
  '2026-11-04T14:04:00Z,,55',
  '2026-11-04T14:05:00Z,0.95,61',
].join('\r\n');

describe('library entries from a frame', () => {
  const frame = buildFrame(readExportText(CSV, 'basket.csv'));

  it('finds the grid points inside an RFC 3339 span, inclusive, and none for a span between samples', () => {
    assert.deepEqual(findIndexWindow(frame.timesMs, { startMs: Date.parse('2026-11-04T14:03:00Z'), endMs: Date.parse('2026-11-04T14:05:00Z') }), { startIndex: 3, endIndex: 5 });
    assert.equal(findIndexWindow(frame.timesMs, { startMs: Date.parse('2026-11-04T14:03:10Z'), endMs: Date.parse('2026-11-04T14:03:50Z') }), undefined);
  });

  it('cuts every series to the windows and keeps gaps as gaps in the entry', () => {
    const metrics = extractLibraryMetrics(frame, { startIndex: 3, endIndex: 5 }, { startIndex: 0, endIndex: 2 });
    const cpu = metrics.find((m) => m.name === 'basket_api_cpu_utilization');
    assert.ok(cpu);
    assert.equal(cpu.family, 'cpu');
    assert.deepEqual(Array.from(cpu.baseline), [0.2, 0.22, 0.21]);
    const entry = createLibraryEntry({
      id: 'e', label: 'pool_leak', window: { startMs: 0, endMs: 1 }, baseline: { startMs: 0, endMs: 1 }, exportSha256: 'c'.repeat(64),
      exportFile: 'basket.csv', createdMs: 0, modelVersion: 'v', embedding: [1], metrics,
    });
    const stored = entry.metrics.find((m) => m.name === 'basket_api_cpu_utilization');
    // buildFrame forward-fills a single missing grid point (its documented rule), so 14:04 is 0.90 or a gap.
    assert.ok(stored && (stored.window[1] === null || stored.window[1] === 0.9));
    assert.deepEqual(entry.metrics.find((m) => m.name === 'pantry_db_pool_pending')?.window, [40, 55, 61]);
  });

  it('refuses windows outside the frame, naming the valid index range', () => {
    assert.throws(() => extractLibraryMetrics(frame, { startIndex: 4, endIndex: 9 }, { startIndex: 0, endIndex: 2 }), /window inside grid indices 0\.\.5, got 4\.\.9/);
  });
});
