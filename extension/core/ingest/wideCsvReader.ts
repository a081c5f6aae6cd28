import { splitPlainLine } from './csvRowSplitter';
import { POWERS_OF_TEN } from './parseDecimalRange';
import type { ExportReader } from './exportReader';
import { CsvFeed } from './csvFeed';
import { IssueCollector, formatSeriesId, inferKindFromName } from './seriesAccumulator';
import { parseSeriesHeader } from './seriesNames';
import { TimeCellReader } from './timestamps';
import type { IngestResult, RawSeries } from './types';
import { CellStatus, ValueCellReader } from './valueCells';

/** Header names taken as the time column (case-insensitive); otherwise the first column is. */
export const TIME_COLUMN_NAMES = new Set(['time', 'timestamp', 'ts', 'date', 'datetime', 'date_time', '_time', 'time_utc', 'epoch', 't']);

interface WideColumn {
  readonly index: number;
  readonly name: string;
  readonly labels: Record<string, string>;
  unit: string | undefined;
  hasMixedUnits: boolean;
}

/**
 * Reader for wide CSV: one time column plus one column per series (delimiter `,` `;` or tab,
 * detected on the first line; BOM; RFC 4180 quoting; `name{label="v"}` headers; decimal comma with
 * `;`). All series share one time array, so memory is ~8 bytes per cell. Rows whose time cannot be
 * read are skipped with an error naming the line; unreadable cells become gaps with a warning.
 */
export function createWideCsvReader(file: string): ExportReader {
  return new WideCsvReader(file);
}

class WideCsvReader implements ExportReader {
  readonly #issues: IssueCollector;
  /** Accepted rows; every column holds exactly one value per row, so one counter serves all. */
  #rowCount = 0;
  #times: Float64Array = new Float64Array(1024);
  /** Column values, one Float64Array per series column (same order as #columns). */
  #data: Float64Array[] = [];
  readonly #timeReader = new TimeCellReader();
  readonly #feed = new CsvFeed((fields, line) => this.#onRow(fields, line), (text, start, end, line) => this.#onPlainLine(text, start, end, line));
  #columns: WideColumn[] | undefined;
  #timeIndex = 0;
  #expectedFields = 0;
  /** Field index of each series column, for the hot loop. */
  #fieldIndexes = new Int32Array(0);
  /** Reused field boundaries and fast-parsed values of the current line (no allocation per row). */
  #bounds = new Int32Array(64);
  #scratch = new Float64Array(64);

  constructor(readonly file: string) {
    this.#issues = new IssueCollector(file);
  }

  push(chunk: string): void {
    this.#feed.push(chunk);
  }

