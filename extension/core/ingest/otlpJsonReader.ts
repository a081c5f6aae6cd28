import type { ExportReader } from './exportReader';
import { JsonValueSplitter } from './jsonValueSplitter';
import { IssueCollector, SeriesAccumulator, formatSeriesId } from './seriesAccumulator';
import { convertNanosStringToMs } from './timestamps';
import type { IngestResult, SeriesKind } from './types';
import { lineOfJsonError, previewJson } from './rangeQueryJsonReader';
import { readDecimalText } from './decimalText';

type JsonObject = Record<string, unknown>;

function isObject(value: unknown): value is JsonObject {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

function asArray(value: unknown): readonly unknown[] {
  return Array.isArray(value) ? value : [];
}

/**
 * 64-bit fields that proto3 JSON may write as bare numbers (the opentelemetry-proto example does,
 * for timeUnixNano): quoted before JSON.parse so 19-digit nanoseconds are not rounded to a double.
 */
const INT64_FIELDS = /"(timeUnixNano|startTimeUnixNano|asInt|count)"(\s*):(\s*)(-?\d+)(?=\s*[,}\]])/g;

/** Quotes bare int64 fields so they survive JSON.parse exactly (exported for tests). */
export function quoteInt64Fields(text: string): string {
  return text.replace(INT64_FIELDS, '"$1"$2:$3"$4"');
}

/** OTLP `aggregationTemporality` enum values (metrics.proto). */
const TEMPORALITY_DELTA = 1;
const TEMPORALITY_CUMULATIVE = 2;
/** DATA_POINT_FLAGS_NO_RECORDED_VALUE_MASK (metrics.proto): bit 0 = no recorded value → gap. */
const FLAG_NO_RECORDED_VALUE = 1;

/**
 * Reader for OTLP JSON as the OpenTelemetry file exporter writes it: JSON Lines of `MetricsData`
 * (a pretty-printed document like opentelemetry-proto's examples/metrics.json is read too).
 * gauge → gauge; monotonic sum → counter (cumulative) or delta; non-monotonic sum → gauge;
 * histogram / exponentialHistogram / summary → `<name>_count` and `<name>_sum` series.
 * `timeUnixNano` may be a number or a string and is read exactly. Flag bit 0 gives a gap.
 * Series identity = resource attributes + scope name + metric name + data-point attributes.
 * Issue `line` is the line where the offending JSON value starts.
 */
export function createOtlpJsonReader(file: string): ExportReader {
  const issues = new IssueCollector(file);
  const series = new Map<string, SeriesAccumulator>();
  let valueCount = 0;
  const splitter = new JsonValueSplitter(
    (text, line) => { valueCount++; readMetricsData(text, line, series, issues); },
    (junk, line) => issues.error(line, `expected a JSON object per line ({"resourceMetrics":[…]}), got "${junk.slice(0, 40)}"`),
  );
  return {
    push(chunk: string): void { splitter.push(chunk); },
    finish(): IngestResult {
      splitter.finish();
      if (valueCount === 0 && issues.errorCount === 0) issues.error(1, 'file is empty: expected JSON lines of {"resourceMetrics":[…]}');
      return {
        file,
        format: 'otlp-jsonl',
        series: [...series.values()].map((s) => s.toRawSeries()),
        issues: issues.finish(splitter.line),
        assumptions: ['OTLP times read from timeUnixNano (nanoseconds, exact)'],
      };
    },
  };
}

