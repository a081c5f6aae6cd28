import assert from 'node:assert/strict';
import fc from 'fast-check';
import { isFromWebview, isWindowRange } from '../../../extension/protocol';

describe('isFromWebview', () => {
  it('accepts each well-formed message', () => {
    assert.ok(isFromWebview({ type: 'ready' }));
    assert.ok(isFromWebview({ type: 'selectWindow', incident: { startMs: 10, endMs: 20 }, baseline: { startMs: 0, endMs: 9 } }));
    assert.ok(isFromWebview({ type: 'requestInsert', findingId: 'f-1' }));
    assert.ok(isFromWebview({ type: 'reportTiming', name: 'firstPaint', durationMs: 12.5 }));
  });

  it('rejects unknown types, missing fields, reversed windows and non-finite numbers', () => {
    for (const bad of [null, 1, 'ready', [], {}, { type: 'READY' }, { type: 'selectWindow' },
      { type: 'selectWindow', incident: { startMs: 20, endMs: 10 }, baseline: { startMs: 0, endMs: 9 } },
      { type: 'selectWindow', incident: { startMs: 0, endMs: Infinity }, baseline: { startMs: 0, endMs: 9 } },
      { type: 'requestInsert', findingId: '' }, { type: 'requestInsert', findingId: 7 },
      { type: 'reportTiming', name: 'x', durationMs: -1 }]) {
      assert.equal(isFromWebview(bad), false, JSON.stringify(bad));
    }
  });

  it('never throws on arbitrary JSON values (RFC 8259 values as postMessage delivers them)', () => {
    fc.assert(fc.property(fc.jsonValue(), (value) => { isFromWebview(value); }), { numRuns: 500 });
  });

  it('accepts a window exactly when both ends are finite and ordered', () => {
    fc.assert(fc.property(fc.double(), fc.double(), (a, b) => {
      const expected = Number.isFinite(a) && Number.isFinite(b) && a <= b;
      assert.equal(isWindowRange({ startMs: a, endMs: b }), expected);
    }));
  });
});
