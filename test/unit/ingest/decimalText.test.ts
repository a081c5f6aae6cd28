import { strict as assert } from 'node:assert';
import { readDecimalText } from '../../../extension/core/ingest/decimalText';
import { readFieldValue } from '../../../extension/core/ingest/lineProtocolReader';
import { readPromValue } from '../../../extension/core/ingest/rangeQueryJsonReader';

describe('strict decimal text (range-query JSON, OTLP JSON, line protocol)', () => {
  it('reads decimal literals as Number() does', () => {
    for (const text of ['0', '-0', '82', '+1.5', '.5', '5.', '1e+78', '-3.25E-4', '1e308', '0017']) assert.equal(readDecimalText(text), Number(text), text);
  });

  it('refuses what Number() would also accept: radix literals, spaces, an empty string, overflow to Infinity', () => {
    // ECMA-262 StringToNumber reads "0x10" as 16, " 5 " as 5, "" as 0 and "1e999" as Infinity.
    for (const text of ['0x10', '0b11', '0o7', '-0x1', ' 5 ', '', '1e999', '-1e999', 'Infinity', '1_000', '1,5']) assert.equal(readDecimalText(text), undefined, text);
  });

  it('keeps the special values each format documents and refuses the rest', () => {
    // Prometheus HTTP API: sample values are strings, with "NaN", "+Inf" and "-Inf".
    assert.ok(Number.isNaN(readPromValue('NaN') as number));
    assert.equal(readPromValue('+Inf'), Infinity);
    assert.equal(readPromValue('0x10'), undefined);
    assert.equal(readPromValue('1e999'), undefined);
    // Line protocol fields: floats are decimal, integers end in i, unsigned in u.
    assert.equal(readFieldValue('0x10'), 'invalid');
    assert.equal(readFieldValue('1e999'), 'invalid');
    assert.equal(readFieldValue('-3i'), -3);
  });
});
