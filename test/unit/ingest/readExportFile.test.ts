import assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { readExportText } from '../../../extension/core/ingest';
import { ExportFileError, IngestCancelledError, loadFrame, readExportFile, sha256File } from '../../../extension/node/readExport';
import { formatStep, renderInspectText, summarizeExport } from '../../../extension/cli/inspect';

const FIXTURES = join(__dirname, '../../fixtures/ingest');
const ROOT = join(__dirname, '../../..');

describe('readExportFile (node adapter)', () => {
  let dir: string;
  before(() => { dir = mkdtempSync(join(tmpdir(), 'ingest-test-')); });
  after(() => rmSync(dir, { recursive: true, force: true }));

  it('computes sha256 of "abc" as the FIPS 180-2 example digest', async () => {
    // FIPS 180-2, Appendix B.1: SHA-256("abc").
    const path = join(dir, 'abc.txt');
    writeFileSync(path, 'abc');
    assert.equal(await sha256File(path), 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
  });

  it('reads every fixture in 7-byte chunks exactly as the in-memory reader does', async () => {
    for (const name of ['wide.csv', 'long.csv', 'otlp-file-exporter.jsonl', 'otlp-example-shape.json', 'line-protocol.lp', 'range-query-doc-example.json', 'semicolon-decimal-comma.csv']) {
      const path = join(FIXTURES, name);
      const streamed = await readExportFile(path, { chunkBytes: 7 });
      const whole = readExportText(readFileSync(path, 'utf8'), path);
      assert.equal(streamed.format, whole.format, name);
      assert.deepEqual(streamed.series.map((s) => [s.id, [...s.timesMs], [...s.values]]), whole.series.map((s) => [s.id, [...s.timesMs], [...s.values]]), name);
      assert.deepEqual(streamed.issues, whole.issues, name);
    }
  });

  it('decodes multi-byte UTF-8 split across chunks and UTF-16LE files with a BOM', async () => {
    const text = 'time,"température{site=""Zürich""}"\n2024-01-01T00:00:00Z,1\n';
    const utf8 = join(dir, 'u8.csv');
    writeFileSync(utf8, text);
    const fromUtf8 = await readExportFile(utf8, { chunkBytes: 3 });
    assert.equal(fromUtf8.series[0].id, 'température{site="Zürich"}');
    const utf16 = join(dir, 'u16.csv');
    writeFileSync(utf16, Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(text, 'utf16le')]));
    assert.equal((await readExportFile(utf16)).series[0].id, 'température{site="Zürich"}');
  });

  it('reports progress up to the file size and stops on cancellation', async () => {
    const path = join(FIXTURES, 'wide.csv');
    const seen: number[] = [];
    await readExportFile(path, { chunkBytes: 16, onProgress: (read, total) => { seen.push(read); assert.equal(total, readFileSync(path).length); } });
    assert.equal(seen.at(-1), readFileSync(path).length);
    let calls = 0;
    await assert.rejects(readExportFile(path, { chunkBytes: 16, isCancelled: () => ++calls > 2 }), IngestCancelledError);
  });

  it('names the path when the file is missing or a directory', async () => {
    await assert.rejects(readExportFile(join(dir, 'missing.csv')), (err: unknown) => err instanceof ExportFileError && err.message.endsWith('missing.csv: cannot read the export (no such file)'));
    await assert.rejects(readExportFile(dir), (err: unknown) => err instanceof ExportFileError && /expected a file, got a directory/.test(err.message));
  });

  it('reads gzip-compressed exports (RFC 1952, compressed by node:zlib) as the plain file, hashing and counting the .gz bytes', async () => {
    for (const name of ['wide.csv', 'long.csv', 'otlp-file-exporter.jsonl', 'line-protocol.lp', 'range-query-doc-example.json']) {
      const plain = join(FIXTURES, name);
      const packed = join(dir, `${name}.gz`);
      writeFileSync(packed, gzipSync(readFileSync(plain)));
      const seen: number[] = [];
      const fromGzip = await readExportFile(packed, { chunkBytes: 16, onProgress: (read) => seen.push(read) });
      const fromPlain = await readExportFile(plain);
      assert.equal(fromGzip.format, fromPlain.format, name);
      assert.deepEqual(fromGzip.series.map((x) => [x.id, [...x.timesMs], [...x.values]]), fromPlain.series.map((x) => [x.id, [...x.timesMs], [...x.values]]), name);
      assert.equal(seen.at(-1), readFileSync(packed).length, name);
      assert.equal((await loadFrame(packed)).sha256, await sha256File(packed), name);
    }
  });

  it('names a truncated .gz file instead of reading what it holds as an empty export', async () => {
    const whole = gzipSync(readFileSync(join(FIXTURES, 'wide.csv')));
    const cut = join(dir, 'cut.csv.gz');
    writeFileSync(cut, whole.subarray(0, whole.length - 12));
    await assert.rejects(readExportFile(cut), (err: unknown) => err instanceof ExportFileError && err.message === `${cut}: expected gzip-compressed data after its gzip header, got unexpected end of file (a truncated or damaged .gz file?)`);
  });

  it('loadFrame returns the result, the frame and the same sha256 as sha256File', async () => {
    const path = join(FIXTURES, 'long.csv');
    const loaded = await loadFrame(path);
    assert.equal(loaded.sha256, await sha256File(path));
    assert.equal(loaded.frame.series.length, 3);
    assert.equal(loaded.frame.stepMs, 60_000);
  });
});

describe('metric-triage inspect', () => {
  it('summarises an export: format, RFC 3339 range, step, families, gaps', async () => {
    const { result, frame, sha256 } = await loadFrame(join(FIXTURES, 'wide.csv'));
    const report = summarizeExport(result, frame, sha256);
    assert.deepEqual(report.timeRange, { start: '2024-03-01T10:00:00.000Z', end: '2024-03-01T10:04:00.000Z' });
    assert.equal(report.stepMs, 60_000);
    assert.deepEqual(report.families, { cpu: 1, memory: 1, traffic: 1 });
    assert.equal(report.ratesConverted, 1);
    const text = renderInspectText(report);
    assert.match(text, /^step: +1 min$/m);
    assert.match(text, /^format: +wide-csv$/m);
  });

  it('formats steps in the largest whole unit', () => {
    assert.deepEqual([250, 15_000, 90_000, 300_000, 3_600_000, 0].map(formatStep), ['250 ms', '15 s', '90 s', '5 min', '1 h', 'none (fewer than two distinct times)']);
  });

  it('exits 0 for a clean export, 1 for bad input, 2 for usage errors (real process)', function () {
    this.timeout(60_000);
    const tsx = join(ROOT, 'node_modules/tsx/dist/cli.mjs');
    const run = (...args: string[]) => spawnSync(process.execPath, [tsx, join(ROOT, 'extension/cli/main.ts'), ...args], { encoding: 'utf8' });
    const ok = run('inspect', join(FIXTURES, 'range-query-doc-example.json'), '--json');
    assert.equal(ok.status, 0, ok.stderr);
    assert.equal((JSON.parse(ok.stdout) as { seriesCount: number }).seriesCount, 2);
    assert.equal(run('inspect', join(FIXTURES, 'nope.csv')).status, 1);
    assert.equal(run('inspect').status, 2);
    assert.equal(run('frobnicate').status, 2);
    assert.match(run('--help').stdout, /inspect FILE \[--json\]/);
  });
});