function readMetricsData(text: string, line: number, series: Map<string, SeriesAccumulator>, issues: IssueCollector): void {
  let doc: unknown;
  try {
    doc = JSON.parse(quoteInt64Fields(text));
  } catch (err) {
    issues.error(line + lineOfJsonError(text, err) - 1, `expected valid JSON, got a syntax error: ${(err as Error).message}`);
    return;
  }
  if (!isObject(doc) || !Array.isArray(doc['resourceMetrics'])) {
    issues.error(line, 'expected an object with a "resourceMetrics" array (OTLP MetricsData)');
    return;
  }
  for (const rm of doc['resourceMetrics']) {
    if (!isObject(rm)) { issues.error(line, 'expected each resourceMetrics entry to be an object'); continue; }
    const resourceLabels = readAttributes(isObject(rm['resource']) ? rm['resource']['attributes'] : undefined);
    for (const sm of asArray(rm['scopeMetrics'])) {
      if (!isObject(sm)) { issues.error(line, 'expected each scopeMetrics entry to be an object; skipped'); continue; }
      const scopeName = isObject(sm['scope']) && typeof sm['scope']['name'] === 'string' ? sm['scope']['name'] : '';
      const baseLabels = scopeName === '' ? resourceLabels : { ...resourceLabels, otel_scope_name: scopeName };
      for (const metric of asArray(sm['metrics'])) readMetric(metric, baseLabels, line, series, issues);
    }
  }
}

function readMetric(metric: unknown, baseLabels: Record<string, string>, line: number, series: Map<string, SeriesAccumulator>, issues: IssueCollector): void {
  if (!isObject(metric) || typeof metric['name'] !== 'string' || metric['name'] === '') {
    issues.error(line, 'expected each metric to have a non-empty "name"');
    return;
  }
  const name = metric['name'];
  const unit = typeof metric['unit'] === 'string' && metric['unit'] !== '' ? metric['unit'] : undefined;
  const sink: PointSink = { series, baseLabels, unit, issues, line };
  if (isObject(metric['gauge'])) {
    readNumberPoints(sink, name, 'gauge', metric['gauge']['dataPoints']);
  } else if (isObject(metric['sum'])) {
    const sum = metric['sum'];
    const temporality = Number(sum['aggregationTemporality'] ?? 0);
    const kind: SeriesKind = sum['isMonotonic'] !== true ? 'gauge' : temporality === TEMPORALITY_DELTA ? 'delta' : 'counter';
    if (sum['isMonotonic'] === true && temporality !== TEMPORALITY_CUMULATIVE && temporality !== TEMPORALITY_DELTA) {
      issues.warning(line, `sum "${name}" has aggregationTemporality ${String(sum['aggregationTemporality'])}; expected 1 (delta) or 2 (cumulative), read as cumulative`);
    }
    readNumberPoints(sink, name, kind, sum['dataPoints']);
  } else {
    const histogramKey = ['histogram', 'exponentialHistogram', 'summary'].find((k) => isObject(metric[k]));
    if (histogramKey === undefined) { issues.warning(line, `metric "${name}" has no gauge, sum, histogram or summary; skipped`); return; }
    const histogram = metric[histogramKey] as JsonObject;
    const temporality = Number(histogram['aggregationTemporality'] ?? TEMPORALITY_CUMULATIVE);
    const kind: SeriesKind = temporality === TEMPORALITY_DELTA ? 'delta' : 'counter';
    readSummaryPoints(sink, name, kind, histogram['dataPoints']);
  }
}

interface PointSink {
  readonly series: Map<string, SeriesAccumulator>;
  readonly baseLabels: Record<string, string>;
  readonly unit: string | undefined;
  readonly issues: IssueCollector;
  readonly line: number;
}

function seriesFor(sink: PointSink, name: string, kind: SeriesKind, point: JsonObject, unit: string | undefined): SeriesAccumulator {
  const labels = { ...sink.baseLabels, ...readAttributes(point['attributes']) };
  const id = formatSeriesId(name, labels);
  let acc = sink.series.get(id);
  if (acc === undefined) {
    acc = new SeriesAccumulator(name, labels, kind);
    acc.noteUnit(unit ?? '');
    sink.series.set(id, acc);
  }
  return acc;
}

