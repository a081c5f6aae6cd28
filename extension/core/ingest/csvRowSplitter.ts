import Papa from 'papaparse';

/** Receives one parsed CSV record with the 1-based line it starts on. */
export type CsvRowHandler = (fields: readonly string[], line: number) => void;

/**
 * Receives one record of a quote-free batch as a range of `text` (no substring made), so
 * readers can scan fields and parse numbers in place. `end` excludes the line break and any CR.
 */
export type CsvPlainLineHandler = (text: string, start: number, end: number, line: number) => void;

/**
 * Streams CSV text into records: text chunks are cut at the last line break outside quotes, and
 * each run of complete lines is parsed by papaparse (RFC 4180 quoting, doubled quotes, quoted line
 * breaks). Only the unfinished tail of a chunk is kept, so memory stays near one chunk.
 */
export class CsvRowSplitter {
  #pending = '';
  #isInQuotes = false;
  #nextLine = 1;
  #isFirstChunk = true;
  #newline: '\n' | '\r\n' = '\n';

  /**
   * @param onPlainLine optional fast path: batches without any quote character skip papaparse and
   *   hand each non-blank line over as a text range (RFC 4180 quoting only matters with quotes).
   */
  constructor(readonly delimiter: string, readonly onRow: CsvRowHandler, readonly onPlainLine?: CsvPlainLineHandler) {}

  /** Feeds the next chunk of text (any size, may split a record anywhere). */
  push(chunk: string): void {
    if (this.#isFirstChunk) {
      if (chunk.charCodeAt(0) === 0xfeff) chunk = chunk.slice(1);
      if (chunk.length === 0) return;
      this.#isFirstChunk = false;
      this.#newline = chunk.includes('\r\n') ? '\r\n' : '\n';
    }
    const cut = this.#findCut(chunk);
    if (cut < 0) { this.#pending += chunk; return; }
    const complete = this.#pending + chunk.slice(0, cut);
    this.#pending = chunk.slice(cut);
    this.#parse(complete);
  }

  /** Parses whatever is left (a last record without a line break). */
  finish(): void {
    if (this.#pending.length > 0) this.#parse(this.#pending);
    this.#pending = '';
  }

  /** Line number the next record would start on (1-based). */
  get nextLine(): number {
    return this.#nextLine;
  }

  #scanPlain(text: string, onPlainLine: CsvPlainLineHandler): void {
    let line = this.#nextLine;
    let start = 0;
    while (start < text.length) {
      let nl = text.indexOf('\n', start);
      const isLast = nl === -1;
      if (isLast) nl = text.length;
      let end = nl;
      if (end > start && text.charCodeAt(end - 1) === 13) end--;
      if (!isBlank(text, start, end)) onPlainLine(text, start, end, line);
      line++;
      start = nl + 1;
    }
    this.#nextLine = line;
  }

  /** Index just after the last '\n' outside quotes in `chunk`, or -1; advances the quote state. */
  #findCut(chunk: string): number {
    if (!this.#isInQuotes && chunk.indexOf('"') === -1) {
      const nl = chunk.lastIndexOf('\n');
      return nl < 0 ? -1 : nl + 1;
    }
    let cut = -1;
    let isInQuotes = this.#isInQuotes;
    for (let i = 0; i < chunk.length; i++) {
      const c = chunk.charCodeAt(i);
      if (c === 34) isInQuotes = !isInQuotes;
      else if (c === 10 && !isInQuotes) cut = i + 1;
    }
    this.#isInQuotes = isInQuotes;
    return cut;
  }

  #parse(text: string): void {
    if (this.onPlainLine !== undefined && text.indexOf('"') === -1) { this.#scanPlain(text, this.onPlainLine); return; }
    const result = Papa.parse<string[]>(text, { delimiter: this.delimiter, newline: this.#newline, skipEmptyLines: false });
    const hasQuotes = text.indexOf('"') !== -1;
    let line = this.#nextLine;
    for (const row of result.data) {
      if (row.length > 1 || (row.length === 1 && row[0].trim() !== '')) this.onRow(row, line);
      line += 1 + (hasQuotes ? countNewlines(row) : 0);
    }
    this.#nextLine += countChar(text, 10);
    if (text.length > 0 && text.charCodeAt(text.length - 1) !== 10) this.#nextLine++;
  }
}

function isBlank(text: string, start: number, end: number): boolean {
  for (let i = start; i < end; i++) if (text.charCodeAt(i) > 32) return false;
  return true;
}

function countChar(text: string, code: number): number {
  let count = 0;
  const ch = String.fromCharCode(code);
  for (let i = text.indexOf(ch); i !== -1; i = text.indexOf(ch, i + 1)) count++;
  return count;
}

function countNewlines(row: readonly string[]): number {
  let count = 0;
  for (const field of row) if (field.indexOf('\n') !== -1) count += countChar(field, 10);
  return count;
}

/**
 * Delimiter of a CSV by its first line: the most frequent of `,` `;` tab outside quotes;
 * `,` when none occurs (a single-column file).
 */
export function detectDelimiter(firstLine: string): ',' | ';' | '\t' {
  const counts = { ',': 0, ';': 0, '\t': 0 };
  let isInQuotes = false;
  for (const c of firstLine) {
    if (c === '"') isInQuotes = !isInQuotes;
    else if (!isInQuotes && (c === ',' || c === ';' || c === '\t')) counts[c]++;
  }
  if (counts['\t'] > counts[','] && counts['\t'] >= counts[';']) return '\t';
  if (counts[';'] > counts[',']) return ';';
  return ',';
}

/**
 * Field boundaries of a quote-free line `text[start, end)`: writes the start of field i to
 * `bounds[i]` and `end + 1` after the last field, so field i spans `bounds[i] … bounds[i+1] - 1`.
 * Returns the field count, or -1 when `bounds` is too small (callers then split the slow way).
 */
export function findFieldBounds(text: string, start: number, end: number, delimiter: string, bounds: Int32Array): number {
  let count = 0;
  bounds[0] = start;
  let pos = start;
  for (;;) {
    const d = text.indexOf(delimiter, pos);
    if (d === -1 || d >= end) break;
    count++;
    if (count >= bounds.length - 1) return -1;
    bounds[count] = d + 1;
    pos = d + 1;
  }
  bounds[count + 1] = end + 1;
  return count + 1;
}

/** Fields of a quote-free line as strings (header and rare slow paths). */
export function splitPlainLine(text: string, start: number, end: number, delimiter: string): string[] {
  return text.slice(start, end).split(delimiter);
}
