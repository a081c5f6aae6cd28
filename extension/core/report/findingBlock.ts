/**
 * The markers that delimit a finding block in a postmortem. The start marker carries the finding
 * id and a checksum of the body as written, so a re-run can tell a block edited by hand (refuse to
 * replace it: nothing the user wrote may be lost) from the block it wrote itself.
 */
const START_RE = /<!--\s*metric-triage:finding\s+([^>]*?)\s*-->/g;
const END_RE = /<!--\s*\/metric-triage:finding\s+([^>]*?)\s*-->/g;
const ID_RE = /^[a-z0-9][a-z0-9-]{0,63}$/;

/** FNV-1a 32-bit over UTF-16 code units, hex; enough to notice an edit, not a security hash. */
export function hashText(text: string): string {
  let h = 0x811c9dc5;
  for (let i = 0; i < text.length; i++) {
    h ^= text.charCodeAt(i);
    h = Math.imul(h, 0x01000193) >>> 0;
  }
  return h.toString(16).padStart(8, '0');
}

/** Normalise line endings so a document saved with CRLF still matches its checksum. */
function canonicalBody(body: string): string {
  return body.replace(/\r\n/g, '\n').trim();
}

/**
 * Wrap a rendered body in markers: the returned string is the whole block, ending with '\n'.
 * Every "<!--" in the body (a metric name or a cell quoted from an export may hold one) is written
 * "&lt;!--", which markdown shows the same, so no text from an export can pass for a marker.
 */
export function wrapFindingBlock(id: string, body: string): string {
  if (!ID_RE.test(id)) throw new Error(`finding id must match ${ID_RE.source}, got "${id}"`);
  const clean = canonicalBody(body).replace(/<!--/g, '&lt;!--');
  return `<!-- metric-triage:finding id=${id} sum=${hashText(clean)} -->\n${clean}\n<!-- /metric-triage:finding id=${id} -->\n`;
}

interface Marker {
  readonly kind: 'start' | 'end';
  readonly id: string;
  readonly sum?: string;
  readonly start: number;
  readonly end: number;
  readonly line: number;
}

function lineAt(text: string, offset: number): number {
  let line = 1;
  for (let i = 0; i < offset; i++) if (text.charCodeAt(i) === 10) line++;
  return line;
}

function readAttributes(raw: string): Record<string, string> {
  const out: Record<string, string> = {};
  for (const part of raw.split(/\s+/)) {
    const eq = part.indexOf('=');
    if (eq > 0) out[part.slice(0, eq)] = part.slice(eq + 1);
  }
  return out;
}

function scanMarkers(text: string): Marker[] {
  const markers: Marker[] = [];
  for (const [re, kind] of [[START_RE, 'start'], [END_RE, 'end']] as const) {
    re.lastIndex = 0;
    for (let m = re.exec(text); m; m = re.exec(text)) {
      const attrs = readAttributes(m[1]);
      markers.push({ kind, id: attrs.id ?? '', sum: attrs.sum, start: m.index, end: m.index + m[0].length, line: lineAt(text, m.index) });
    }
  }
  return markers.sort((a, b) => a.start - b.start);
}

/** A finding block found in a document: offsets cover both markers. */
export interface LocatedBlock {
  readonly id: string;
  readonly start: number;
  readonly end: number;
  readonly isEditedByHand: boolean;
}

/**
 * All finding blocks of `text`, or an error naming the line of the first malformed marker:
 * a start without its end, an end without a start, nested blocks, a missing id, or two blocks
 * with the same id. Text without markers gives an empty list.
 */
