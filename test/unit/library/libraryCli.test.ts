import assert from 'node:assert/strict';
import { mkdtempSync, rmSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseLibraryArgs, parseTimeSpan } from '../../../extension/cli/libraryArgs';
import { runLibrary, createEntryId } from '../../../extension/cli/library';
import { applyLibraryChange } from '../../../extension/core/model/librarySerialize';
import { updateLibraryFile } from '../../../extension/node/libraryStore';
import { makeEntry } from './libraryFixtures';

describe('library CLI arguments', () => {
  it('parses add with RFC 3339 window and baseline (RFC 3339 §5.8 examples style, Z and offsets)', () => {
    const parsed = parseLibraryArgs(['add', 'basket.csv', '--label', 'pool_leak', '--window', '2026-11-04T14:03:00Z/2026-11-04T14:20:00Z', '--baseline=2026-11-04T15:00:00+02:00/2026-11-04T15:55:00+02:00']);
    assert.ok(!('error' in parsed) && parsed.kind === 'add');
    assert.equal(parsed.exportFile, 'basket.csv');
    // Reference values: Date.UTC (ECMAScript) for 2026-11-04T14:03Z; +02:00 offsets subtract two hours.
    assert.deepEqual(parsed.window, { startMs: Date.UTC(2026, 10, 4, 14, 3), endMs: Date.UTC(2026, 10, 4, 14, 20) });
    assert.deepEqual(parsed.baseline, { startMs: Date.UTC(2026, 10, 4, 13, 0), endMs: Date.UTC(2026, 10, 4, 13, 55) });
  });

  it('accepts epoch milliseconds and refuses a zone-less time, naming what was expected', () => {
    assert.deepEqual(parseTimeSpan('1000/2000'), { startMs: 1000, endMs: 2000 });
    assert.match((parseTimeSpan('2026-11-04T14:03:00/2026-11-04T14:20:00Z') as { error: string }).error, /RFC 3339 times with a zone/);
    assert.match((parseTimeSpan('2000/1000') as { error: string }).error, /END at or after START/);
  });

  it('reports missing and unknown arguments clearly', () => {
    assert.match((parseLibraryArgs(['add', 'f.csv', '--window', '1/2']) as { error: string }).error, /expected --label/);
    assert.match((parseLibraryArgs(['add', 'f.csv', '--label', 'Pool Leak', '--window', '1/2']) as { error: string }).error, /expected a label/);
    assert.match((parseLibraryArgs(['list', '--lable', 'x']) as { error: string }).error, /unknown option --lable/);
    assert.match((parseLibraryArgs(['frobnicate']) as { error: string }).error, /expected a subcommand add, list or rm/);
    assert.match((parseLibraryArgs(['rm']) as { error: string }).error, /at least one entry ID/);
  });

  it('makes ids that sort by creation time', () => {
    const a = createEntryId(Date.UTC(2026, 10, 4, 14, 3));
    const b = createEntryId(Date.UTC(2026, 10, 5, 9, 0));
    assert.match(a, /^20261104T140300Z-[0-9a-f]{6}$/);
    assert.ok(a < b);
  });
});

describe('library CLI commands', () => {
  let dir: string;
  let out: string;
  let err: string;
  const io = () => ({ cwd: dir, write: (t: string) => { out += t; }, writeError: (t: string) => { err += t; } });
  beforeEach(() => { dir = mkdtempSync(join(tmpdir(), 'mt-cli-')); out = ''; err = ''; });
  afterEach(() => { rmSync(dir, { recursive: true, force: true }); });

  it('lists entries and removes one by id in the default workspace file', async () => {
    const file = join(dir, '.metric-triage', 'incident-library.json');
    await updateLibraryFile(file, (d) => applyLibraryChange(d, { upsert: [makeEntry({ id: 'e1', label: 'pool_leak' }), makeEntry({ id: 'e2', label: 'memory_leak' })] }));
    assert.equal(await runLibrary(['list'], io()), 0);
    assert.match(out, /2 entries, 2 labels/);
    assert.match(out, /e1 {2}pool_leak \(own label\)/);
    assert.equal(await runLibrary(['rm', 'e1'], io()), 0);
    assert.ok(!readFileSync(file, 'utf8').includes('"e1"'));
    assert.equal(await runLibrary(['rm', 'nope'], io()), 1);
    assert.match(err, /not found: nope/);
  });

  it('exits 1 with the file and JSON path when the library is invalid, 2 on usage errors', async () => {
    const file = join(dir, 'lib.json');
    require('node:fs').writeFileSync(file, '{"schemaVersion": 1, "entries": [{}]}');
    assert.equal(await runLibrary(['list', '--library', file], io()), 1);
    assert.match(err, /lib\.json: \$\.entries\[0\]\.id: expected a non-empty string/);
    assert.equal(await runLibrary(['add'], io()), 2);
  });

  it('adds a labelled window of a real export with the bundled model, then lists it (NAB ec2_cpu_utilization_24ae8d, MIT)', async () => {
    const fixture = join(__dirname, '../../fixtures/nab-cloud/series/realAWSCloudwatch__ec2_cpu_utilization_24ae8d.csv');
    const code = await runLibrary(['add', fixture, '--label', 'cpu_spike_job', '--window', '2014-02-26T21:40:00Z/2014-02-26T22:30:00Z', '--postmortem', 'postmortems/2014-02-26.md'], io());
    assert.equal(code, 0, err);
    const text = readFileSync(join(dir, '.metric-triage', 'incident-library.json'), 'utf8');
    const document = JSON.parse(text) as { entries: { label: string; embedding: number[]; exportSha256: string; window: { startMs: number } }[] };
    assert.equal(document.entries[0].label, 'cpu_spike_job');
    const spec = JSON.parse(readFileSync(join(__dirname, '../../../media/model/classifier.json'), 'utf8')) as { embeddingSize: number };
    assert.equal(document.entries[0].embedding.length, spec.embeddingSize);
    assert.equal(document.entries[0].window.startMs, Date.UTC(2014, 1, 26, 21, 40));
    assert.match(document.entries[0].exportSha256, /^[0-9a-f]{64}$/);
    out = '';
    assert.equal(await runLibrary(['list'], io()), 0);
    assert.match(out, /cpu_spike_job \(own label\).*postmortems\/2014-02-26\.md/);
  });

  it('refuses a window outside the export, naming the span the export covers', async () => {
    const fixture = join(__dirname, '../../fixtures/nab-cloud/series/realAWSCloudwatch__ec2_cpu_utilization_24ae8d.csv');
    assert.equal(await runLibrary(['add', fixture, '--label', 'x', '--window', '2015-01-01T00:00:00Z/2015-01-02T00:00:00Z'], io()), 1);
    assert.match(err, /covers 2014-02-14T14:30:00\.000Z to 2014-02-28T14:25:00\.000Z/);
  });
});
