import { findFieldBounds, splitPlainLine } from './csvRowSplitter';
import { parseDecimalRange } from './parseDecimalRange';
import type { ExportReader } from './exportReader';
import { CsvFeed } from './csvFeed';
import { IssueCollector, SeriesAccumulator, formatSeriesId, inferKindFromName } from './seriesAccumulator';
import { parseLabelSet, parseSeriesHeader } from './seriesNames';
import { TimeCellReader } from './timestamps';
import type { IngestResult, RawSeries } from './types';
import { CellStatus } from './valueCells';
import { TIME_COLUMN_NAMES, clip } from './wideCsvReader';

/** Column roles recognised in a long CSV header (case-insensitive). */
export const NAME_COLUMN_NAMES = new Set(['name', 'metric', '__name__', 'metric_name', 'measurement']);
/** Header names of a column holding `name{labels}` in one cell. */
export const SERIES_COLUMN_NAMES = new Set(['series', 'series_id', 'id']);
/** Header names of the value column. */
export const VALUE_COLUMN_NAMES = new Set(['value', 'val', 'sample', 'sample_value', '_value']);
/** Header names of a column with labels packed as `{k="v"}` or `k=v,k2=v2`. */
export const LABELS_COLUMN_NAMES = new Set(['labels', 'tags', 'attributes', 'dimensions']);
const UNIT_COLUMN_NAMES = new Set(['unit', 'units']);

interface LongLayout {
  readonly time: number;
  readonly value: number;
  readonly name: number;
  readonly series: number;
  readonly packedLabels: number;
  readonly unit: number;
  readonly labelColumns: ReadonlyArray<readonly [number, string]>;
  readonly fieldCount: number;
}

/** True when a header (already split) looks like a long/tidy layout: a value column plus a name, series or labels column. */
export function isLongCsvHeader(names: readonly string[]): boolean {
  const lower = names.map((n) => n.trim().toLowerCase());
  const hasValue = lower.some((n) => VALUE_COLUMN_NAMES.has(n));
  const hasIdentity = lower.some((n) => NAME_COLUMN_NAMES.has(n) || SERIES_COLUMN_NAMES.has(n) || LABELS_COLUMN_NAMES.has(n));
  return hasValue && hasIdentity;
}

/**
 * Reader for long (tidy) CSV: one row per sample, `time,name,<label columns…>,value`, or labels
 * packed in one column (`{host="a"}` / `host=a,cpu=0`), or a `series` column holding
 * `name{labels}`. Empty label cells mean "label absent". A `unit` column is honoured; a series
 * whose unit changes is flagged. Series are grouped by name plus the full label set.
 */
export function createLongCsvReader(file: string): ExportReader {
  return new LongCsvReader(file);
}

class LongCsvReader implements ExportReader {
  readonly #issues: IssueCollector;
  readonly #timeReader = new TimeCellReader();
  /** Raw cell text key → series (fast path); several keys may share one series. */
  readonly #series = new Map<string, SeriesAccumulator>();
  readonly #byId = new Map<string, SeriesAccumulator>();
  #bounds = new Int32Array(64);
  /** Raw identity text (the fields between time and value, as written) → series, for the hot path. */
  readonly #plainSeries = new Map<string, SeriesAccumulator>();
  readonly #feed = new CsvFeed((fields, line) => this.#onRow(fields, line), (text, start, end, line) => this.#onPlainLine(text, start, end, line));
  #layout: LongLayout | undefined;

  constructor(readonly file: string) {
    this.#issues = new IssueCollector(file);
  }

  push(chunk: string): void {
    this.#feed.push(chunk);
  }

