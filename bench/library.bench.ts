/**
 * Incident library speed: matching one classified window against libraries of 100 / 1,000 / 5,000
 * entries (32-d embeddings, 20 labels), and the size/time of saving and loading the file
 * (entries of 24 metrics × 64 + 64 points).
 */
import { mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { BenchLine, BenchReport } from './run';
import { createLibraryEntry } from '../extension/core/model/libraryEntry';
import { matchLibrary } from '../extension/core/model/libraryMatch';
import { applyLibraryChange } from '../extension/core/model/librarySerialize';
import type { LibraryEntry } from '../extension/core/model/libraryTypes';
import { CLASSES } from '../extension/core/model/types';
import { readLibraryFile, updateLibraryFile } from '../extension/node/libraryStore';
import { createMulberry32 } from '../extension/core/explain/computeShapley';

function buildEntries(count: number, metricCount: number, random: () => number): LibraryEntry[] {
  return Array.from({ length: count }, (_, i) => createLibraryEntry({
    id: `e${String(i).padStart(6, '0')}`, label: `basket_fault_${i % 20}`, window: { startMs: 0, endMs: 600_000 }, baseline: { startMs: 0, endMs: 0 },
    exportSha256: 'a'.repeat(64), exportFile: 'basket-api.csv', createdMs: 0, modelVersion: 'bench',
    embedding: Array.from({ length: 32 }, () => random()),
    metrics: Array.from({ length: metricCount }, (_, m) => ({
      id: `pantry_db_metric_${m}`, name: `pantry_db_metric_${m}`, family: 'saturation' as const,
      baseline: Array.from({ length: 200 }, () => 100 * random()), window: Array.from({ length: 64 }, () => 100 * random()),
    })),
  }));
}

export async function run(): Promise<BenchReport> {
  const random = createMulberry32(5);
  const lines: BenchLine[] = [];
  const base = Object.fromEntries(CLASSES.map((c) => [c, 1 / CLASSES.length]));
  for (const count of [100, 1000, 5000]) {
    const entries = buildEntries(count, 1, random);
    const query = Array.from({ length: 32 }, () => random());
    matchLibrary(base, query, entries, 'bench');
    const t0 = performance.now();
    const repeats = 20;
    for (let r = 0; r < repeats; r++) matchLibrary(base, query, entries, 'bench');
    lines.push({ name: `matchLibrary, ${count} entries`, value: (performance.now() - t0) / repeats, unit: 'ms', target: '< 50 ms' });
  }
  const dir = mkdtempSync(join(tmpdir(), 'mt-bench-library-'));
  try {
    const file = join(dir, 'incident-library.json');
    const entries = buildEntries(200, 24, random);
    const t0 = performance.now();
    await updateLibraryFile(file, (doc) => applyLibraryChange(doc, { upsert: entries }));
    lines.push({ name: 'save 200 entries × 24 metrics (locked, atomic)', value: performance.now() - t0, unit: 'ms' });
    lines.push({ name: 'file size per entry (24 metrics)', value: statSync(file).size / 200 / 1024, unit: 'KiB' });
    const t1 = performance.now();
    await readLibraryFile(file);
    lines.push({ name: 'load + validate 200 entries', value: performance.now() - t1, unit: 'ms' });
    const t2 = performance.now();
    await updateLibraryFile(file, (doc) => applyLibraryChange(doc, { upsert: buildEntries(1, 24, random).map((e) => ({ ...e, id: 'zz-new' })) }));
    lines.push({ name: 'add 1 entry to a 200-entry library', value: performance.now() - t2, unit: 'ms' });
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
  return { suite: 'incident library', lines };
}