  finish(): IngestResult {
    const lastLine = this.#feed.finish();
    if (this.#columns === undefined) this.#issues.error(1, 'file is empty: expected a header line such as "time,<series>,..."');
    else if (this.#rowCount === 0) this.#issues.warning(lastLine, 'no data rows after the header');
    return {
      file: this.file,
      format: 'wide-csv',
      series: this.#buildSeries(),
      issues: this.#issues.finish(lastLine),
      assumptions: this.#describeAssumptions(),
    };
  }

  #onRow(fields: readonly string[], line: number): void {
    if (this.#columns === undefined) { this.#readHeader(fields, line); return; }
    let count = fields.length;
    while (count > this.#expectedFields && fields[count - 1].trim() === '') count--;
    if (count > this.#expectedFields) {
      this.#issues.error(line, `expected ${this.#expectedFields} fields, got ${count}; row skipped`);
      return;
    }
    const timeCell = fields[this.#timeIndex] ?? '';
    const timeMs = this.#timeReader.readTimeMs(timeCell);
    if (Number.isNaN(timeMs)) {
      this.#issues.error(line, `expected ${this.#timeReader.epochProblem || 'a timestamp (RFC 3339 or epoch number)'} in column ${this.#timeIndex + 1}, got "${clip(timeCell)}"; row skipped`);
      return;
    }
    if (count < this.#expectedFields) this.#issues.warning(line, `expected ${this.#expectedFields} fields, got ${count}; missing cells read as gaps`);
    const row = this.#appendRow(timeMs);
    const columns = this.#columns;
    for (let c = 0; c < columns.length; c++) {
      this.#data[c][row] = this.#readCell(columns[c], columns[c].index < count ? fields[columns[c].index] : '', line);
    }
  }

  /** Stores the time of a new row (growing every column together); returns the row index. */
  #appendRow(timeMs: number): number {
    if (this.#rowCount === this.#times.length) {
      const capacity = this.#times.length * 2;
      this.#times = grow(this.#times, capacity);
      for (let c = 0; c < this.#data.length; c++) this.#data[c] = grow(this.#data[c], capacity);
    }
    this.#times[this.#rowCount] = timeMs;
    return this.#rowCount++;
  }

  /**
   * Hot path for quote-free lines: one pass over the characters finds each field's end and parses
   * its number at the same time (exact fast path, see parseDecimalRange); fields that are not plain
   * decimals are re-read by the general cell reader. Lines of an unexpected width or with an
   * unreadable time take the general row path, which reports them.
   */
  #onPlainLine(text: string, start: number, end: number, line: number): void {
    const columns = this.#columns;
    if (columns === undefined) { this.#onRow(splitPlainLine(text, start, end, this.#feed.delimiter), line); return; }
    const expected = this.#expectedFields;
    if (this.#bounds.length < expected + 2) { this.#bounds = new Int32Array(expected * 2 + 8); this.#scratch = new Float64Array(expected * 2 + 8); }
    const bounds = this.#bounds;
    const scratch = this.#scratch;
    const delimiterCode = this.#feed.delimiter.charCodeAt(0);
    const pointCode = this.#feed.cells.isDecimalComma ? 44 : 46;
    let field = 0;
    let i = start;
    bounds[0] = start;
    for (;;) {
      if (field >= expected) { this.#onRow(splitPlainLine(text, start, end, this.#feed.delimiter), line); return; }
      // Inline exact decimal parse (≤ 15 significant digits, one division by an exact power of ten).
      let c = i < end ? text.charCodeAt(i) : -1;
      const isNegative = c === 45;
      if (c === 45 || c === 43) i++;
      const bodyStart = i;
      let mantissa = 0;
      let digits = 0;
      let fractionDigits = 0;
      let isInFraction = false;
      let isPlain = true;
      for (; i < end; i++) {
        c = text.charCodeAt(i);
        if (c === delimiterCode) break;
        if (c >= 48 && c <= 57) {
          if (digits > 0 || c !== 48) digits++;
          mantissa = mantissa * 10 + (c - 48);
          if (isInFraction) fractionDigits++;
        } else if (c === pointCode && !isInFraction) {
          isInFraction = true;
        } else {
          isPlain = false;
          const next = text.indexOf(this.#feed.delimiter, i);
          i = next === -1 || next > end ? end : next;
          break;
        }
      }
      const hasDigits = i - bodyStart > (isInFraction ? 1 : 0);
      if (isPlain && hasDigits && digits <= 15 && fractionDigits <= 22) {
        const magnitude = fractionDigits === 0 ? mantissa : mantissa / POWERS_OF_TEN[fractionDigits];
        scratch[field] = isNegative ? -magnitude : magnitude;
      } else {
        scratch[field] = NaN;
      }
      field++;
      bounds[field] = i + 1;
      if (i >= end) break;
      i++;
    }
    if (field !== expected) { this.#onRow(splitPlainLine(text, start, end, this.#feed.delimiter), line); return; }
    const timeMs = this.#timeReader.readTimeMs(text.slice(bounds[this.#timeIndex], bounds[this.#timeIndex + 1] - 1));
    if (Number.isNaN(timeMs)) { this.#onRow(splitPlainLine(text, start, end, this.#feed.delimiter), line); return; }
    const row = this.#appendRow(timeMs);
    const data = this.#data;
    const fieldIndexes = this.#fieldIndexes;
    for (let k = 0; k < fieldIndexes.length; k++) {
      const f = fieldIndexes[k];
      const value = scratch[f];
      data[k][row] = Number.isNaN(value) ? this.#readCell(columns[k], text.slice(bounds[f], bounds[f + 1] - 1), line) : value;
    }
  }

  /** Value of one cell through the general reader (units, markers, separators), noting problems. */
  #readCell(column: WideColumn, cell: string, line: number): number {
    const cells = this.#feed.cells;
    const value = cells.read(cell);
    if (cells.status === CellStatus.Invalid) {
      this.#issues.warning(line, `expected a number in column "${column.name}", got "${clip(cell)}"; read as a gap`);
    } else if (cells.unit !== '') {
      if (column.unit === undefined) column.unit = cells.unit;
      else if (column.unit !== cells.unit && !column.hasMixedUnits) {
        column.hasMixedUnits = true;
        this.#issues.warning(line, `column "${column.name}" mixes units: "${column.unit}" and "${cells.unit}"`);
      }
    }
    return value;
  }

  #readHeader(fields: readonly string[], line: number): void {
    // RFC 4180 makes the header optional: a first row of a time plus numbers is data, not names.
    const isHeaderless = fields.length > 1 && isDataRow(fields);
    const names = isHeaderless ? fields.map((_, i) => (i === 0 ? 'time' : `column_${i + 1}`)) : fields.map((f) => f.trim());
    const named = names.findIndex((n) => TIME_COLUMN_NAMES.has(n.toLowerCase()));
    this.#timeIndex = named >= 0 ? named : 0;
    let count = names.length;
    while (count > 1 && names[count - 1] === '') count--;
    this.#expectedFields = count;
    const seen = new Map<string, number>();
    this.#columns = [];
    for (let index = 0; index < count; index++) {
      if (index === this.#timeIndex) continue;
      const parsed = parseSeriesHeader(names[index] === '' ? `column_${index + 1}` : names[index]);
      const labels = { ...parsed.labels };
      const id = formatSeriesId(parsed.name, labels);
      const previous = seen.get(id);
      if (previous !== undefined) {
        labels['column'] = String(index + 1);
        this.#issues.warning(line, `duplicate column name "${names[index]}" (columns ${previous + 1} and ${index + 1}); told apart by a "column" label`);
      }
      seen.set(id, index);
      this.#columns.push({ index, name: parsed.name, labels, unit: parsed.unit, hasMixedUnits: false });
    }
    this.#fieldIndexes = Int32Array.from(this.#columns, (c) => c.index);
    this.#data = this.#columns.map(() => new Float64Array(this.#times.length));
    if (this.#columns.length === 0) this.#issues.error(line, `expected a time column and at least one series column, got ${count} column(s)`);
    if (isHeaderless) {
      this.#issues.warning(line, 'expected a header line, got data; columns named column_2, column_3, …');
      this.#onRow(fields, line);
    }
  }

  #buildSeries(): RawSeries[] {
    if (this.#columns === undefined || this.#rowCount === 0) return [];
    const rows = this.#rowCount;
    const timesMs = this.#times.slice(0, rows);
    this.#times = new Float64Array(0);
    return this.#columns.map((c, i) => {
      // Copy and release one column at a time so the peak is one extra column, not all of them.
      const values = this.#data[i].length === rows ? this.#data[i] : this.#data[i].slice(0, rows);
      this.#data[i] = new Float64Array(0);
      return { id: formatSeriesId(c.name, c.labels), name: c.name, labels: c.labels, unit: c.unit, kind: inferKindFromName(c.name), timesMs, values };
    });
  }

  #describeAssumptions(): string[] {
    const out = this.#timeReader.describeAssumptions();
    if (this.#feed.cells.isDecimalComma) out.push('";" delimiter: decimal commas read as decimal points');
    if (this.#feed.cells.hasConvertedUnits) out.push('values written with units converted to base units (bytes, seconds)');
    return out;
  }
}

function grow(data: Float64Array, capacity: number): Float64Array {
  const grown = new Float64Array(capacity);
  grown.set(data);
  return grown;
}

/** True when the first cell reads as a time and every other cell as a number or a gap. */
function isDataRow(fields: readonly string[]): boolean {
  if (Number.isNaN(new TimeCellReader().readTimeMs(fields[0]))) return false;
  const cells = new ValueCellReader(false);
  let numbers = 0;
  for (let i = 1; i < fields.length; i++) {
    cells.read(fields[i]);
    if (cells.status === CellStatus.Invalid) return false;
    if (cells.status === CellStatus.Ok) numbers++;
  }
  return numbers > 0;
}

function isBlankRange(text: string, start: number, end: number): boolean {
  for (let i = start; i < end; i++) if (text.charCodeAt(i) > 32) return false;
  return true;
}

/** Cell text shortened for messages. */
export function clip(text: string): string {
  return text.length > 40 ? `${text.slice(0, 40)}…` : text;
}