  finish(): IngestResult {
    const lastLine = this.#feed.finish();
    if (this.#layout === undefined) this.#issues.error(1, 'file is empty: expected a header line such as "time,name,value"');
    else if (this.#byId.size === 0) this.#issues.warning(lastLine, 'no data rows after the header');
    const series: RawSeries[] = [];
    for (const acc of this.#byId.values()) {
      if (acc.hasMixedUnits) this.#issues.warning(lastLine, `series "${acc.name}" mixes units in its value column`);
      series.push(acc.toRawSeries());
    }
    const assumptions = this.#timeReader.describeAssumptions();
    if (this.#feed.cells.isDecimalComma) assumptions.push('";" delimiter: decimal commas read as decimal points');
    if (this.#feed.cells.hasConvertedUnits) assumptions.push('values written with units converted to base units (bytes, seconds)');
    return { file: this.file, format: 'long-csv', series, issues: this.#issues.finish(lastLine), assumptions };
  }

  #onRow(fields: readonly string[], line: number): void {
    const layout = this.#layout;
    if (layout === undefined) { this.#readHeader(fields, line); return; }
    if (layout.fieldCount < 0) return; // header already reported as unusable
    if (fields.length !== layout.fieldCount && !(fields.length > layout.fieldCount && fields.slice(layout.fieldCount).every((f) => f.trim() === ''))) {
      this.#issues.error(line, `expected ${layout.fieldCount} fields, got ${fields.length}; row skipped`);
      return;
    }
    const timeMs = this.#timeReader.readTimeMs(fields[layout.time]);
    if (Number.isNaN(timeMs)) {
      this.#issues.error(line, `expected ${this.#timeReader.epochProblem || 'a timestamp (RFC 3339 or epoch number)'} in column ${layout.time + 1}, got "${clip(fields[layout.time])}"; row skipped`);
      return;
    }
    const series = this.#findSeries(fields, layout, line);
    if (series === undefined) return;
    const value = this.#feed.cells.read(fields[layout.value]);
    if (this.#feed.cells.status === CellStatus.Invalid) {
      this.#issues.warning(line, `expected a number in column ${layout.value + 1}, got "${clip(fields[layout.value])}"; read as a gap`);
    }
    series.noteUnit(layout.unit >= 0 ? fields[layout.unit].trim() : this.#feed.cells.unit);
    series.add(timeMs, value);
  }

  /**
   * Hot path for quote-free lines laid out as time first and value last: the identity fields in
   * between are looked up as one substring and the value is parsed from char codes. Anything
   * else (other layouts, wrong widths, bad cells) goes through the general row path.
   */
  #onPlainLine(text: string, start: number, end: number, line: number): void {
    // No closures here: this runs once per row.
    const layout = this.#layout;
    if (layout === undefined || layout.time !== 0 || layout.value !== layout.fieldCount - 1 || layout.unit >= 0) { this.#onSlowLine(text, start, end, line); return; }
    if (this.#bounds.length < layout.fieldCount + 8) this.#bounds = new Int32Array(layout.fieldCount * 2 + 8);
    const bounds = this.#bounds;
    if (findFieldBounds(text, start, end, this.#feed.delimiter, bounds) !== layout.fieldCount) { this.#onSlowLine(text, start, end, line); return; }
    const valueStart = bounds[layout.value];
    const value = parseDecimalRange(text, valueStart, end, this.#feed.cells.isDecimalComma ? 44 : 46);
    if (Number.isNaN(value)) { this.#onSlowLine(text, start, end, line); return; }
    const timeMs = this.#timeReader.readTimeMs(text.slice(start, bounds[1] - 1));
    if (Number.isNaN(timeMs)) { this.#onSlowLine(text, start, end, line); return; }
    const key = text.slice(bounds[1], valueStart - 1);
    let series = this.#plainSeries.get(key);
    if (series === undefined) {
      series = this.#findSeries(splitPlainLine(text, start, end, this.#feed.delimiter), layout, line);
      if (series === undefined) return;
      this.#plainSeries.set(key, series);
    }
    series.add(timeMs, value);
  }

  #onSlowLine(text: string, start: number, end: number, line: number): void {
    this.#onRow(splitPlainLine(text, start, end, this.#feed.delimiter), line);
  }

  #findSeries(fields: readonly string[], layout: LongLayout, line: number): SeriesAccumulator | undefined {
    let key = layout.name >= 0 ? fields[layout.name] : '';
    if (layout.series >= 0) key += '\u0001' + fields[layout.series];
    if (layout.packedLabels >= 0) key += '\u0001' + fields[layout.packedLabels];
    for (const [index] of layout.labelColumns) key += '\u0001' + fields[index];
    const known = this.#series.get(key);
    if (known !== undefined) return known;
    const identity = this.#readIdentity(fields, layout);
    if (identity === undefined) {
      this.#issues.error(line, `expected a label set like {host="a"} or host=a in column ${layout.packedLabels + 1}, got "${clip(fields[layout.packedLabels])}"; row skipped`);
      return undefined;
    }
    if (identity.name === '') {
      this.#issues.error(line, 'expected a metric name, got an empty cell; row skipped');
      return undefined;
    }
    // Different spellings of one label set ({host="a"} vs host=a) must land in one series.
    const id = formatSeriesId(identity.name, identity.labels);
    let acc = this.#byId.get(id);
    if (acc === undefined) {
      acc = new SeriesAccumulator(identity.name, identity.labels, inferKindFromName(identity.name));
      this.#byId.set(id, acc);
    }
    this.#series.set(key, acc);
    return acc;
  }

  #readIdentity(fields: readonly string[], layout: LongLayout): { name: string; labels: Record<string, string> } | undefined {
    let name = layout.name >= 0 ? fields[layout.name].trim() : '';
    let labels: Record<string, string> = {};
    if (layout.series >= 0) {
      const parsed = parseSeriesHeader(fields[layout.series]);
      if (name === '') name = parsed.name;
      labels = { ...parsed.labels };
    }
    if (layout.packedLabels >= 0) {
      const packed = parseLabelSet(fields[layout.packedLabels]);
      if (packed === undefined) return undefined;
      if (name === '' && packed['__name__'] !== undefined) name = packed['__name__'];
      delete packed['__name__'];
      labels = { ...labels, ...packed };
    }
    for (const [index, label] of layout.labelColumns) {
      const value = fields[index].trim();
      if (value !== '') labels[label] = value;
    }
    return { name, labels };
  }

  #readHeader(fields: readonly string[], line: number): void {
    const lower = fields.map((f) => f.trim().toLowerCase());
    const find = (names: Set<string>): number => lower.findIndex((n) => names.has(n));
    const time = find(TIME_COLUMN_NAMES);
    const value = find(VALUE_COLUMN_NAMES);
    const roles = { time: time >= 0 ? time : 0, value, name: find(NAME_COLUMN_NAMES), series: find(SERIES_COLUMN_NAMES), packedLabels: find(LABELS_COLUMN_NAMES), unit: find(UNIT_COLUMN_NAMES) };
    if (value < 0) {
      this.#issues.error(line, `expected a value column (one of ${[...VALUE_COLUMN_NAMES].join(', ')}), got header "${clip(fields.join(','))}"`);
    }
    const used = new Set(Object.values(roles));
    const labelColumns: Array<readonly [number, string]> = [];
    fields.forEach((f, i) => { if (!used.has(i) && f.trim() !== '') labelColumns.push([i, f.trim()]); });
    this.#layout = { ...roles, value: value >= 0 ? value : fields.length, labelColumns, fieldCount: fields.length };
    if (value < 0) this.#layout = { ...this.#layout, fieldCount: -1 };
  }
}
