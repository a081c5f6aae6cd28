import { strict as assert } from 'node:assert';
import { describeReaderIssues } from '../../../extension/core/ingest';

describe('describeReaderIssues', () => {
  it('says nothing when the reader reported nothing', () => {
    assert.equal(describeReaderIssues([]), undefined);
  });

  it('counts errors and warnings and lists errors first, each by file and line', () => {
    const text = describeReaderIssues([
      { severity: 'warning', file: 'a.csv', line: 2, message: 'expected a number, got "n/a"; read as a gap' },
      { severity: 'error', file: 'a.csv', line: 9, message: 'expected 2 fields, got 3; row skipped' },
      { severity: 'error', file: 'a.csv', line: 4, message: 'expected a timestamp, got "x"; row skipped' },
    ]);
    assert.equal(text, 'The export reader reported 2 errors and 1 warning (rows it could not read were skipped, cells it could not read were read as gaps): '
      + 'a.csv:4: expected a timestamp, got "x"; row skipped; a.csv:9: expected 2 fields, got 3; row skipped; a.csv:2: expected a number, got "n/a"; read as a gap.');
  });

  it('shows the first few and says how many more', () => {
    const issues = Array.from({ length: 7 }, (_, i) => ({ severity: 'error' as const, file: 'b.lp', line: i + 1, message: 'line skipped' }));
    const text = describeReaderIssues(issues, 2) ?? '';
    assert.ok(text.startsWith('The export reader reported 7 errors and 0 warnings'));
    assert.ok(text.endsWith('b.lp:1: line skipped; b.lp:2: line skipped (and 5 more).'), text);
  });

  it('shows control characters of a binary file as U+FFFD and keeps the sentence on one line', () => {
    const text = describeReaderIssues([{ severity: 'error', file: 'bin.csv', line: 2, message: 'got "\u0001\u0002\nA"; row skipped' }]) ?? '';
    assert.ok(text.includes('got "\ufffd\ufffd A"; row skipped'), text);
    assert.ok(!/[\u0000-\u001f]/.test(text));
  });
});
