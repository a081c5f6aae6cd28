import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { createExportReader, readExportText } from '../../../extension/core/ingest';
import type { IngestResult, RawSeries } from '../../../extension/core/ingest/types';

const FIXTURES = join(__dirname, '../../fixtures/ingest');
const readFixture = (name: string): string => readFileSync(join(FIXTURES, name), 'utf8');
const byName = (result: IngestResult, name: string): RawSeries => {
  const found = result.series.find((s) => s.name === name);
  assert.ok(found, `series ${name} in ${result.series.map((s) => s.id).join(', ')}`);
  return found;
};
const errors = (result: IngestResult) => result.issues.filter((i) => i.severity === 'error');

describe('wide CSV reader', () => {
  describe('RFC 4180 §2 rules (https://datatracker.ietf.org/doc/html/rfc4180#section-2)', () => {
    it('rule 1–2: CRLF line breaks, last record without a line break', () => {
      const result = readExportText('time,aaa,bbb\r\n1700000000,1,2\r\n1700000060,3,4', 'r.csv', 'wide-csv');
      assert.deepEqual([...byName(result, 'aaa').values], [1, 3]);
      assert.deepEqual([...byName(result, 'bbb').values], [2, 4]);
      assert.deepEqual(errors(result), []);
    });
    it('rule 6: a quoted header field may contain commas, quotes and a line break', () => {
      // The RFC's example record: "aaa","b CRLF bb","ccc" — here as series names.
      const result = readExportText('time,"aaa","b\r\nbb","ccc"\r\n1700000000,1,2,3\r\n', 'r.csv', 'wide-csv');
      assert.deepEqual(result.series.map((s) => s.name), ['aaa', 'b\r\nbb', 'ccc']);
      assert.deepEqual([...byName(result, 'ccc').values], [3]);
    });
    it('rule 7: a doubled quote inside a quoted field is one quote ("b""bb" → b"bb)', () => {
      const result = readExportText('time,"aaa","b""bb","ccc"\n1700000000,1,2,3\n', 'r.csv', 'wide-csv');
      assert.deepEqual(result.series.map((s) => s.name), ['aaa', 'b"bb', 'ccc']);
    });
    it('counts lines through quoted line breaks when naming a bad row', () => {
      const result = readExportText('time,"a\nb",c\n1700000000,1,2\nnot-a-time,1,2\n', 'q.csv', 'wide-csv');
      assert.equal(errors(result)[0].line, 4);
      assert.match(errors(result)[0].message, /expected a timestamp .* got "not-a-time"/);
    });
  });

  it('reads labels from headers like cpu_usage{service="basket-api",host="b1"} and units from "(MB)"', () => {
    const result = readExportText(readFixture('wide.csv'), 'wide.csv');
    assert.equal(result.format, 'wide-csv');
    const cpu = byName(result, 'cpu_usage');
    assert.deepEqual(cpu.labels, { service: 'basket-api', host: 'b1' });
    assert.equal(cpu.id, 'cpu_usage{host="b1",service="basket-api"}');
    assert.ok(Number.isNaN(cpu.values[2]), 'NaN cell is a gap');
    const memory = byName(result, 'memory used');
    assert.equal(memory.unit, 'MB');
    assert.ok(Number.isNaN(memory.values[3]), 'empty cell is a gap, never zero');
    assert.equal(byName(result, 'requests_total').kind, 'counter');
    assert.equal(cpu.timesMs, memory.timesMs, 'columns share one time array');
  });

  it('reads ";" files with decimal commas, thousands dots, a BOM, CRLF and naive times', () => {
    const result = readExportText('\ufeff' + readFixture('semicolon-decimal-comma.csv'), 'eu.csv');
    assert.deepEqual([...byName(result, 'cpu').values], [1.5, 2.25]);
    assert.equal(byName(result, 'mem').values[0], 1234.5);
    assert.ok(Number.isNaN(byName(result, 'mem').values[1]), 'N/A is a gap');
    assert.match(result.assumptions.join('; '), /read as UTC/);
    assert.match(result.assumptions.join('; '), /decimal commas/);
  });

  it('reads tab-separated files', () => {
    const result = readExportText('time\tcpu\n2024-03-01T10:00:00Z\t1\n', 't.tsv');
    assert.deepEqual([...byName(result, 'cpu').values], [1]);
  });

  it('treats every common missing marker as a gap (REFERENCE.md §1.1 list)', () => {
    const markers = ['', 'NaN', 'nan', 'null', 'None', '-', 'N/A', 'undefined'];
    const rows = markers.map((m, i) => `${1700000000 + i * 60},"${m}"`).join('\n');
    const result = readExportText(`time,x\n${rows}\n`, 'm.csv', 'wide-csv');
    assert.ok([...byName(result, 'x').values].every(Number.isNaN));
    assert.deepEqual(result.issues, []);
  });

  it('reads thousands separators and units, converting mixed byte units to bytes', () => {
    const result = readExportText('time,a,b,c\n1700000000,"1,234",12.5%,1.2 GB\n1700000060,"12,345.5",13%,800 MB\n', 'u.csv', 'wide-csv');
    assert.deepEqual([...byName(result, 'a').values], [1234, 12345.5]);
    assert.deepEqual([...byName(result, 'b').values], [12.5, 13]);
    assert.equal(byName(result, 'b').unit, '%');
    assert.deepEqual([...byName(result, 'c').values], [1.2e9, 8e8]);
    assert.equal(byName(result, 'c').unit, 'By');
  });

  it('warns when one column mixes units it cannot convert', () => {
    const result = readExportText('time,a\n1700000000,5 req/s\n1700000060,6 ops/s\n', 'u.csv', 'wide-csv');
    assert.match(result.issues.map((i) => i.message).join(' '), /mixes units: "req\/s" and "ops\/s"/);
  });

  it('names file, line and expectation for unreadable cells and rows of the wrong width', () => {
    const result = readExportText('time,a,b\n1700000000,1,2\n1700000060,x,2\n1700000120,1,2,3\n', 'bad.csv', 'wide-csv');
    const messages = result.issues.map((i) => `${i.file}:${i.line} ${i.message}`);
    assert.ok(messages.includes('bad.csv:3 expected a number in column "a", got "x"; read as a gap'), messages.join('\n'));
    assert.ok(messages.includes('bad.csv:4 expected 3 fields, got 4; row skipped'), messages.join('\n'));
  });

  it('reads only decimal numbers: 0x/0b/0o literals and values beyond a double are gaps with a warning, "Infinity" stays', () => {
    // Number() would read "0x10" as 16 and "1e309" as Infinity (ECMA-262 StringToNumber); an
    // export writes decimals (RFC 4180 says nothing of numbers; this is common practice).
    const text = 'time,a\n1700000000,0x10\n1700000060,1e309\n1700000120,-0b1\n1700000180,Infinity\n1700000240,1e308\n';
    const result = readExportText(text, 'radix.csv', 'wide-csv');
    const values = Array.from(result.series[0].values);
    assert.deepEqual(values.slice(0, 3).map(Number.isNaN), [true, true, true]);
    assert.deepEqual(values.slice(3), [Infinity, 1e308]);
    const messages = result.issues.map((i) => `${i.line} ${i.message}`);
    assert.deepEqual(messages, [
      '2 expected a number in column "a", got "0x10"; read as a gap',
      '3 expected a number in column "a", got "1e309"; read as a gap',
      '4 expected a number in column "a", got "-0b1"; read as a gap',
    ]);
  });

  it('refuses an epoch cell in another unit than the first one (seconds, then milliseconds), wide and long', () => {
    const wide = readExportText('time,a\n1700000000,1\n1700000060000,2\n1700000120,3\n', 'w.csv', 'wide-csv');
    assert.deepEqual(wide.issues.map((i) => `${i.line} ${i.message}`), ['3 expected an epoch time in seconds like the first one, not milliseconds by its size in column 1, got "1700000060000"; row skipped']);
    assert.equal(wide.series[0].timesMs.length, 2);
    const long = readExportText('time,metric,value\n1700000000,a,1\n1700000060000,a,2\n1700000120,a,3\n', 'l.csv', 'long-csv');
    assert.deepEqual(long.issues.map((i) => `${i.line} ${i.message}`), ['3 expected an epoch time in seconds like the first one, not milliseconds by its size in column 1, got "1700000060000"; row skipped']);
  });

  it('ignores a trailing delimiter and tells duplicate column names apart', () => {
    const result = readExportText('time,a,a,\n1700000000,1,2,\n', 'd.csv', 'wide-csv');
    assert.deepEqual(result.series.map((s) => s.id), ['a', 'a{column="3"}']);
    assert.match(result.issues[0].message, /duplicate column name "a"/);
  });

  it('gives the same result whatever the chunk boundaries', () => {
    const text = readFixture('wide.csv');
    const whole = readExportText(text, 'wide.csv', 'wide-csv');
    for (const size of [1, 2, 7, 33]) {
      const reader = createExportReader('wide-csv', 'wide.csv');
      for (let i = 0; i < text.length; i += size) reader.push(text.slice(i, i + size));
      const chunked = reader.finish();
      assert.deepEqual(chunked.series.map((s) => [s.id, [...s.values]]), whole.series.map((s) => [s.id, [...s.values]]), `chunk size ${size}`);
    }
  });

  it('reads a file without a header line (RFC 4180 §2 rule 3: the header is optional) and says so', () => {
    const result = readExportText('2024-01-01T00:00:00Z,1,2\n2024-01-01T00:01:00Z,3,4\n', 'nohead.csv', 'wide-csv');
    assert.deepEqual(result.series.map((s) => s.name), ['column_2', 'column_3']);
    assert.deepEqual([...byName(result, 'column_2').values], [1, 3]);
    assert.match(result.issues[0].message, /expected a header line, got data/);
  });

  describe('edge cases', () => {
    it('empty file: an error saying a header was expected', () => {
      const result = readExportText('', 'empty.csv', 'wide-csv');
      assert.equal(result.series.length, 0);
      assert.match(errors(result)[0].message, /file is empty: expected a header line/);
      assert.equal(errors(result)[0].file, 'empty.csv');
    });
    it('header only: no series and a warning', () => {
      const result = readExportText('time,a,b\n', 'h.csv', 'wide-csv');
      assert.equal(result.series.length, 0);
      assert.match(result.issues[0].message, /no data rows/);
    });
    it('one row: one sample per series', () => {
      const result = readExportText('time,a\n2024-01-01T00:00:00Z,4\n', 'one.csv', 'wide-csv');
      assert.deepEqual([...byName(result, 'a').values], [4]);
    });
    it('all-NaN column: kept, every value a gap', () => {
      const result = readExportText('time,a,b\n1700000000,1,NaN\n1700000060,2,NaN\n', 'n.csv', 'wide-csv');
      assert.ok([...byName(result, 'b').values].every(Number.isNaN));
    });
    it('10,000 columns: every column becomes a series', () => {
      const count = 10_000;
      const header = ['time', ...Array.from({ length: count }, (_, i) => `m${i}`)].join(',');
      const row = (t: number) => [t, ...Array.from({ length: count }, (_, i) => i + t % 7)].join(',');
      const result = readExportText(`${header}\n${row(1700000000)}\n${row(1700000060)}\n`, 'wide10k.csv', 'wide-csv');
      assert.equal(result.series.length, count);
      assert.equal(result.series[9999].values[1], 9999 + 1700000060 % 7);
    });
  });
});

