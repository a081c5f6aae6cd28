/** A replacement of text[start, end) by newText; offsets are UTF-16 code units into the old text. */
export interface TextEdit {
  readonly start: number;
  readonly end: number;
  readonly newText: string;
}

/**
 * Where a finding block goes in a postmortem. When the block's own upsert already replaces an
 * existing block (an edit with start < end), that replacement is kept as is: re-running
 * replaces, never duplicates. Otherwise the block is inserted at the start of the line holding
 * the cursor, separated from neighbouring text by one blank line on each side so markdown does
 * not merge it into a paragraph. Offsets outside the text are clamped; an empty text gets the
 * block alone. Returns one edit (one undo step in the editor).
 */
export function planFindingInsertion(
  text: string,
  block: string,
  cursorOffset: number,
  upsertEdits: readonly TextEdit[],
): TextEdit[] {
  if (upsertEdits.some((edit) => edit.start < edit.end)) return [...upsertEdits];
  const cursor = Math.min(Math.max(0, Math.floor(Number.isFinite(cursorOffset) ? cursorOffset : 0)), text.length);
  const lineStart = cursor === 0 ? 0 : text.lastIndexOf('\n', cursor - 1) + 1;
  const body = block.endsWith('\n') ? block : `${block}\n`;
  const before = text.slice(0, lineStart);
  const after = text.slice(lineStart);
  const leading = before.length === 0 || before.endsWith('\n\n') ? '' : before.endsWith('\n') ? '\n' : '\n\n';
  const trailing = after.length === 0 || after.startsWith('\n') ? '' : '\n';
  return [{ start: lineStart, end: lineStart, newText: `${leading}${body}${trailing}` }];
}

/** Applies edits (sorted or not, non-overlapping) to text; used by tests and previews. */
export function applyTextEdits(text: string, edits: readonly TextEdit[]): string {
  const sorted = [...edits].sort((a, b) => b.start - a.start);
  let result = text;
  for (const edit of sorted) {
    if (edit.start < 0 || edit.end > result.length || edit.start > edit.end) {
      throw new Error(`expected an edit within 0..${result.length}, got ${edit.start}..${edit.end}`);
    }
    result = result.slice(0, edit.start) + edit.newText + result.slice(edit.end);
  }
  return result;
}
