import assert from 'node:assert/strict';
import fc from 'fast-check';
import { readExportText } from '../../../extension/core/ingest';
import { parseDecimalRange } from '../../../extension/core/ingest/parseDecimalRange';

describe('parseDecimalRange (fast number path)', () => {
  it('agrees exactly with Number() (ECMA-262 StringToNumber) on decimals of up to 15 significant digits', () => {
    fc.assert(fc.property(fc.integer({ min: -999_999_999_999_999, max: 999_999_999_999_999 }), fc.integer({ min: 0, max: 15 }), (mantissa, scale) => {
      const text = scale === 0 ? String(mantissa) : (mantissa / 10 ** scale).toFixed(scale);
      if (text.replace(/[-.]/g, '').replace(/^0+/, '').length > 15) return;
      const padded = `x,${text},y`;
      assert.equal(parseDecimalRange(padded, 2, 2 + text.length), Number(text), text);
    }), { numRuns: 5000, seed: 3 });
  });

  it('reads decimal commas when asked and leaves everything else to the slow path (NaN)', () => {
    assert.equal(parseDecimalRange('1,5', 0, 3, 44), 1.5);
    for (const text of ['', '-', '.', '1e3', ' 1', '1 ', '12%', '1.2.3', 'NaN', '1234567890123456', '0x10']) {
      assert.ok(Number.isNaN(parseDecimalRange(text, 0, text.length)), JSON.stringify(text));
    }
    assert.equal(parseDecimalRange('+7.25', 0, 5), 7.25);
    assert.equal(parseDecimalRange('-0.5', 0, 4), -0.5);
    assert.equal(parseDecimalRange('.5', 0, 2), 0.5);
    assert.equal(parseDecimalRange('5.', 0, 2), 5);
  });

  it('wide CSV cells read through the in-place line path equal Number() of the cell text', () => {
    const cell = fc.oneof(
      fc.double({ noNaN: true, noDefaultInfinity: true }).map(String),
      fc.integer().map(String),
      fc.tuple(fc.integer({ min: -99999, max: 99999 }), fc.nat(999999)).map(([a, b]) => `${a}.${b}`),
      fc.constantFrom('-0', '+5', '.5', '5.', '007', '1e3', '12%', 'NaN', ''),
    );
    fc.assert(fc.property(fc.array(fc.array(cell, { minLength: 3, maxLength: 3 }), { minLength: 1, maxLength: 20 }), (rows) => {
      const text = 'time,a,b,c\n' + rows.map((r, i) => `${1700000000 + i * 60},${r.join(',')}`).join('\n') + '\n';
      const result = readExportText(text, 'p.csv', 'wide-csv');
      rows.forEach((r, i) => r.forEach((c, k) => {
        const expected = c === '' || c === 'NaN' ? NaN : c === '12%' ? 12 : Number(c);
        const actual = result.series[k].values[i];
        assert.ok(Object.is(actual, expected) || (actual === 0 && expected === 0), `cell ${JSON.stringify(c)}: expected ${expected}, got ${actual}`);
      }));
    }), { numRuns: 1000, seed: 11 });
  });
});