describe('long CSV reader', () => {
  it('groups rows by name plus the full label set; empty label cells mean "absent"', () => {
    const result = readExportText(readFixture('long.csv'), 'long.csv');
    assert.equal(result.format, 'long-csv');
    assert.deepEqual(result.series.map((s) => s.id), [
      'http_requests_total{host="b1",service="basket-api"}',
      'http_requests_total{host="b2",service="basket-api"}',
      'http_requests_total{service="basket-api"}',
    ]);
    assert.deepEqual([...result.series[0].values], [100, 160, 220]);
    assert.equal(result.series[0].kind, 'counter');
    assert.match(result.assumptions.join(' '), /milliseconds/);
  });

  it('reads labels packed in one column, with or without braces', () => {
    const text = 'time,name,labels,value\n2024-01-01T00:00:00Z,cpu,"{host=""a"",cpu=""0""}",1\n2024-01-01T00:01:00Z,cpu,"host=a,cpu=0",2\n';
    const result = readExportText(text, 'p.csv');
    assert.equal(result.series.length, 1);
    assert.deepEqual(result.series[0].labels, { host: 'a', cpu: '0' });
    assert.deepEqual([...result.series[0].values], [1, 2]);
  });

  it('reads a series column holding name{labels}', () => {
    const text = 'time,series,value\n2024-01-01T00:00:00Z,"latency_seconds{route=""/basket""}",0.2\n';
    const result = readExportText(text, 's.csv');
    assert.equal(result.series[0].name, 'latency_seconds');
    assert.deepEqual(result.series[0].labels, { route: '/basket' });
  });

  it('flags a series whose unit column changes (mixed units in one value column)', () => {
    const text = 'time,name,unit,value\n1700000000,latency,ms,200\n1700000060,latency,s,0.3\n';
    const result = readExportText(text, 'mu.csv');
    assert.match(result.issues.map((i) => i.message).join(' '), /mixes units/);
  });

  it('names the line and the expected label syntax for a malformed packed label cell', () => {
    const text = 'time,name,labels,value\n1700000000,cpu,"{host=""a""",1\n';
    const result = readExportText(text, 'bad.csv');
    assert.equal(errors(result)[0].line, 2);
    assert.match(errors(result)[0].message, /expected a label set like \{host="a"\}/);
  });
});
