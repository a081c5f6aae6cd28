import assert from 'node:assert/strict';
import { createLibraryEntry, downsampleForLibrary, reembedLibrary, findStaleEntries } from '../../../extension/core/model/libraryEntry';
import { checkLibraryLabel } from '../../../extension/core/model/libraryDocument';
import { LIBRARY_SCHEMA_VERSION } from '../../../extension/core/model/libraryTypes';
import { makeEntry } from './libraryFixtures';

describe('library entries', () => {
  it('downsamples by averaging equal buckets, skipping gaps (hand-computed)', () => {
    // 8 samples into 4 buckets of 2: [1,3]→2, [NaN,5]→5, [NaN,NaN]→gap, [7,9]→8.
    assert.deepEqual(downsampleForLibrary([1, 3, Number.NaN, 5, Number.NaN, Number.NaN, 7, 9], 4), [2, 5, null, 8]);
  });

  it('keeps short series as they are and caps long ones at 64 points', () => {
    assert.deepEqual(downsampleForLibrary([1, Number.NaN, 3]), [1, null, 3]);
    const long = Array.from({ length: 1000 }, (_, i) => i);
    const out = downsampleForLibrary(long);
    assert.equal(out.length, 64);
    // First bucket = samples 0..14 (floor(1000/64) = 15): mean 7.
    assert.equal(out[0], 7);
    assert.deepEqual(downsampleForLibrary([]), []);
  });

  it('derives isBuiltInClass from the label and refuses labels that are not lowercase tokens', () => {
    assert.equal(makeEntry({ id: 'a', label: 'memory_leak' }).isBuiltInClass, true);
    assert.equal(makeEntry({ id: 'b', label: 'pool_leak' }).isBuiltInClass, false);
    assert.match(checkLibraryLabel('Pool Leak') ?? '', /expected a label/);
    assert.throws(() => makeEntry({ id: 'c', label: '' }), /label: expected a label/);
  });

  it('drops metrics whose window is all gaps and refuses an entry without any data', () => {
    const base = { id: 'x', label: 'pool_leak', window: { startMs: 0, endMs: 1 }, baseline: { startMs: 0, endMs: 1 }, exportSha256: 'b'.repeat(64), exportFile: 'f.csv', createdMs: 0, modelVersion: 'v', embedding: [1] };
    const entry = createLibraryEntry({ ...base, metrics: [
      { id: 'm1', name: 'm1', family: 'cpu', baseline: [1], window: [Number.NaN] },
      { id: 'm2', name: 'm2', family: 'cpu', baseline: [1], window: [2] },
    ] });
    assert.deepEqual(entry.metrics.map((m) => m.id), ['m2']);
    assert.throws(() => createLibraryEntry({ ...base, metrics: [{ id: 'm1', name: 'm1', family: 'cpu', baseline: [1], window: [Number.NaN] }] }), /at least one metric with data/);
  });

  it('re-embeds only entries of another model version, from their stored metric data', async () => {
    const doc = { schemaVersion: LIBRARY_SCHEMA_VERSION, entries: [makeEntry({ id: 'old', label: 'pool_leak', modelVersion: 'v1' }), makeEntry({ id: 'new', label: 'pool_leak', modelVersion: 'v2' })] };
    assert.deepEqual(findStaleEntries(doc, 'v2').map((e) => e.id), ['old']);
    const seen: number[] = [];
    // The embedder here sums each metric's window so the test can see it received the stored data.
    const result = await reembedLibrary(doc, 'v2', async (metrics) => {
      seen.push(metrics.length);
      return metrics.map((m) => Array.from(m.window).filter(Number.isFinite).reduce((s, v) => s + v, 0));
    });
    assert.deepEqual(result.reembeddedIds, ['old']);
    assert.deepEqual(seen, [2]);
    assert.deepEqual(result.document.entries[0].embedding, [1.85, 156]);
    assert.equal(result.document.entries[0].modelVersion, 'v2');
    assert.equal(result.document.entries[1], doc.entries[1]);
  });
});
