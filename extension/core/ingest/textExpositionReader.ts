/**
 * Reader for the text exposition formats with timestamps (REFERENCE.md §1.4): the Prometheus text
 * format 0.0.4 (`name{labels} value timestamp`, timestamps in milliseconds) and OpenMetrics text
 * (the same lines, timestamps in seconds, ended by `# EOF`), and dumps of stored samples written as
 * `{__name__="…",labels…} value timestamp`. A file with history carries a timestamp on every sample.
 *
 * - `# TYPE` sets the kind: counters and the `_bucket`/`_count`/`_sum` series of histograms and
 *   summaries are cumulative; `_created` series (a counter's start time, not a metric) are skipped;
 *   `# UNIT` (OpenMetrics) sets the unit; `# HELP` and other comments are ignored.
 * - Values: decimals, `NaN`, `+Inf`, `-Inf`. NaN is shown as a gap (the formats allow it as a value).
 * - Timestamps: seconds when the file ends with `# EOF` (OpenMetrics requires seconds), otherwise
 *   milliseconds as the Prometheus format defines, unless every timestamp is below 1e11, which
 *   only seconds of a date after 1973 are (an OpenMetrics file that lost its `# EOF` line).
 */
import type { ExportReader } from './exportReader';
import { readDecimalText } from './decimalText';
import { LineSplitter } from './lineSplitter';
import { IssueCollector, SeriesAccumulator, formatSeriesId, inferKindFromName } from './seriesAccumulator';
import { parseLabelSet } from './seriesNames';
import type { IngestResult, SeriesKind } from './types';

/** One sample line split into its parts; an error message when it is not one. */
export interface ExpositionSample {
  readonly name: string;
  readonly labels: Record<string, string>;
  readonly value: string;
  readonly timestamp: string;
}

const METRIC_NAME = /^[A-Za-z_:][A-Za-z0-9_:]*/;

/** Index of the `}` closing the label set that opens at `open`, honouring quotes and escapes; -1 if none. */
function findLabelSetEnd(line: string, open: number): number {
  let isQuoted = false;
  for (let i = open + 1; i < line.length; i++) {
    const c = line[i];
    if (isQuoted) {
      if (c === '\\') i++;
      else if (c === '"') isQuoted = false;
    } else if (c === '"') {
      isQuoted = true;
    } else if (c === '}') {
      return i;
    }
  }
  return -1;
}

/** Parses `name{labels} value [timestamp] [# exemplar]` or `{__name__="name",…} value [timestamp]`. */
export function parseExpositionLine(line: string): ExpositionSample | string {
  const nameMatch = METRIC_NAME.exec(line);
  let name = nameMatch?.[0] ?? '';
  let at = name.length;
  let labels: Record<string, string> = {};
  if (line[at] === '{') {
    const end = findLabelSetEnd(line, at);
    if (end < 0) return 'expected a label set {name="value",…} closed by "}"';
    const parsed = parseLabelSet(line.slice(at, end + 1));
    if (parsed === undefined) return `expected labels as name="value", got ${line.slice(at, Math.min(end + 1, at + 40))}`;
    labels = parsed;
    at = end + 1;
  }
  if (name === '') {
    name = labels['__name__'] ?? '';
    if (name === '') return 'expected a metric name, or a label set holding __name__';
  }
  delete labels['__name__'];
  // An OpenMetrics exemplar (` # {…} value [timestamp]`) follows the sample; it is not part of it.
  const exemplarAt = line.indexOf(' # ', at);
  const rest = (exemplarAt >= 0 ? line.slice(at, exemplarAt) : line.slice(at)).trim().split(/[ \t]+/);
  if (rest.length < 1 || rest[0] === '') return 'expected a value after the metric name';
  if (rest.length > 2) return `expected "<value> [<timestamp>]" after the metric, got ${rest.length} fields`;
  return { name, labels, value: rest[0], timestamp: rest[1] ?? '' };
}

/** Sample values: decimals, NaN and ±Inf as both formats write them; undefined otherwise. */
export function readExpositionValue(text: string): number | undefined {
  if (text === 'NaN') return NaN;
  if (text === '+Inf' || text === 'Inf') return Infinity;
  if (text === '-Inf') return -Infinity;
  return readDecimalText(text);
}

/** Suffixes of the series a histogram or summary is written as. */
const CUMULATIVE_SUFFIXES = ['_bucket', '_count', '_sum'] as const;

