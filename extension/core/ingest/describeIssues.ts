/**
 * What a reader could not read, in one sentence for a finding's caveats or an error message: how
 * many errors (rows or lines skipped) and warnings (cells read as gaps), then the first few as
 * file:line: message, errors first. Without it an export with skipped rows would be analysed as if
 * it were whole.
 */
import type { IngestIssue } from './types';

/** Control characters (a binary file read as text) shown as U+FFFD, newlines as spaces. */
function printable(text: string): string {
  return text.replace(/\r?\n/g, ' ').replace(/[\u0000-\u001f\u007f-\u009f]/g, '\ufffd');
}

const plural = (n: number, word: string): string => `${n} ${word}${n === 1 ? '' : 's'}`;

/**
 * undefined when there are no issues; otherwise e.g. "The export reader reported 1 error and 0
 * warnings (rows it could not read were skipped, cells it could not read were read as gaps):
 * a.csv:3: expected 2 fields, got 3; row skipped." Shows at most `shown` issues and says how many more.
 */
export function describeReaderIssues(issues: readonly IngestIssue[], shown = 3): string | undefined {
  if (issues.length === 0) return undefined;
  const errors = issues.filter((i) => i.severity === 'error');
  const warnings = issues.filter((i) => i.severity === 'warning');
  const byLine = (a: IngestIssue, b: IngestIssue): number => a.line - b.line;
  const first = [...errors.sort(byLine), ...warnings.sort(byLine)].slice(0, shown);
  const listed = first.map((i) => `${printable(i.file)}:${i.line}: ${printable(i.message)}`).join('; ');
  const more = issues.length > first.length ? ` (and ${issues.length - first.length} more)` : '';
  return `The export reader reported ${plural(errors.length, 'error')} and ${plural(warnings.length, 'warning')} `
    + `(rows it could not read were skipped, cells it could not read were read as gaps): ${listed}${more}.`;
}
