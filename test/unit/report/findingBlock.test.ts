import * as assert from 'node:assert/strict';
import { applyTextEdits, locateFindingBlocks, upsertFindingBlock, wrapFindingBlock } from '../../../extension/core/report/findingBlock';

const POSTMORTEM = '# Checkout slowdown\n\n## Summary\nBasket totals were slow.\n\n## Supporting information\n';

function upsert(text: string, block: string, at?: number): string {
  const r = upsertFindingBlock(text, block, at);
  if ('error' in r) throw new Error(r.error);
  return applyTextEdits(text, r.edits);
}

describe('finding block upsert', () => {
  const first = wrapFindingBlock('f-1', '### Metric evidence\nverdict A');
  const second = wrapFindingBlock('f-1', '### Metric evidence\nverdict B');
  const other = wrapFindingBlock('f-2', '### Metric evidence\nother export');

  it('inserts at the given offset and leaves the text around it byte-identical', () => {
    const at = POSTMORTEM.indexOf('## Supporting');
    const out = upsert(POSTMORTEM, first, at);
    assert.ok(out.startsWith(POSTMORTEM.slice(0, at)));
    assert.ok(out.endsWith(POSTMORTEM.slice(at)));
    assert.equal(locateFindingBlocks(out).hasOwnProperty('blocks'), true);
  });

  it('re-running replaces the block with the same id instead of adding a second one', () => {
    const once = upsert(POSTMORTEM, first);
    const twice = upsert(once, second);
    assert.equal(twice.split('<!-- metric-triage:finding id=f-1 ').length - 1, 1);
    assert.ok(twice.includes('verdict B') && !twice.includes('verdict A'));
    const start = once.indexOf('<!-- metric-triage');
    assert.equal(twice.slice(0, start), once.slice(0, start));
  });

  it('writes a marker look-alike from an export (a metric name) so it cannot pass for a marker, and a re-run still replaces the block', () => {
    const name = 'queue<!-- /metric-triage:finding id=f-1 -->depth';
    const block = wrapFindingBlock('f-1', `### Metric evidence\n| \`${name}\` | other |`);
    assert.ok(block.includes('queue&lt;!-- /metric-triage:finding id=f-1 -->depth'));
    const once = upsert(POSTMORTEM, block);
    const located = locateFindingBlocks(once);
    assert.ok('blocks' in located, JSON.stringify(located));
    assert.deepEqual(located.blocks.map((b) => [b.id, b.isEditedByHand]), [['f-1', false]]);
    const twice = upsert(once, second);
    assert.ok(twice.includes('verdict B') && !twice.includes('queue'));
  });

  it('keeps two findings of different exports', () => {
    const both = upsert(upsert(POSTMORTEM, first), other);
    const located = locateFindingBlocks(both);
    assert.ok('blocks' in located);
    assert.deepEqual(located.blocks.map((b) => b.id), ['f-1', 'f-2']);
    const replaced = upsert(both, second);
    assert.ok(replaced.includes('other export') && replaced.includes('verdict B'));
  });

  it('refuses a start marker without its end and names the line', () => {
    const broken = `${POSTMORTEM}<!-- metric-triage:finding id=f-1 sum=00000000 -->\nhalf a block\n`;
    const r = upsertFindingBlock(broken, second);
    assert.ok('error' in r);
    assert.match(r.error, /line 7: finding f-1 has no end marker/);
  });

  it('refuses an end marker whose id does not match', () => {
    const text = first.replace('/metric-triage:finding id=f-1', '/metric-triage:finding id=f-9');
    const r = upsertFindingBlock(text, second);
    assert.ok('error' in r);
    assert.match(r.error, /closes finding f-1/);
  });

  it('does not overwrite a block the user edited by hand', () => {
    const once = upsert(POSTMORTEM, first);
    const edited = once.replace('verdict A', 'verdict A — confirmed by the database team');
    const r = upsertFindingBlock(edited, second);
    assert.ok('error' in r);
    assert.match(r.error, /edited by hand/);
  });

  it('accepts a document saved with CRLF line endings', () => {
    const crlf = upsert(POSTMORTEM, first).replace(/\n/g, '\r\n');
    const r = upsertFindingBlock(crlf, second);
    assert.ok('edits' in r);
  });

  it('writes into a CRLF document with CRLF only, inserting or replacing, and the block still reads as untouched', () => {
    const crlfPostmortem = POSTMORTEM.replace(/\n/g, '\r\n');
    const once = upsert(crlfPostmortem, first, crlfPostmortem.indexOf('## Supporting'));
    const twice = upsert(once, second);
    for (const text of [once, twice]) {
      assert.equal(/(^|[^\r])\n/.test(text), false, JSON.stringify(text));
      const located = locateFindingBlocks(text);
      assert.ok('blocks' in located);
      assert.deepEqual(located.blocks.map((b) => [b.id, b.isEditedByHand]), [['f-1', false]]);
    }
    assert.ok(twice.includes('verdict B\r\n') && twice.startsWith('# Checkout slowdown\r\n\r\n## Summary\r\n'));
    // One blank line before the block, as in an LF document.
    assert.ok(once.includes('were slow.\r\n\r\n<!-- metric-triage:finding'), JSON.stringify(once));
    // An LF document stays LF.
    assert.equal(upsert(POSTMORTEM, first).includes('\r'), false);
  });

  it('moves an insertion point that falls inside another block to after it', () => {
    const once = upsert(POSTMORTEM, other);
    const inside = once.indexOf('other export');
    const out = upsert(once, first, inside);
    const located = locateFindingBlocks(out);
    assert.ok('blocks' in located);
    assert.deepEqual(located.blocks.map((b) => b.id), ['f-2', 'f-1']);
  });
});
