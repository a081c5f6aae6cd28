import assert from 'node:assert/strict';
import { spawn } from 'node:child_process';
import { mkdtempSync, mkdirSync, readFileSync, writeFileSync, existsSync, rmSync, readdirSync, utimesSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { applyLibraryChange, serializeLibrary } from '../../../extension/core/model/librarySerialize';
import { parseLibraryText } from '../../../extension/core/model/libraryDocument';
import { LibraryFileError, readLibraryFile, updateLibraryFile } from '../../../extension/node/libraryStore';
import { makeEntry } from './libraryFixtures';

describe('library store', () => {
  let dir: string;
  let file: string;
  beforeEach(() => { dir = mkdtempSync(join(tmpdir(), 'mt-library-')); file = join(dir, '.metric-triage', 'incident-library.json'); });
  afterEach(() => { rmSync(dir, { recursive: true, force: true }); });

  const addEntry = (id: string) => (doc: Parameters<typeof applyLibraryChange>[0]) => applyLibraryChange(doc, { upsert: [makeEntry({ id, label: 'pool_leak' })] });

  it('reads a missing file as an empty library and creates it on the first save', async () => {
    assert.deepEqual((await readLibraryFile(file)).entries, []);
    await updateLibraryFile(file, addEntry('e1'));
    const saved = await readLibraryFile(file);
    assert.deepEqual(saved.entries.map((e) => e.id), ['e1']);
    assert.deepEqual(saved.entries[0], makeEntry({ id: 'e1', label: 'pool_leak' }));
  });

  it('round-trips entries through the file unchanged, gaps kept as null', async () => {
    await updateLibraryFile(file, addEntry('e1'));
    const [entry] = (await readLibraryFile(file)).entries;
    assert.equal(entry.metrics[0].window[2], null);
  });

  it('writes entries sorted by id, one line per metric, so additions on two branches merge', async () => {
    await updateLibraryFile(file, addEntry('e3'));
    await updateLibraryFile(file, addEntry('e1'));
    const text = readFileSync(file, 'utf8');
    assert.ok(text.indexOf('"e1"') < text.indexOf('"e3"'));
    assert.equal(text.split('\n').filter((l) => l.includes('"family"')).length, 4);
    assert.equal(serializeLibrary(await readLibraryFile(file)), text, 'serialization is stable');
  });

  const badFiles: Array<[string, string, RegExp]> = [
    ['corrupt JSON', '{"schemaVersion": 1, "entries": [ {"id": oops} ]}', /invalid JSON/],
    ['a newer schema version', '{"schemaVersion": 99, "entries": []}', /schema version 1 or lower, got 99/],
    ['an entry with a wrong field', JSON.stringify({ schemaVersion: 1, entries: [{ ...makeEntry({ id: 'x', label: 'pool_leak' }), label: 42 }] }), /\$\.entries\[0\]\.label: expected a non-empty string, got 42/],
    ['an empty file', '', /empty file/],
  ];
  for (const [what, text, message] of badFiles) {
    it(`rejects ${what} with a clear error and never overwrites it`, async () => {
      await updateLibraryFile(file, addEntry('e0'));
      writeFileSync(file, text);
      await assert.rejects(readLibraryFile(file), (error: unknown) => error instanceof LibraryFileError && message.test(error.message) && error.message.includes(file));
      await assert.rejects(updateLibraryFile(file, addEntry('e1')), LibraryFileError);
      assert.equal(readFileSync(file, 'utf8'), text, 'file bytes unchanged');
      assert.ok(!existsSync(`${file}.lock`), 'lock released after the refusal');
    });
  }

  it('rejects a truncated file (cut mid-entry) naming the line, and leaves its bytes unchanged', async () => {
    await updateLibraryFile(file, addEntry('e1'));
    await updateLibraryFile(file, addEntry('e2'));
    const full = readFileSync(file);
    const truncated = full.subarray(0, Math.floor(full.length * 0.6));
    writeFileSync(file, truncated);
    await assert.rejects(updateLibraryFile(file, addEntry('e3')), /invalid JSON.*truncated|line \d+, column \d+/s);
    assert.ok(readFileSync(file).equals(truncated));
  });

  it('keeps both entries when two saves start at once in one process', async () => {
    await Promise.all([updateLibraryFile(file, addEntry('left')), updateLibraryFile(file, addEntry('right'))]);
    assert.deepEqual((await readLibraryFile(file)).entries.map((e) => e.id), ['left', 'right']);
    assert.deepEqual(readdirSync(join(dir, '.metric-triage')), ['incident-library.json'], 'no temp or lock files left');
  });

  it('keeps every entry when two processes save at the same time', async function () {
    this.timeout(60_000);
    const script = join(__dirname, 'saveEntriesProcess.ts');
    const tsx = resolve(__dirname, '../../../node_modules/.bin/tsx');
    const run = (prefix: string): Promise<number> => new Promise((done, fail) => {
      const child = spawn(tsx, [script, file, prefix, '8'], { stdio: ['ignore', 'inherit', 'inherit'] });
      child.on('error', fail);
      child.on('exit', (code) => done(code ?? 1));
    });
    const codes = await Promise.all([run('p1-'), run('p2-')]);
    assert.deepEqual(codes, [0, 0]);
    const ids = (await readLibraryFile(file)).entries.map((e) => e.id);
    assert.equal(ids.length, 16);
    assert.ok(ids.every((id, i) => i === 0 || ids[i - 1] < id), 'sorted by id');
  });

  it('waits for a held lock, then reports the lock file instead of hanging', async () => {
    await updateLibraryFile(file, addEntry('e1'));
    writeFileSync(`${file}.lock`, 'another process\n');
    await assert.rejects(updateLibraryFile(file, addEntry('e2'), { timeoutMs: 150 }), /incident-library\.json\.lock is still held/);
    assert.deepEqual((await readLibraryFile(file)).entries.map((e) => e.id), ['e1']);
  });

  it('breaks a lock left behind by a crashed process once it is older than staleMs', async () => {
    mkdirSync(join(dir, '.metric-triage'), { recursive: true });
    writeFileSync(`${file}.lock`, 'crashed process\n');
    const old = new Date(Date.now() - 60_000);
    utimesSync(`${file}.lock`, old, old);
    await updateLibraryFile(file, addEntry('e2'), { staleMs: 30_000, timeoutMs: 2_000 });
    assert.deepEqual((await readLibraryFile(file)).entries.map((e) => e.id), ['e2']);
    assert.ok(!existsSync(`${file}.lock`));
  });

  it('parse issues name the file and the JSON path of the problem', () => {
    const result = parseLibraryText('{"schemaVersion": 1, "entries": [{"id": "a"}]}', 'lib.json');
    assert.equal(result.document, undefined);
    assert.ok(result.issues.some((i) => i.file === 'lib.json' && i.path === '$.entries[0].label'));
  });
});
