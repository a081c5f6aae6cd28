import assert from 'node:assert/strict';
import fc from 'fast-check';
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
});
