import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { formatRfc3339Utc, readExportText } from '../../../extension/core/ingest';
import { parseLinePoint, readFieldValue } from '../../../extension/core/ingest/lineProtocolReader';

const FIXTURES = join(__dirname, '../../fixtures/ingest');

describe('line protocol reader', () => {
  it('parses the documented line shape with escaped spaces and commas (docs.influxdata.com line protocol reference)', () => {
    // Escaping rules: spaces and commas escaped in measurement and tag values; from the line protocol reference.
    const point = parseLinePoint('disk\\ io,host=pantry\\,db,mount=/var\\ lib free=1i,label="a b, c" 1700000000000000000');
    assert.ok(typeof point !== 'string');
    assert.equal(point.measurement, 'disk io');
    assert.deepEqual(point.tags, { host: 'pantry,db', mount: '/var lib' });
    assert.deepEqual(point.fields, [['free', '1i'], ['label', '"a b, c"']]);
    assert.equal(point.timestamp, '1700000000000000000');
  });

  it('reads field types as the reference lists them: float default, i and u suffixes; strings and booleans are not numbers', () => {
    assert.equal(readFieldValue('82'), 82);
    assert.equal(readFieldValue('1e+78'), 1e78);
    assert.equal(readFieldValue('-3i'), -3);
    assert.equal(readFieldValue('3u'), 3);
    assert.equal(readFieldValue('-3u'), 'invalid');
    assert.equal(readFieldValue('"v1"'), undefined);
    for (const b of ['t', 'T', 'true', 'True', 'TRUE', 'f', 'F', 'false', 'False', 'FALSE']) assert.equal(readFieldValue(b), undefined, b);
  });

  it('makes one series per measurement + tag set + field, skipping comments and string/boolean fields with one warning each', () => {
    const result = readExportText(readFileSync(join(FIXTURES, 'line-protocol.lp'), 'utf8'), 'host.lp');
    assert.equal(result.format, 'line-protocol');
    assert.deepEqual(result.series.map((s) => s.id), [
      'cpu_usage_user{host="pantry-db-1",region="north"}',
      'cpu_usage_system{host="pantry-db-1",region="north"}',
      'cpu_cores{host="pantry-db-1",region="north"}',
      'disk io_read_bytes{host="pantry-db-1",mount="/var lib"}',
    ]);
    assert.deepEqual([...result.series[0].values], [12.5, 14, 90.5]);
    assert.equal(formatRfc3339Utc(result.series[0].timesMs[1]), '2023-11-14T22:14:20.000Z');
    assert.deepEqual(result.issues.map((i) => [i.line, i.severity]), [[4, 'warning'], [5, 'warning']]);
    assert.match(result.assumptions[0], /nanoseconds/);
  });

  it('infers seconds or milliseconds by magnitude and reports it', () => {
    const result = readExportText('m v=1 1700000000\nm v=2 1700000060\n', 's.lp', 'line-protocol');
    assert.equal(formatRfc3339Utc(result.series[0].timesMs[1]), '2023-11-14T22:14:20.000Z');
    assert.match(result.assumptions[0], /seconds/);
  });

  it('refuses a timestamp whose size says another unit than the first one, naming both units', () => {
    // 1700000000000000000 ns and 1700000060 s are the same minute a decade apart in size; read in
    // nanoseconds the second would fall on 1970-01-01 and stretch the export over 53 years.
    const result = readExportText('m v=1 1700000000000000000\nm v=2 1700000060\nm v=3 1700000120000000000\n', 'mixed.lp', 'line-protocol');
    assert.deepEqual(result.issues.map((i) => `${i.line} ${i.message}`), ['2 expected an epoch time in nanoseconds like the first one, not seconds by its size at the end of the line, got "1700000060"; line skipped']);
    assert.deepEqual(Array.from(result.series[0].timesMs, formatRfc3339Utc), ['2023-11-14T22:13:20.000Z', '2023-11-14T22:15:20.000Z']);
  });

  it('names the line and expectation for malformed lines and missing timestamps', () => {
    const result = readExportText('m v=1 1700000000\nm\nm v=1\nm v=abc 1700000060\n', 'bad.lp', 'line-protocol');
    const errors = result.issues.map((i) => `${i.file}:${i.line} ${i.message}`);
    assert.deepEqual(errors, [
      'bad.lp:2 expected "<measurement>[,<tags>] <field>=<value>[,…] [<timestamp>]", got no field set; line skipped',
      'bad.lp:3 expected an integer timestamp at the end of the line, got ""; line skipped',
      'bad.lp:4 expected a number for field "v", got "abc"',
    ]);
  });
});
