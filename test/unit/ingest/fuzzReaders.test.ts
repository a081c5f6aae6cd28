import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { buildFrame, FrameTooLargeError } from '../../../extension/core/frame';
import { createExportReader, sniffFormat } from '../../../extension/core/ingest';
import type { ExportFormat, IngestResult } from '../../../extension/core/ingest/types';

const FIXTURES = join(__dirname, '../../fixtures/ingest');
const RUNS_PER_FORMAT = 2000;
/** Bound on mutated input size, so a run cannot take long whatever the mutation. */
const MAX_CHARS = 8192;

type Mutation =
  | { kind: 'flip'; at: number; char: string }
  | { kind: 'truncate'; at: number }
  | { kind: 'duplicateLine'; line: number }
  | { kind: 'deleteLine'; line: number }
  | { kind: 'junk'; at: number; text: string };

const SPECIAL = ['"', ',', ';', '\t', '\n', '\r', '{', '}', '[', ']', ':', '=', '\\', ' ', '#', '-', '.', 'e', '9', '0', 'i', 'u', 'NaN', '\u0000', '\ufeff', 'é', '\ud83d'];
const mutationArb: fc.Arbitrary<Mutation> = fc.oneof(
  fc.record({ kind: fc.constant('flip' as const), at: fc.nat(), char: fc.oneof(fc.constantFrom(...SPECIAL), fc.string({ maxLength: 1 })) }),
  fc.record({ kind: fc.constant('truncate' as const), at: fc.nat() }),
  fc.record({ kind: fc.constant('duplicateLine' as const), line: fc.nat() }),
  fc.record({ kind: fc.constant('deleteLine' as const), line: fc.nat() }),
  fc.record({ kind: fc.constant('junk' as const), at: fc.nat(), text: fc.oneof(fc.string({ maxLength: 40 }), fc.stringMatching(/^[0-9.,;"{}=:\[\] eE+-]{1,30}$/)) }),
);

function applyMutation(text: string, m: Mutation): string {
  const lines = text.split('\n');
  switch (m.kind) {
    case 'flip': { const at = m.at % Math.max(1, text.length); return text.slice(0, at) + m.char + text.slice(at + 1); }
    case 'truncate': return text.slice(0, m.at % (text.length + 1));
    case 'duplicateLine': { const i = m.line % lines.length; lines.splice(i, 0, lines[i]); return lines.join('\n'); }
    case 'deleteLine': lines.splice(m.line % lines.length, 1); return lines.join('\n');
    case 'junk': { const at = m.at % (text.length + 1); return text.slice(0, at) + m.text + text.slice(at); }
  }
}

function readInChunks(format: ExportFormat, text: string, chunkSize: number): IngestResult {
  const reader = createExportReader(format, 'mutated.export');
  for (let i = 0; i < text.length; i += chunkSize) reader.push(text.slice(i, i + chunkSize));
  return reader.finish();
}

/** What every result must satisfy, however bad the input. */
function checkResult(result: IngestResult): void {
  for (const issue of result.issues) {
    assert.equal(issue.file, 'mutated.export');
    assert.ok(Number.isInteger(issue.line) && issue.line >= 1, `line ${issue.line}`);
    assert.ok(!issue.message.includes('internal error'), issue.message);
    if (issue.severity === 'error' && !/ more errors like the above/.test(issue.message)) {
      assert.match(issue.message, /expected|failed on the server/, issue.message);
    }
  }
  for (const s of result.series) {
    assert.ok(s.id.length > 0 && s.name.length > 0, 'series has an id and a name');
    assert.equal(s.timesMs.length, s.values.length);
    for (const t of s.timesMs) assert.ok(Number.isFinite(t), `finite time, got ${t}`);
  }
  try {
    const frame = buildFrame(result, { maxGridPoints: 10_000, maxCells: 1_000_000 });
    for (const s of frame.series) assert.equal(s.values.length, frame.timesMs.length);
  } catch (err) {
    if (!(err instanceof FrameTooLargeError)) throw err;
  }
}

const CASES: ReadonlyArray<readonly [ExportFormat, readonly string[]]> = [
  ['wide-csv', ['wide.csv', 'semicolon-decimal-comma.csv']],
  ['long-csv', ['long.csv']],
  ['range-query-json', ['range-query-doc-example.json', 'instant-query-doc-example.json']],
  ['otlp-jsonl', ['otlp-file-exporter.jsonl', 'otlp-example-shape.json']],
  ['line-protocol', ['line-protocol.lp']],
  ['text-exposition', ['text-exposition-doc-example.prom']],
];

describe('readers on mutated exports (fast-check fuzz)', () => {
  for (const [format, files] of CASES) {
    it(`${format}: ${RUNS_PER_FORMAT} mutated exports each give a result or issues naming file, line and expectation`, () => {
      const sources = files.map((f) => readFileSync(join(FIXTURES, f), 'utf8'));
      fc.assert(
        fc.property(fc.nat(sources.length - 1), fc.array(mutationArb, { minLength: 1, maxLength: 6 }), fc.integer({ min: 1, max: 97 }), (which, mutations, chunkSize) => {
          const text = mutations.reduce(applyMutation, sources[which]).slice(0, MAX_CHARS);
          checkResult(readInChunks(format, text, chunkSize));
          checkResult(readInChunks(sniffFormat(text, 'mutated.export').format, text, 4096));
        }),
        { numRuns: RUNS_PER_FORMAT, seed: 20_240_301 },
      );
    });
  }

  it('random junk of any kind never makes a reader throw', () => {
    fc.assert(
      fc.property(fc.string({ maxLength: 2000, unit: 'binary' }), fc.constantFrom<ExportFormat>('wide-csv', 'long-csv', 'range-query-json', 'otlp-jsonl', 'line-protocol', 'text-exposition'), (text, format) => {
        checkResult(readInChunks(format, text, 64));
      }),
      { numRuns: 2000, seed: 7 },
    );
  });
});
