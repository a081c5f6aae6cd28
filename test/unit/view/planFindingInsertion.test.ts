import assert from 'node:assert/strict';
import { applyTextEdits, planFindingInsertion } from '../../../extension/core/view/planFindingInsertion';

const BLOCK = '<!-- finding:f1 start -->\n### Metric evidence\n<!-- finding:f1 end -->\n';

describe('planFindingInsertion', () => {
  it('inserts at the start of the cursor line with blank lines around (CommonMark 0.31.2 §4.8: a blank line ends a paragraph)', () => {
    const text = '# Incident 42\nSummary line one.\nImpact line.\n';
    const cursor = text.indexOf('Impact') + 3;
    const result = applyTextEdits(text, planFindingInsertion(text, BLOCK, cursor, []));
    assert.equal(result, `# Incident 42\nSummary line one.\n\n${BLOCK}\nImpact line.\n`);
  });

  it('adds no extra blank lines where they already exist', () => {
    const text = '# Incident 42\n\n\n## Timeline\n';
    const cursor = text.indexOf('\n\n\n') + 2;
    const result = applyTextEdits(text, planFindingInsertion(text, BLOCK, cursor, []));
    assert.equal(result, `# Incident 42\n\n${BLOCK}\n## Timeline\n`);
  });

  it('keeps a replacement of an existing block as the only edit (re-run replaces, never duplicates)', () => {
    const text = `intro\n\n${BLOCK}\noutro\n`;
    const start = text.indexOf('<!--');
    const replace = [{ start, end: start + BLOCK.length, newText: BLOCK.replace('Metric evidence', 'Metric evidence v2') }];
    const edits = planFindingInsertion(text, BLOCK, 0, replace);
    assert.deepEqual(edits, replace);
    assert.equal(applyTextEdits(text, edits), `intro\n\n${BLOCK.replace('evidence', 'evidence v2')}\noutro\n`);
  });

  it('handles an empty document, a cursor past the end and a block without a final newline', () => {
    assert.equal(applyTextEdits('', planFindingInsertion('', 'x', 5, [])), 'x\n');
    assert.equal(applyTextEdits('abc', planFindingInsertion('abc', 'x', 99, [])), 'x\n\nabc');
    assert.equal(applyTextEdits('a\n', planFindingInsertion('a\n', 'x', 99, [])), 'a\n\nx\n');
  });

  it('rejects edits outside the text', () => {
    assert.throws(() => applyTextEdits('abc', [{ start: 2, end: 9, newText: '' }]), /expected an edit within 0\.\.3, got 2\.\.9/);
  });
});