function readPointTimeMs(sink: PointSink, name: string, point: JsonObject): number {
  const raw = point['timeUnixNano'];
  const timeMs = typeof raw === 'string' ? convertNanosStringToMs(raw) : NaN;
  if (Number.isNaN(timeMs)) sink.issues.error(sink.line, `expected timeUnixNano (nanoseconds as a string or number) on a point of "${name}", got ${JSON.stringify(raw) ?? 'nothing'}; point skipped`);
  return timeMs;
}

function readNumberPoints(sink: PointSink, name: string, kind: SeriesKind, points: unknown): void {
  for (const point of asArray(points)) {
    if (!isObject(point)) { sink.issues.error(sink.line, `expected each data point of "${name}" to be an object, got ${previewJson(point, 40, 0)}; point skipped`); continue; }
    const timeMs = readPointTimeMs(sink, name, point);
    if (Number.isNaN(timeMs)) continue;
    let value = readNumber(point['asDouble'] ?? point['asInt']);
    if (value === undefined) {
      sink.issues.warning(sink.line, `expected asDouble or asInt on a point of "${name}"; read as a gap`);
      value = NaN;
    }
    if ((Number(point['flags'] ?? 0) & FLAG_NO_RECORDED_VALUE) !== 0) value = NaN;
    seriesFor(sink, name, kind, point, sink.unit).add(timeMs, value, readStartTimeMs(kind, point));
  }
}

function readSummaryPoints(sink: PointSink, name: string, kind: SeriesKind, points: unknown): void {
  for (const point of asArray(points)) {
    if (!isObject(point)) { sink.issues.error(sink.line, `expected each data point of "${name}" to be an object, got ${previewJson(point, 40, 0)}; point skipped`); continue; }
    const timeMs = readPointTimeMs(sink, name, point);
    if (Number.isNaN(timeMs)) continue;
    const isNoValue = (Number(point['flags'] ?? 0) & FLAG_NO_RECORDED_VALUE) !== 0;
    const count = isNoValue ? NaN : readNumber(point['count']) ?? NaN;
    const sum = isNoValue ? NaN : readNumber(point['sum']) ?? NaN;
    const startTimeMs = readStartTimeMs(kind, point);
    seriesFor(sink, `${name}_count`, kind, point, undefined).add(timeMs, count, startTimeMs);
    seriesFor(sink, `${name}_sum`, kind, point, sink.unit).add(timeMs, sum, startTimeMs);
  }
}

/** Start time of a cumulative point (resets show as a new start); NaN for other kinds or when absent. */
function readStartTimeMs(kind: SeriesKind, point: JsonObject): number {
  const raw = point['startTimeUnixNano'];
  return kind === 'counter' && typeof raw === 'string' ? convertNanosStringToMs(raw) : NaN;
}

/** Numbers as proto3 JSON writes them: JSON numbers, decimal strings, "NaN", "Infinity", "-Infinity". */
function readNumber(raw: unknown): number | undefined {
  if (typeof raw === 'number') return raw;
  if (typeof raw !== 'string') return undefined;
  if (raw === 'NaN') return NaN;
  if (raw === 'Infinity') return Infinity;
  if (raw === '-Infinity') return -Infinity;
  return readDecimalText(raw);
}

/** OTLP KeyValue list → flat labels; non-string values are written as text (arrays/kvlists as JSON). */
export function readAttributes(attributes: unknown): Record<string, string> {
  const labels: Record<string, string> = {};
  for (const kv of asArray(attributes)) {
    if (!isObject(kv) || typeof kv['key'] !== 'string' || !isObject(kv['value'])) continue;
    const v = kv['value'];
    const text = 'stringValue' in v ? String(v['stringValue'])
      : 'intValue' in v ? String(v['intValue'])
        : 'doubleValue' in v ? String(v['doubleValue'])
          : 'boolValue' in v ? String(v['boolValue'])
            : 'bytesValue' in v ? String(v['bytesValue'])
              : JSON.stringify(v['arrayValue'] ?? v['kvlistValue'] ?? '');
    if (text !== '') labels[kv['key']] = text;
  }
  return labels;
}
