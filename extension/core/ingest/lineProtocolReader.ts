import type { ExportReader } from './exportReader';
import { LineSplitter } from './lineSplitter';
import { IssueCollector, SeriesAccumulator, formatSeriesId, inferKindFromName } from './seriesAccumulator';
import { TimeCellReader } from './timestamps';
import type { IngestResult } from './types';
import { readDecimalText } from './decimalText';

/** One parsed line: measurement, tags, fields (raw text) and the timestamp text. */
export interface LinePoint {
  readonly measurement: string;
  readonly tags: Record<string, string>;
  readonly fields: ReadonlyArray<readonly [string, string]>;
  readonly timestamp: string;
}

/**
 * Splits `text` at unescaped `stop` characters outside double quotes (line protocol escaping:
 * backslash escapes the next character). Returns the unescaped parts; quoted strings keep quotes.
 */
function splitEscaped(text: string, stop: string, limit = Infinity, isUnescaping = true): string[] {
  const parts: string[] = [];
  let current = '';
  let isInQuotes = false;
  for (let i = 0; i < text.length; i++) {
    const c = text[i];
    if (c === '\\' && i + 1 < text.length) {
      const next = text[i + 1];
      // Inside a string field, only \" and \\ are escapes; keep the rest as written.
      if (isInQuotes && next !== '"' && next !== '\\') { current += c; continue; }
      current += isInQuotes || !isUnescaping ? c + next : next;
      i++;
      continue;
    }
    if (c === '"') isInQuotes = !isInQuotes;
    if (c === stop && !isInQuotes && parts.length < limit) { parts.push(current); current = ''; continue; }
    current += c;
  }
  parts.push(current);
  return parts;
}

/**
 * Parses one line `measurement[,tag=v…] field=v[,…] [timestamp]`; returns an error message
 * (naming what was expected) instead of a point when the line is malformed.
 */
export function parseLinePoint(line: string): LinePoint | string {
  const sections = splitEscapedRaw(line);
  if (sections.length < 2) return 'expected "<measurement>[,<tags>] <field>=<value>[,…] [<timestamp>]", got no field set';
  if (sections.length > 3) return `expected at most 3 space-separated sections (series, fields, timestamp), got ${sections.length}`;
  const [key, fieldText, timestamp = ''] = sections;
  const keyParts = splitEscaped(key, ',', Infinity, false);
  const measurement = splitEscaped(keyParts[0], '\u0000')[0];
  if (measurement === '') return 'expected a measurement name at the start of the line';
  const tags: Record<string, string> = {};
  for (const part of keyParts.slice(1)) {
    const [tagKey, tagValue] = splitEscaped(part, '=', 1);
    if (tagValue === undefined || tagKey === '') return `expected tag "<key>=<value>", got "${part}"`;
    if (tagValue !== '') tags[tagKey] = tagValue;
  }
  const fields: Array<readonly [string, string]> = [];
  for (const part of splitEscaped(fieldText, ',', Infinity, false)) {
    const [fieldKey, fieldValue] = splitEscaped(part, '=', 1);
    if (fieldValue === undefined || fieldKey === '' || fieldValue === '') return `expected field "<key>=<value>", got "${part}"`;
    fields.push([fieldKey, fieldValue]);
  }
  return { measurement, tags, fields, timestamp };
}

/** Splits a line into its space-separated sections, honouring escapes and quoted strings. */
function splitEscapedRaw(line: string): string[] {
  const sections: string[] = [];
  let start = 0;
  let isInQuotes = false;
  for (let i = 0; i < line.length; i++) {
    const c = line.charCodeAt(i);
    if (c === 92) { i++; continue; }
    if (c === 34) isInQuotes = !isInQuotes;
    else if (c === 32 && !isInQuotes) {
      if (i > start) sections.push(line.slice(start, i));
      start = i + 1;
    }
  }
  if (start < line.length) sections.push(line.slice(start));
  return sections;
}

/** Field value text → number; undefined for strings and booleans (not metrics). */
export function readFieldValue(text: string): number | undefined | 'invalid' {
  const last = text[text.length - 1];
  if (text.startsWith('"')) return undefined;
  if (/^(t|T|true|True|TRUE|f|F|false|False|FALSE)$/.test(text)) return undefined;
  const body = last === 'i' || last === 'u' ? text.slice(0, -1) : text;
  if ((last === 'i' && !/^-?\d+$/.test(body)) || (last === 'u' && !/^\d+$/.test(body))) return 'invalid';
  return readDecimalText(body) ?? 'invalid';
}

/**
 * Reader for line protocol. One series per measurement + tag set + field key, named
 * `<measurement>_<field>`. Integer (`i`) and unsigned (`u`) suffixes are read as numbers; string and
 * boolean fields are skipped with one warning per field key. `#` lines are comments. Timestamps
 * are nanoseconds by default; the unit is inferred by magnitude from the first one and reported.
 * Lines without a timestamp are skipped with an error (the server would have used its own clock).
 */
export function createLineProtocolReader(file: string): ExportReader {
  const issues = new IssueCollector(file);
  const times = new TimeCellReader();
  const series = new Map<string, SeriesAccumulator>();
  const skippedFields = new Set<string>();
  let pointCount = 0;
  const onLine = (text: string, line: number): void => {
    const trimmed = text.trim();
    if (trimmed === '' || trimmed.startsWith('#')) return;
    const point = parseLinePoint(trimmed);
    if (typeof point === 'string') { issues.error(line, `${point}; line skipped`); return; }
    if (point.timestamp === '' || !/^-?\d+$/.test(point.timestamp)) {
      issues.error(line, `expected an integer timestamp at the end of the line, got "${point.timestamp.slice(0, 40)}"; line skipped`);
      return;
    }
    const timeMs = times.readEpoch(Number(point.timestamp));
    if (Number.isNaN(timeMs)) { issues.error(line, `expected ${times.epochProblem || 'an integer timestamp'} at the end of the line, got "${point.timestamp.slice(0, 40)}"; line skipped`); return; }
    for (const [fieldKey, fieldText] of point.fields) {
      const value = readFieldValue(fieldText);
      const name = `${point.measurement}_${fieldKey}`;
      if (value === 'invalid') { issues.error(line, `expected a number for field "${fieldKey}", got "${fieldText.slice(0, 40)}"`); continue; }
      if (value === undefined) {
        if (!skippedFields.has(name)) { skippedFields.add(name); issues.warning(line, `field "${fieldKey}" of "${point.measurement}" is a string or boolean, not a metric; skipped`); }
        continue;
      }
      const id = formatSeriesId(name, point.tags);
      let acc = series.get(id);
      if (acc === undefined) { acc = new SeriesAccumulator(name, point.tags, inferKindFromName(name)); series.set(id, acc); }
      acc.add(timeMs, value);
      pointCount++;
    }
  };
  const splitter = new LineSplitter(onLine, (line) => issues.error(line, 'expected lines of at most 16 MiB, got a longer one; skipped'));
  return {
    push(chunk: string): void { splitter.push(chunk); },
    finish(): IngestResult {
      splitter.finish();
      if (pointCount === 0 && issues.errorCount === 0) issues.error(1, 'file is empty: expected lines like "cpu,host=a usage=0.5 1700000000000000000"');
      return { file, format: 'line-protocol', series: [...series.values()].map((s) => s.toRawSeries()), issues: issues.finish(splitter.line), assumptions: times.describeAssumptions() };
    },
  };
}
