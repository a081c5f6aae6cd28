import assert from 'node:assert/strict';
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { sniffFormat } from '../../../extension/core/ingest';

const FIXTURES = join(__dirname, '../../fixtures/ingest');

describe('sniffFormat', () => {
  it('recognises every ingest fixture by content alone', () => {
    const expected: Record<string, string> = {
      'instant-query-doc-example.json': 'range-query-json',
      'range-query-doc-example.json': 'range-query-json',
      'otlp-example-shape.json': 'otlp-jsonl',
      'otlp-file-exporter.jsonl': 'otlp-jsonl',
      'line-protocol.lp': 'line-protocol',
      'wide.csv': 'wide-csv',
      'long.csv': 'long-csv',
      'semicolon-decimal-comma.csv': 'wide-csv',
      'text-exposition-doc-example.prom': 'text-exposition',
    };
    for (const name of readdirSync(FIXTURES)) {
      assert.equal(sniffFormat(readFileSync(join(FIXTURES, name), 'utf8')).format, expected[name], name);
    }
  });

  it('reads the real-world NAB CSV exports (timestamp,value) as wide CSV', () => {
    const dir = join(__dirname, '../../fixtures/nab-cloud/series');
    const first = readdirSync(dir)[0];
    assert.equal(sniffFormat(readFileSync(join(dir, first), 'utf8').slice(0, 4096), first).format, 'wide-csv');
  });

  it('uses the file extension only as a hint for empty or ambiguous content', () => {
    assert.equal(sniffFormat('', 'a.lp').format, 'line-protocol');
    assert.equal(sniffFormat('', 'a.jsonl').format, 'otlp-jsonl');
    assert.equal(sniffFormat('', 'a.csv').format, 'wide-csv');
    assert.equal(sniffFormat('time,cpu\n1,2\n', 'misnamed.lp').format, 'wide-csv');
    assert.equal(sniffFormat('one-word\n', 'odd.lp').format, 'line-protocol');
    assert.equal(sniffFormat('cpu,host=a usage=1 1700000000000000000\n', 'misnamed.csv').format, 'line-protocol');
  });
});
