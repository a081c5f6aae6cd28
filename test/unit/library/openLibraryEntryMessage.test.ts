import assert from 'node:assert/strict';
import fc from 'fast-check';
import { isFromWebview, MAX_ENTRY_ID_LENGTH } from '../../../extension/protocol';

describe('openLibraryEntry message guard', () => {
  it('accepts an entry id as the library writes them', () => {
    assert.ok(isFromWebview({ type: 'openLibraryEntry', entryId: '20261202T014000Z-3f9a1c' }));
  });

  it('rejects a missing, empty, non-string or oversized id', () => {
    for (const bad of [{ type: 'openLibraryEntry' }, { type: 'openLibraryEntry', entryId: '' }, { type: 'openLibraryEntry', entryId: 42 },
      { type: 'openLibraryEntry', entryId: null }, { type: 'openLibraryEntry', entryId: ['a'] }, { type: 'openLibraryEntry', entryId: 'x'.repeat(MAX_ENTRY_ID_LENGTH + 1) }]) {
      assert.equal(isFromWebview(bad), false, JSON.stringify(bad).slice(0, 80));
    }
  });

  it('accepts exactly the non-empty strings up to the limit, never throwing on any JSON value (RFC 8259 values)', () => {
    fc.assert(fc.property(fc.jsonValue(), (entryId) => {
      const expected = typeof entryId === 'string' && entryId.length > 0 && entryId.length <= MAX_ENTRY_ID_LENGTH;
      assert.equal(isFromWebview({ type: 'openLibraryEntry', entryId }), expected);
    }), { numRuns: 500 });
  });
});