/** Kind of a sample's series from the `# TYPE` lines seen; 'skip' for `_created` series. */
function kindOf(name: string, types: ReadonlyMap<string, string>): SeriesKind | 'skip' {
  const exact = types.get(name);
  if (exact !== undefined) return exact === 'counter' ? 'counter' : 'gauge';
  for (const suffix of ['_total', '_created', ...CUMULATIVE_SUFFIXES]) {
    if (!name.endsWith(suffix)) continue;
    const type = types.get(name.slice(0, -suffix.length));
    if (type === undefined) continue;
    if (suffix === '_created') return 'skip';
    if (suffix === '_total') return type === 'counter' ? 'counter' : 'gauge';
    return type === 'histogram' || type === 'summary' ? 'counter' : 'gauge';
  }
  return inferKindFromName(name);
}

export function createTextExpositionReader(file: string): ExportReader {
  const issues = new IssueCollector(file);
  const types = new Map<string, string>();
  const units = new Map<string, string>();
  const series = new Map<string, SeriesAccumulator>();
  let largestTimestamp = 0;
  let sampleCount = 0;
  let eofLine = 0;
  let skippedCreated = 0;
  const onLine = (text: string, line: number): void => {
    const trimmed = text.trim();
    if (trimmed === '') return;
    if (eofLine > 0) { issues.error(line, `expected nothing after "# EOF" (line ${eofLine}); line skipped`); return; }
    if (trimmed.startsWith('#')) {
      const meta = /^#\s+(TYPE|UNIT|HELP|EOF)\b\s*(\S*)\s*(.*)$/.exec(trimmed);
      if (meta?.[1] === 'EOF') eofLine = line;
      else if (meta?.[1] === 'TYPE') types.set(meta[2], meta[3].trim().toLowerCase());
      else if (meta?.[1] === 'UNIT' && meta[3].trim() !== '') units.set(meta[2], meta[3].trim());
      return;
    }
    const sample = parseExpositionLine(trimmed);
    if (typeof sample === 'string') { issues.error(line, `${sample}; line skipped`); return; }
    if (sample.timestamp === '') {
      issues.error(line, 'expected a timestamp after the value (a file with history carries one on every sample; a single scrape has none); line skipped');
      return;
    }
    const timestamp = readDecimalText(sample.timestamp);
    if (timestamp === undefined) { issues.error(line, `expected a Unix timestamp after the value, got "${sample.timestamp.slice(0, 40)}"; line skipped`); return; }
    const value = readExpositionValue(sample.value);
    if (value === undefined) { issues.error(line, `expected a number, NaN, +Inf or -Inf as the value of ${sample.name}, got "${sample.value.slice(0, 40)}"; line skipped`); return; }
    const kind = kindOf(sample.name, types);
    if (kind === 'skip') { skippedCreated++; return; }
    const id = formatSeriesId(sample.name, sample.labels);
    let acc = series.get(id);
    if (acc === undefined) {
      acc = new SeriesAccumulator(sample.name, sample.labels, kind);
      const unit = units.get(sample.name) ?? [...units].find(([base]) => sample.name.startsWith(`${base}_`))?.[1];
      if (unit !== undefined) acc.unit = unit;
      series.set(id, acc);
    }
    // Timestamps are kept as written until the unit is known (the `# EOF` line comes last).
    acc.add(timestamp, value);
    largestTimestamp = Math.max(largestTimestamp, Math.abs(timestamp));
    sampleCount++;
  };
  const splitter = new LineSplitter(onLine, (line) => issues.error(line, 'expected lines of at most 16 MiB, got a longer one; skipped'));
  return {
    push(chunk: string): void { splitter.push(chunk); },
    finish(): IngestResult {
      splitter.finish();
      if (sampleCount === 0 && issues.errorCount === 0) issues.error(1, 'file is empty: expected samples like "http_requests_total{code=\\"200\\"} 1027 1395066363000"');
      const isSeconds = eofLine > 0 || largestTimestamp < 1e11;
      const assumptions = [eofLine > 0
        ? 'OpenMetrics text (ends with # EOF): timestamps read as seconds, as its specification requires'
        : isSeconds
          ? 'timestamps read as seconds: all are below 1e11 (the Prometheus text format would mean milliseconds, before 1973); OpenMetrics writes seconds'
          : 'Prometheus text format: timestamps read as milliseconds, as the format defines'];
      if (skippedCreated > 0) assumptions.push(`${skippedCreated} samples of _created series (a counter's start time, not a metric) were skipped`);
      const raw = [...series.values()].map((s) => s.toRawSeries());
      if (isSeconds) for (const s of raw) for (let i = 0; i < s.timesMs.length; i++) s.timesMs[i] *= 1000;
      if (raw.some((s) => s.values.some(Number.isNaN))) assumptions.push('NaN sample values are shown as gaps; the file carried them as values');
      return { file, format: 'text-exposition', series: raw, issues: issues.finish(splitter.line), assumptions };
    },
  };
}
