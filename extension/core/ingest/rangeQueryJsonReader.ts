import type { ExportReader } from './exportReader';
import { IssueCollector, SeriesAccumulator, formatSeriesId, inferKindFromName } from './seriesAccumulator';
import type { IngestResult, RawSeries } from './types';

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
 * message. Issue `line` is the 1-based index of the series in `result` (the document has no useful
 * line numbers once parsed); 1 for document-level problems.
 * The whole document is held until `finish` (it is one JSON value); this is the one reader whose
 * memory follows the text size.
 */
export function createRangeQueryJsonReader(file: string): ExportReader {
  const chunks: string[] = [];
  return {
    push(chunk: string): void { chunks.push(chunk); },
    finish(): IngestResult { return readRangeQueryJson(file, chunks.join('')); },
  };
}

function readRangeQueryJson(file: string, text: string): IngestResult {
  const issues = new IssueCollector(file);
  const assumptions: string[] = [];
  const result: IngestResult = { file, format: 'range-query-json', series: [], issues: issues.issues, assumptions };
  let doc: unknown;
  try {
    doc = JSON.parse(text.charCodeAt(0) === 0xfeff ? text.slice(1) : text);
  } catch (err) {
    issues.error(lineOfJsonError(text, err), `expected one JSON document, got a syntax error: ${(err as Error).message}`);
    return { ...result, issues: issues.finish(1) };
  }
  if (!isObject(doc)) { issues.error(1, `expected a JSON object with "status" and "data", got ${describe(doc)}`); return { ...result, issues: issues.finish(1) }; }
  if (doc['status'] === 'error') {
    issues.error(1, `the query failed on the server: ${String(doc['errorType'] ?? 'error')}: ${String(doc['error'] ?? '(no message)')}`);
    return { ...result, issues: issues.finish(1) };
  }
  if (Array.isArray(doc['warnings'])) for (const w of doc['warnings']) issues.warning(1, `server warning: ${String(w)}`);
  const data = doc['data'];
  if (!isObject(data) || !Array.isArray(data['result'])) {
    issues.error(1, `expected "data.result" to be an array, got ${describe(isObject(data) ? data['result'] : data)}`);
    return { ...result, issues: issues.finish(1) };
  }
  const resultType = data['resultType'];
  if (resultType !== 'matrix' && resultType !== 'vector') {
    issues.error(1, `expected resultType "matrix" (or "vector"), got ${JSON.stringify(resultType)}`);
    return { ...result, issues: issues.finish(1) };
  }
  const series = readResultSeries(data['result'], resultType === 'vector', issues, assumptions);
  assumptions.push('times read as Unix seconds, as the query API documents');
  return { file, format: 'range-query-json', series, issues: issues.finish(1), assumptions };
}

function readResultSeries(items: readonly unknown[], isVector: boolean, issues: IssueCollector, assumptions: string[]): RawSeries[] {
  const out: RawSeries[] = [];
  let unnamed = 0;
  items.forEach((item, i) => {
    const record = i + 1;
    if (!isObject(item) || !isObject(item['metric'])) { issues.error(record, `expected {"metric":{…},"values":[…]} for series ${record}, got ${describe(item)}`); return; }
    const labels: Record<string, string> = {};
    for (const [k, v] of Object.entries(item['metric'])) if (k !== '__name__' && typeof v === 'string' && v !== '') labels[k] = v;
    const rawName = item['metric']['__name__'];
    let name = typeof rawName === 'string' ? rawName : '';
    if (name === '') { unnamed++; name = Object.keys(labels).length > 0 ? formatSeriesId('', labels) : `series_${record}`; }
    const samples = isVector ? [item['value']] : item['values'];
    if (!Array.isArray(samples)) { issues.error(record, `expected "${isVector ? 'value' : 'values'}" to be an array in series ${record}, got ${describe(samples)}`); return; }
    const acc = new SeriesAccumulator(name, labels, typeof rawName === 'string' ? inferKindFromName(name) : 'gauge');
    samples.forEach((sample, k) => readSample(acc, sample, issues, record, k));
    out.push(acc.toRawSeries());
  });
  if (unnamed > 0) assumptions.push(`${unnamed} series had no __name__ (a function or aggregation was applied) and are named by their labels`);
  return out;
}

function readSample(acc: SeriesAccumulator, sample: unknown, issues: IssueCollector, record: number, index: number): void {
  if (!Array.isArray(sample) || sample.length !== 2) { issues.error(record, `expected [<unix seconds>, "<value>"] at series ${record} sample ${index + 1}, got ${describe(sample)}`); return; }
  const timeS = typeof sample[0] === 'number' ? sample[0] : typeof sample[0] === 'string' ? Number(sample[0]) : NaN;
  if (!Number.isFinite(timeS)) { issues.error(record, `expected a Unix time in seconds at series ${record} sample ${index + 1}, got ${describe(sample[0])}`); return; }
  const value = readPromValue(sample[1]);
  if (value === undefined) { issues.warning(record, `expected a numeric string at series ${record} sample ${index + 1}, got ${describe(sample[1])}; read as a gap`); }
  // Rounded to whole ms: float seconds such as 1435781451.781 carry binary noise below 1 µs.
  acc.add(Math.round(timeS * 1000), value ?? NaN);
}

/** Sample value strings: decimal numbers, "NaN", "+Inf", "-Inf"; undefined when unreadable. */
export function readPromValue(raw: unknown): number | undefined {
  if (typeof raw === 'number') return raw;
  if (typeof raw !== 'string' || raw.trim() === '') return undefined;
  if (raw === 'NaN') return NaN;
  if (raw === '+Inf' || raw === 'Inf') return Infinity;
  if (raw === '-Inf') return -Infinity;
  const value = Number(raw);
  return Number.isNaN(value) ? undefined : value;
}

function describe(value: unknown): string {
  if (value === undefined) return 'nothing';
  const text = JSON.stringify(value) ?? String(value);
  return text.length > 40 ? `${text.slice(0, 40)}…` : text;
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
