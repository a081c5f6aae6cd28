import { detectDelimiter } from './csvRowSplitter';
import { findFirstLine } from './exportReader';
import { isLongCsvHeader } from './longCsvReader';
import type { ExportFormat } from './types';
import Papa from 'papaparse';

/** Line protocol: `measurement[,tags] key=value[,…] [integer timestamp]` (escapes allowed). */
const LINE_PROTOCOL_LINE = /^(?:[^\s,\\]|\\.)(?:[^\s,\\]|\\.)*(?:,(?:[^\s\\]|\\.)+)? (?:[^\s=\\]|\\.)+=\S.*?(?: -?\d+)?$/;

/** `# TYPE`, `# HELP`, `# UNIT` or `# EOF` at the start of a line (Prometheus / OpenMetrics text). */
const EXPOSITION_META = /(^|\n)# (TYPE|HELP|UNIT) [A-Za-z_:][A-Za-z0-9_:]* |(^|\n)# EOF\s*$/;
/** A sample: a metric name, an optional label set, a number (or NaN/±Inf) and a timestamp. */
const EXPOSITION_SAMPLE_LINE = /^[A-Za-z_:][A-Za-z0-9_:]*(\{.*\})?[ \t]+([-+]?(\d|\.\d)\S*|[-+]?Inf|NaN)[ \t]+-?\d+(\.\d+)?([ \t]+#.*)?$/;
/** A stored sample dumped as `{__name__="up",job="a"} 1 1700000000000`. */
const STORED_SAMPLE_LINE = /^\{[^\n]*__name__\s*=\s*"[^"\n]*"[^\n]*\}[ \t]+\S+[ \t]+-?\d+(\.\d+)?[ \t]*(\r?\n|$)/;

/** Result of sniffing: the format and why it was chosen (shown to the user). */
export interface SniffResult {
  readonly format: ExportFormat;
  readonly reason: string;
}

/**
 * Format of an export from its first bytes (pass at least the first ~64 KiB) and, as a hint only,
 * its file name. `# TYPE`/`# HELP`/`# UNIT`/`# EOF` lines or `name{labels} value timestamp` samples
 * → text exposition; JSON with "resourceMetrics" → OTLP; JSON with "resultType"/"status" → range
 * query; `key=value` lines → line protocol; otherwise CSV, long when the header has a value column
 * plus a name/series/labels column, else wide. Empty or unknown content falls back to the file
 * extension, then to wide CSV (whose reader reports what it expected).
 */
export function sniffFormat(head: string, fileName = ''): SniffResult {
  const text = head.charCodeAt(0) === 0xfeff ? head.slice(1) : head;
  const trimmed = text.trimStart();
  const ext = (/\.([A-Za-z0-9]+)$/.exec(fileName)?.[1] ?? '').toLowerCase();
  if (EXPOSITION_META.test(text) || STORED_SAMPLE_LINE.test(trimmed)) {
    return { format: 'text-exposition', reason: 'text exposition lines ("# TYPE", or "name{labels} value timestamp")' };
  }
  if (trimmed.startsWith('{') || trimmed.startsWith('[')) {
    if (trimmed.includes('"resourceMetrics"')) return { format: 'otlp-jsonl', reason: 'JSON with "resourceMetrics" (OTLP)' };
    if (/"(resultType|status)"/.test(trimmed)) return { format: 'range-query-json', reason: 'JSON with "status"/"resultType" (range query API)' };
    if (ext === 'jsonl' || ext === 'ndjson') return { format: 'otlp-jsonl', reason: `JSON lines by extension .${ext}` };
    return { format: 'range-query-json', reason: 'JSON document' };
  }
  const firstLine = firstContentLine(text);
  if (firstLine === undefined) return { format: byExtension(ext), reason: 'no content; chosen by file extension' };
  if (EXPOSITION_SAMPLE_LINE.test(firstLine)) return { format: 'text-exposition', reason: 'lines of "name{labels} value timestamp"' };
  if (LINE_PROTOCOL_LINE.test(firstLine) && !/^[^,]*,[^=]*$/.test(firstLine.split(' ')[0] ?? '')) {
    return { format: 'line-protocol', reason: 'lines of "measurement,tags field=value timestamp"' };
  }
  if ((ext === 'lp' || ext === 'line' || ext === 'influx') && !/[,;\t]/.test(firstLine)) return { format: 'line-protocol', reason: `file extension .${ext}` };
  const header = Papa.parse<string[]>(firstLine, { delimiter: detectDelimiter(firstLine) }).data[0] ?? [];
  if (isLongCsvHeader(header)) return { format: 'long-csv', reason: 'CSV header with a value column and a name/series/labels column' };
  return { format: 'wide-csv', reason: 'CSV with a time column and one column per series' };
}

function firstContentLine(text: string): string | undefined {
  let rest = text;
  for (;;) {
    const line = findFirstLine(rest, true);
    if (line === undefined || !line.startsWith('#')) return line;
    rest = rest.slice(rest.indexOf(line) + line.length);
  }
}

function byExtension(ext: string): ExportFormat {
  if (ext === 'jsonl' || ext === 'ndjson') return 'otlp-jsonl';
  if (ext === 'json') return 'range-query-json';
  if (ext === 'lp' || ext === 'line' || ext === 'influx') return 'line-protocol';
  if (ext === 'prom' || ext === 'om') return 'text-exposition';
  return 'wide-csv';
}
