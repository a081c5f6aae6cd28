import type { ExportReader } from './exportReader';
import { JsonResultStreamer } from './jsonResultStreamer';
import { IssueCollector, SeriesAccumulator, formatSeriesId, inferKindFromName } from './seriesAccumulator';
import type { IngestResult, RawSeries } from './types';
import { readDecimalText } from './decimalText';

type JsonObject = Record<string, unknown>;

function isObject(value: unknown): value is JsonObject {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

/**
 * Reader for the range-query JSON of the common open-source monitoring system's HTTP API:
 * `{"status":"success","data":{"resultType":"matrix","result":[{"metric":{…},"values":[[t,"v"],…]}]}}`.
 * Times are Unix seconds (possibly fractional, as the API documents); values are strings, with
 * "NaN", "+Inf" and "-Inf" read as such (NaN becomes a gap in the frame). `vector` results are read
 * as one sample per series. `status: "error"` gives an error carrying the server's errorType and
 * message (and no series). Streamed: each element of `data.result` is parsed as soon as it closes,
 * so memory follows one series (the API caps a range query at 11,000 points per series), not the
 * file. Issue `line` is the line where the offending series starts, or of a syntax error.
 */
export function createRangeQueryJsonReader(file: string): ExportReader {
  const issues = new IssueCollector(file);
  const series: RawSeries[] = [];
  let unnamedCount = 0;
  const streamer = new JsonResultStreamer((text, index, line) => {
    let item: unknown;
    try {
      item = JSON.parse(text);
    } catch (err) {
      issues.error(line + lineOfJsonError(text, err) - 1, `expected series ${index + 1} of data.result to be valid JSON, got a syntax error: ${(err as Error).message}`);
      return;
    }
    const read = readResultItem(item, index + 1, line, issues);
    if (read === undefined) return;
    if (read.isUnnamed) unnamedCount++;
    series.push(read.series);
  });
  return {
    push(chunk: string): void { streamer.push(chunk); },
    finish(): IngestResult {
      const { envelope, unfinishedElement } = streamer.finish();
      const result = (kept: RawSeries[], assumptions: string[]): IngestResult =>
        ({ file, format: 'range-query-json', series: kept, issues: issues.finish(1), assumptions });
      if (unfinishedElement !== '') {
        issues.error(1 + countLines(envelope), `expected series ${streamer.elementCount + 1} of data.result to end, got the end of the input (truncated file?)`);
      }
      const envelopeDoc = parseEnvelope(envelope, unfinishedElement !== '', issues);
      if (envelopeDoc === undefined) return result(series, []);
      if (envelopeDoc === 'error') return result([], []);
      const assumptions = ['times read as Unix seconds, as the query API documents'];
      if (series.some((raw) => raw.values.some(Number.isNaN))) assumptions.push('"NaN" sample values (e.g. 0/0) are shown as gaps; the server sent them as values');
      if (unnamedCount > 0) assumptions.push(`${unnamedCount} series had no __name__ (a function or aggregation was applied) and are named by their labels`);
      return result(series, assumptions);
    },
  };
}

/** Checks the document around the streamed series; 'error' when the server reported a failure. */
function parseEnvelope(envelope: string, isTruncated: boolean, issues: IssueCollector): JsonObject | 'error' | undefined {
  const text = envelope.charCodeAt(0) === 0xfeff ? envelope.slice(1) : envelope;
  if (text.trim() === '') { issues.error(1, 'file is empty: expected a JSON object with "status" and "data"'); return undefined; }
  let doc: unknown;
  try {
    doc = JSON.parse(text);
  } catch (err) {
    if (!isTruncated) issues.error(lineOfJsonError(text, err), `expected one JSON document, got a syntax error: ${(err as Error).message}`);
    return undefined;
  }
  if (!isObject(doc)) { issues.error(1, `expected a JSON object with "status" and "data", got ${describe(doc)}`); return undefined; }
  if (doc['status'] === 'error') {
    issues.error(1, `the query failed on the server: ${String(doc['errorType'] ?? 'error')}: ${String(doc['error'] ?? '(no message)')}`);
    return 'error';
  }
  if (Array.isArray(doc['warnings'])) for (const w of doc['warnings']) issues.warning(1, `server warning: ${String(w)}`);
  const data = doc['data'];
  if (!isObject(data) || !Array.isArray(data['result'])) {
    issues.error(1, `expected "data.result" to be an array, got ${describe(isObject(data) ? data['result'] : data)}`);
    return undefined;
  }
  const resultType = data['resultType'];
  if (resultType !== 'matrix' && resultType !== 'vector') {
    issues.error(1, `expected resultType "matrix" (or "vector"), got ${JSON.stringify(resultType) ?? 'nothing'}`);
    return undefined;
  }
  // Object elements were streamed out; whatever is left in data.result is not a series.
  const others = data['result'];
  if (others.length > 0) {
    issues.error(1, `expected every element of data.result to be a series object {"metric":{…},"values":[…]}, got ${others.length} other element${others.length === 1 ? '' : 's'}, the first ${describe(others[0])}; skipped`);
  }
  return doc;
}

function readResultItem(item: unknown, record: number, line: number, issues: IssueCollector): { series: RawSeries; isUnnamed: boolean } | undefined {
  if (!isObject(item) || !isObject(item['metric'])) { issues.error(line, `expected {"metric":{…},"values":[…]} for series ${record}, got ${describe(item)}`); return undefined; }
  const labels: Record<string, string> = {};
  for (const [k, v] of Object.entries(item['metric'])) if (k !== '__name__' && typeof v === 'string' && v !== '') labels[k] = v;
  const rawName = item['metric']['__name__'];
  const isUnnamed = typeof rawName !== 'string' || rawName === '';
  const name = !isUnnamed ? rawName as string : Object.keys(labels).length > 0 ? formatSeriesId('', labels) : `series_${record}`;
  const isVector = !('values' in item) && 'value' in item;
  const samples = isVector ? [item['value']] : item['values'];
  if (!Array.isArray(samples)) { issues.error(line, `expected "values" to be an array in series ${record}, got ${describe(samples)}`); return undefined; }
  const acc = new SeriesAccumulator(name, labels, isUnnamed ? 'gauge' : inferKindFromName(name));
  samples.forEach((sample, k) => readSample(acc, sample, issues, record, k, line));
  return { series: acc.toRawSeries(), isUnnamed };
}

function countLines(text: string): number {
  let n = 0;
  for (let i = text.indexOf('\n'); i !== -1; i = text.indexOf('\n', i + 1)) n++;
  return n;
}

function readSample(acc: SeriesAccumulator, sample: unknown, issues: IssueCollector, record: number, index: number, line: number): void {
  if (!Array.isArray(sample) || sample.length !== 2) { issues.error(line, `expected [<unix seconds>, "<value>"] at series ${record} sample ${index + 1}, got ${describe(sample)}`); return; }
  const timeS = typeof sample[0] === 'number' ? sample[0] : typeof sample[0] === 'string' ? Number(sample[0]) : NaN;
  if (!Number.isFinite(timeS)) { issues.error(line, `expected a Unix time in seconds at series ${record} sample ${index + 1}, got ${describe(sample[0])}`); return; }
  const value = readPromValue(sample[1]);
  if (value === undefined) { issues.warning(line, `expected a numeric string at series ${record} sample ${index + 1}, got ${describe(sample[1])}; read as a gap`); }
  // Rounded to whole ms: float seconds such as 1435781451.781 carry binary noise below 1 µs.
  acc.add(Math.round(timeS * 1000), value ?? NaN);
}

/** Sample value strings: decimal numbers, "NaN", "+Inf", "-Inf"; undefined when unreadable (also 0x…, or beyond a double's range). */
export function readPromValue(raw: unknown): number | undefined {
  if (typeof raw === 'number') return raw;
  if (typeof raw !== 'string' || raw.trim() === '') return undefined;
  if (raw === 'NaN') return NaN;
  if (raw === '+Inf' || raw === 'Inf') return Infinity;
  if (raw === '-Inf') return -Infinity;
  return readDecimalText(raw);
}

function describe(value: unknown): string {
  if (value === undefined) return 'nothing';
  const text = previewJson(value, 40, 0);
  return text.length > 40 ? `${text.slice(0, 40)}…` : text;
}

/**
 * JSON text of `value` as JSON.stringify writes it, but cut once it passes `limit` characters and
 * with values nested deeper than 8 levels shown as "…": a document nested 100,000 levels deep or
 * holding a huge array is described without overflowing the stack or writing it all out.
 */
export function previewJson(value: unknown, limit: number, depth: number): string {
  if (typeof value === 'string') return JSON.stringify(value.length > limit ? value.slice(0, limit + 1) : value);
  if (value === null || typeof value !== 'object') return JSON.stringify(value) ?? String(value);
  if (depth >= 8) return '…';
  const isArray = Array.isArray(value);
  const items: readonly unknown[] = isArray ? value : Object.keys(value);
  let out = isArray ? '[' : '{';
  for (let i = 0; i < items.length && out.length <= limit; i++) {
    if (i > 0) out += ',';
    const budget = limit - out.length;
    out += isArray
      ? previewJson(items[i], budget, depth + 1)
      : `${JSON.stringify(items[i])}:${previewJson((value as Record<string, unknown>)[items[i] as string], budget, depth + 1)}`;
  }
  return out.length > limit ? out : `${out}${isArray ? ']' : '}'}`;
}

/** 1-based line of a JSON.parse error, from the "position N" its message carries (1 if none). */
export function lineOfJsonError(text: string, err: unknown): number {
  const match = /position (\d+)/.exec(err instanceof Error ? err.message : '');
  if (match === null) return 1;
  const position = Math.min(Number(match[1]), text.length);
  let line = 1;
  for (let i = text.indexOf('\n'); i !== -1 && i < position; i = text.indexOf('\n', i + 1)) line++;
  return line;
}