export function locateFindingBlocks(text: string): { blocks: LocatedBlock[] } | { error: string } {
  const blocks: LocatedBlock[] = [];
  const seen = new Set<string>();
  let open: Marker | undefined;
  for (const marker of scanMarkers(text)) {
    if (!ID_RE.test(marker.id)) {
      return { error: `line ${marker.line}: finding marker without a valid id (expected id=<letters, digits, dashes>, got "${marker.id}")` };
    }
    if (marker.kind === 'start') {
      if (open) return { error: `line ${marker.line}: finding ${marker.id} starts inside finding ${open.id} (opened at line ${open.line}); expected its end marker first` };
      open = marker;
      continue;
    }
    if (!open) return { error: `line ${marker.line}: end marker of finding ${marker.id} without a start marker` };
    if (open.id !== marker.id) return { error: `line ${marker.line}: end marker of finding ${marker.id} closes finding ${open.id} (opened at line ${open.line})` };
    if (seen.has(marker.id)) return { error: `line ${open.line}: finding ${marker.id} appears twice; expected one block per id` };
    seen.add(marker.id);
    let bodyStart = open.end;
    if (text.startsWith('\r\n', bodyStart)) bodyStart += 2;
    else if (text[bodyStart] === '\n') bodyStart += 1;
    const body = canonicalBody(text.slice(bodyStart, marker.start));
    blocks.push({ id: marker.id, start: open.start, end: marker.end, isEditedByHand: open.sum !== hashText(body) });
    open = undefined;
  }
  if (open) return { error: `line ${open.line}: finding ${open.id} has no end marker (expected <!-- /metric-triage:finding id=${open.id} -->)` };
  return { blocks };
}

/** One text replacement: offsets into the original text, `end` exclusive. */
export interface TextEdit {
  readonly start: number;
  readonly end: number;
  readonly newText: string;
}

/**
 * Edits that put `block` (from wrapFindingBlock) into `text`: replace the block with the same id
 * if there is one, else insert at `insertAt` (default: end of text) on lines of its own. Text
 * outside the block is never touched. Returns an error instead of edits when the document's
 * markers are malformed or the existing block was edited by hand (its checksum no longer matches).
 */
export function upsertFindingBlock(text: string, block: string, insertAt?: number): { edits: TextEdit[] } | { error: string } {
  const own = locateFindingBlocks(block);
  if ('error' in own || own.blocks.length !== 1) return { error: 'the block to insert is not one well-formed finding block' };
  const id = own.blocks[0].id;
  const located = locateFindingBlocks(text);
  if ('error' in located) return { error: `cannot place finding ${id}: ${located.error}` };
  const existing = located.blocks.find((b) => b.id === id);
  // Written with the document's own line ending, so a CRLF postmortem does not end up mixed.
  const eol = detectLineEnding(text);
  const blockText = (block.endsWith('\n') ? block.slice(0, -1) : block).replace(/\r?\n/g, eol);
  if (existing) {
    if (existing.isEditedByHand) {
      return { error: `finding ${id} (line ${lineAt(text, existing.start)}) was edited by hand since it was written; not replacing it. Remove its markers to keep your text, or delete the block to regenerate it.` };
    }
    return { edits: [{ start: existing.start, end: existing.end, newText: blockText }] };
  }
  let at = insertAt === undefined ? text.length : Math.max(0, Math.min(text.length, insertAt));
  const inside = located.blocks.find((b) => at > b.start && at < b.end);
  if (inside) at = inside.end;
  const before = at === 0 || text[at - 1] === '\n' ? '' : eol;
  const needsBlankBefore = at > 0 && !text.slice(0, at).endsWith(eol + eol) ? (before === '' ? eol : eol + eol) : before;
  const after = at < text.length && text[at] !== '\n' && text[at] !== '\r' ? eol + eol : eol;
  return { edits: [{ start: at, end: at, newText: `${at === 0 ? '' : needsBlankBefore}${blockText}${after}` }] };
}

/** '\r\n' when the document's first line break is CRLF, else '\n' (also for a document without one). */
function detectLineEnding(text: string): string {
  const lf = text.indexOf('\n');
  return lf > 0 && text[lf - 1] === '\r' ? '\r\n' : '\n';
}

/** Apply edits (non-overlapping) to text; a helper for callers without an editor. */
export function applyTextEdits(text: string, edits: readonly TextEdit[]): string {
  let out = text;
  for (const e of [...edits].sort((a, b) => b.start - a.start)) out = out.slice(0, e.start) + e.newText + out.slice(e.end);
  return out;
}
