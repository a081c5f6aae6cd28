import { CsvRowSplitter, detectDelimiter, findFieldBounds, splitPlainLine } from './csvRowSplitter';
import { parseDecimalRange } from './parseDecimalRange';
import { FirstLineBuffer, findFirstLine, type ExportReader } from './exportReader';
import { FloatColumn, IssueCollector, formatSeriesId, inferKindFromName } from './seriesAccumulator';
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
  readonly values: FloatColumn;
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
  readonly #firstLine = new FirstLineBuffer();
  readonly #times = new FloatColumn(1024);
  readonly #timeReader = new TimeCellReader();
  #splitter: CsvRowSplitter | undefined;
  #cells = new ValueCellReader(false);
  #columns: WideColumn[] | undefined;
  #timeIndex = 0;
  #expectedFields = 0;
  #delimiter = ',';
  /** Reused field boundaries of the current line (no allocation per row). */
  #bounds = new Int32Array(64);

  constructor(readonly file: string) {
    this.#issues = new IssueCollector(file);
  }

  push(chunk: string): void {
    if (this.#splitter !== undefined) { this.#splitter.push(chunk); return; }
    const text = this.#firstLine.push(chunk);
    if (text !== undefined) this.#start(text);
  }

  #start(text: string): void {
    const delimiter = detectDelimiter(findFirstLine(text, true) ?? '');
    this.#cells = new ValueCellReader(delimiter === ';');
    this.#delimiter = delimiter;
    this.#splitter = new CsvRowSplitter(delimiter, (fields, line) => this.#onRow(fields, line), (text, start, end, line) => this.#onPlainLine(text, start, end, line));
    this.#splitter.push(text);
  }

  finish(): IngestResult {
    if (this.#splitter === undefined) {
      const rest = this.#firstLine.flush();
      if (rest.trim() !== '') this.#start(rest);
    }
    this.#splitter?.finish();
    const lastLine = this.#splitter?.nextLine ?? 1;
    if (this.#columns === undefined) this.#issues.error(1, 'file is empty: expected a header line such as "time,<series>,..."');
    else if (this.#times.length === 0) this.#issues.warning(lastLine, 'no data rows after the header');
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
      this.#issues.error(line, `expected a timestamp (RFC 3339 or epoch number) in column ${this.#timeIndex + 1}, got "${clip(timeCell)}"; row skipped`);
      return;
    }
    if (count < this.#expectedFields) this.#issues.warning(line, `expected ${this.#expectedFields} fields, got ${count}; missing cells read as gaps`);
    this.#times.push(timeMs);
    for (const column of this.#columns) this.#readCell(column, column.index < count ? fields[column.index] : '', line);
  }

  /** Hot path for quote-free lines: fields found in place, numbers parsed from char codes. */
  #onPlainLine(text: string, start: number, end: number, line: number): void {
    const columns = this.#columns;
    if (columns === undefined) { this.#onRow(splitPlainLine(text, start, end, this.#delimiter), line); return; }
    if (this.#bounds.length < this.#expectedFields + 8) this.#bounds = new Int32Array(this.#expectedFields * 2 + 8);
    const bounds = this.#bounds;
    let count = findFieldBounds(text, start, end, this.#delimiter, bounds);
    if (count < 0) { this.#onRow(splitPlainLine(text, start, end, this.#delimiter), line); return; }
    while (count > this.#expectedFields && isBlankRange(text, bounds[count - 1], bounds[count] - 1)) count--;
    if (count !== this.#expectedFields) { this.#onRow(splitPlainLine(text, start, end, this.#delimiter), line); return; }
    const timeMs = this.#timeReader.readTimeMs(text.slice(bounds[this.#timeIndex], bounds[this.#timeIndex + 1] - 1));
    if (Number.isNaN(timeMs)) { this.#onRow(splitPlainLine(text, start, end, this.#delimiter), line); return; }
    this.#times.push(timeMs);
    const pointCode = this.#cells.isDecimalComma ? 44 : 46;
    for (let c = 0; c < columns.length; c++) {
      const column = columns[c];
      const fieldStart = bounds[column.index];
      const fieldEnd = bounds[column.index + 1] - 1;
      const value = parseDecimalRange(text, fieldStart, fieldEnd, pointCode);
      if (Number.isNaN(value)) this.#readCell(column, text.slice(fieldStart, fieldEnd), line);
      else column.values.push(value);
    }
  }

  #readCell(column: WideColumn, cell: string, line: number): void {
    const cells = this.#cells;
    const value = cells.read(cell);
    column.values.push(value);
    if (cells.status === CellStatus.Invalid) {
      this.#issues.warning(line, `expected a number in column "${column.name}", got "${clip(cell)}"; read as a gap`);
    } else if (cells.unit !== '') {
      if (column.unit === undefined) column.unit = cells.unit;
      else if (column.unit !== cells.unit && !column.hasMixedUnits) {
        column.hasMixedUnits = true;
        this.#issues.warning(line, `column "${column.name}" mixes units: "${column.unit}" and "${cells.unit}"`);
      }
    }
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
      this.#columns.push({ index, name: parsed.name, labels, unit: parsed.unit, hasMixedUnits: false, values: new FloatColumn(1024) });
    }
    if (this.#columns.length === 0) this.#issues.error(line, `expected a time column and at least one series column, got ${count} column(s)`);
    if (isHeaderless) {
      this.#issues.warning(line, 'expected a header line, got data; columns named column_2, column_3, …');
      this.#onRow(fields, line);
    }
  }

  #buildSeries(): RawSeries[] {
    if (this.#columns === undefined || this.#times.length === 0) return [];
    const timesMs = this.#times.toArray();
    return this.#columns.map((c) => ({
      id: formatSeriesId(c.name, c.labels),
      name: c.name,
      labels: c.labels,
      unit: c.unit,
      kind: inferKindFromName(c.name),
      timesMs,
      values: c.values.toArray(),
    }));
  }

  #describeAssumptions(): string[] {
    const out = this.#timeReader.describeAssumptions();
    if (this.#cells.isDecimalComma) out.push('";" delimiter: decimal commas read as decimal points');
    if (this.#cells.hasConvertedUnits) out.push('values written with units converted to base units (bytes, seconds)');
    return out;
  }
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
