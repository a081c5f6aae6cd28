import { FAMILIES, type Family } from '../frame/types';
import { CLASSES } from './types';
import {
  LIBRARY_MAX_POINTS, LIBRARY_SCHEMA_VERSION,
  type LibraryDocument, type LibraryEntry, type LibraryIssue, type LibraryMetric,
  type LibraryParseResult, type LibraryTimeSpan,
} from './libraryTypes';

/** Labels: lowercase words joined by `_`, `-` or `.`, 1–64 characters (they become class keys). */
const LABEL_PATTERN = /^[a-z0-9][a-z0-9_.-]{0,63}$/;
const SHA256_PATTERN = /^[0-9a-f]{64}$/;
const ID_PATTERN = /^[A-Za-z0-9][A-Za-z0-9_.-]{0,79}$/;

/** An empty library of the current schema version. */
export function createEmptyLibrary(): LibraryDocument {
  return { schemaVersion: LIBRARY_SCHEMA_VERSION, entries: [] };
}

/**
 * Check a label for the library: returns an error message, or undefined when the label is usable.
 * Labels are lowercase so that "Pool_Leak" and "pool_leak" cannot become two classes.
 */
export function checkLibraryLabel(label: string): string | undefined {
  if (LABEL_PATTERN.test(label)) return undefined;
  return `expected a label of 1–64 characters a-z, 0-9, '_', '-', '.' starting with a letter or digit, got ${JSON.stringify(label)}`;
}

/**
 * Parse and validate the text of a library file. Never throws: a truncated file, invalid JSON,
 * a newer schema version or a malformed entry give issues naming the file, the JSON path (or
 * line:column for syntax errors) and what was expected. Duplicate entry ids are an issue too.
 */
export function parseLibraryText(text: string, file: string): LibraryParseResult {
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (error) {
    return { issues: [{ file, path: describeJsonErrorPlace(text, error), message: `invalid JSON (${errorText(error)}); the file may be truncated or hand-edited` }] };
  }
  return validateLibraryDocument(value, file);
}

/** Validate an already parsed value as a library document (see parseLibraryText). */
export function validateLibraryDocument(value: unknown, file: string): LibraryParseResult {
  const issues: LibraryIssue[] = [];
  const report = (path: string, message: string): void => { issues.push({ file, path, message }); };
  if (!isRecord(value)) {
    report('$', `expected an object with schemaVersion and entries, got ${kindOf(value)}`);
    return { issues };
  }
  const version = value.schemaVersion;
  if (typeof version !== 'number' || !Number.isInteger(version) || version < 1) {
    report('$.schemaVersion', `expected a positive integer, got ${JSON.stringify(version) ?? 'nothing'}`);
    return { issues };
  }
  if (version > LIBRARY_SCHEMA_VERSION) {
    report('$.schemaVersion', `expected schema version ${LIBRARY_SCHEMA_VERSION} or lower, got ${version}: the file was written by a newer Metric Triage; update the extension (the file is left untouched)`);
    return { issues };
  }
  if (!Array.isArray(value.entries)) {
    report('$.entries', `expected an array, got ${kindOf(value.entries)}`);
    return { issues };
  }
  const entries: LibraryEntry[] = [];
  const seenIds = new Set<string>();
  value.entries.forEach((raw: unknown, index: number) => {
    const path = `$.entries[${index}]`;
    const entry = readEntry(raw, path, report);
    if (entry === undefined) return;
    if (seenIds.has(entry.id)) report(`${path}.id`, `expected unique ids, got ${JSON.stringify(entry.id)} twice`);
    seenIds.add(entry.id);
    entries.push(entry);
  });
  if (issues.length > 0) return { issues };
  return { document: { schemaVersion: LIBRARY_SCHEMA_VERSION, entries: sortEntries(entries) }, issues: [] };
}

type Report = (path: string, message: string) => void;

function readEntry(raw: unknown, path: string, report: Report): LibraryEntry | undefined {
  if (!isRecord(raw)) { report(path, `expected an entry object, got ${kindOf(raw)}`); return undefined; }
  const before = countingReport(report);
  const id = readString(raw, 'id', path, before.report, ID_PATTERN, 'an id of letters, digits, _ . - (≤ 80)');
  const label = readString(raw, 'label', path, before.report);
  if (label !== undefined) {
    const labelError = checkLibraryLabel(label);
    if (labelError !== undefined) before.report(`${path}.label`, labelError);
  }
  const isBuiltInClass = raw.isBuiltInClass;
  if (typeof isBuiltInClass !== 'boolean') before.report(`${path}.isBuiltInClass`, `expected true or false, got ${kindOf(isBuiltInClass)}`);
  else if (label !== undefined && isBuiltInClass !== (CLASSES as readonly string[]).includes(label)) {
    before.report(`${path}.isBuiltInClass`, `expected ${!isBuiltInClass} for label ${JSON.stringify(label)}, got ${isBuiltInClass}`);
  }
  const window = readSpan(raw.window, `${path}.window`, before.report);
  const baseline = readSpan(raw.baseline, `${path}.baseline`, before.report);
  const exportSha256 = readString(raw, 'exportSha256', path, before.report, SHA256_PATTERN, '64 lowercase hex digits');
  const exportFile = readString(raw, 'exportFile', path, before.report);
  const postmortem = raw.postmortem === undefined ? undefined : readString(raw, 'postmortem', path, before.report);
  const createdMs = readFiniteNumber(raw.createdMs, `${path}.createdMs`, before.report);
  const modelVersion = readString(raw, 'modelVersion', path, before.report);
  const embedding = readEmbedding(raw.embedding, `${path}.embedding`, before.report);
  const metrics = readMetrics(raw.metrics, `${path}.metrics`, before.report);
  if (before.count() > 0) return undefined;
  return {
    id: id!, label: label!, isBuiltInClass: isBuiltInClass as boolean, window: window!, baseline: baseline!,
    exportSha256: exportSha256!, exportFile: exportFile!, ...(postmortem !== undefined ? { postmortem } : {}),
    createdMs: createdMs!, modelVersion: modelVersion!, embedding: embedding!, metrics: metrics!,
  };
}

function readMetrics(raw: unknown, path: string, report: Report): LibraryMetric[] | undefined {
  if (!Array.isArray(raw)) { report(path, `expected an array of metrics, got ${kindOf(raw)}`); return undefined; }
  if (raw.length === 0) { report(path, 'expected at least one metric, got an empty array'); return undefined; }
  const metrics: LibraryMetric[] = [];
  raw.forEach((item: unknown, index: number) => {
    const itemPath = `${path}[${index}]`;
    if (!isRecord(item)) { report(itemPath, `expected a metric object, got ${kindOf(item)}`); return; }
    const id = readString(item, 'id', itemPath, report);
    const name = readString(item, 'name', itemPath, report);
    const family = item.family;
    if (typeof family !== 'string' || !(FAMILIES as readonly string[]).includes(family)) {
      report(`${itemPath}.family`, `expected one of ${FAMILIES.join(', ')}, got ${JSON.stringify(family) ?? 'nothing'}`);
    }
    const baseline = readPoints(item.baseline, `${itemPath}.baseline`, report);
    const window = readPoints(item.window, `${itemPath}.window`, report);
    if (id !== undefined && name !== undefined && baseline !== undefined && window !== undefined) {
      metrics.push({ id, name, family: family as Family, baseline, window });
    }
  });
  return metrics;
}

function readPoints(raw: unknown, path: string, report: Report): (number | null)[] | undefined {
  if (!Array.isArray(raw)) { report(path, `expected an array of numbers or null, got ${kindOf(raw)}`); return undefined; }
  if (raw.length === 0 || raw.length > LIBRARY_MAX_POINTS) {
    report(path, `expected 1–${LIBRARY_MAX_POINTS} points, got ${raw.length}`); return undefined;
  }
  const bad = raw.findIndex((v: unknown) => v !== null && (typeof v !== 'number' || !Number.isFinite(v)));
  if (bad >= 0) { report(`${path}[${bad}]`, `expected a finite number or null, got ${JSON.stringify(raw[bad])}`); return undefined; }
  return raw as (number | null)[];
}

function readEmbedding(raw: unknown, path: string, report: Report): number[] | undefined {
  if (!Array.isArray(raw)) { report(path, `expected an array of numbers, got ${kindOf(raw)}`); return undefined; }
  const bad = raw.findIndex((v: unknown) => typeof v !== 'number' || !Number.isFinite(v));
  if (bad >= 0) { report(`${path}[${bad}]`, `expected a finite number, got ${JSON.stringify(raw[bad])}`); return undefined; }
  return raw as number[];
}

function readSpan(raw: unknown, path: string, report: Report): LibraryTimeSpan | undefined {
  if (!isRecord(raw)) { report(path, `expected {startMs, endMs}, got ${kindOf(raw)}`); return undefined; }
  const startMs = readFiniteNumber(raw.startMs, `${path}.startMs`, report);
  const endMs = readFiniteNumber(raw.endMs, `${path}.endMs`, report);
  if (startMs === undefined || endMs === undefined) return undefined;
  if (endMs < startMs) { report(path, `expected endMs ≥ startMs, got ${startMs}..${endMs}`); return undefined; }
  return { startMs, endMs };
}

function readString(obj: Record<string, unknown>, key: string, path: string, report: Report, pattern?: RegExp, expected?: string): string | undefined {
  const value = obj[key];
  if (typeof value !== 'string' || value.length === 0) {
    report(`${path}.${key}`, `expected a non-empty string, got ${JSON.stringify(value) ?? 'nothing'}`); return undefined;
  }
  if (pattern !== undefined && !pattern.test(value)) {
    report(`${path}.${key}`, `expected ${expected ?? pattern.source}, got ${JSON.stringify(value)}`); return undefined;
  }
  return value;
}

function readFiniteNumber(value: unknown, path: string, report: Report): number | undefined {
  if (typeof value === 'number' && Number.isFinite(value)) return value;
  report(path, `expected a finite number, got ${JSON.stringify(value) ?? 'nothing'}`);
  return undefined;
}

function countingReport(report: Report): { report: Report; count: () => number } {
  let count = 0;
  return { report: (p, m) => { count += 1; report(p, m); }, count: () => count };
}

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

function kindOf(value: unknown): string {
  if (value === undefined) return 'nothing';
  if (value === null) return 'null';
  if (Array.isArray(value)) return 'an array';
  return `a ${typeof value}`;
}

function errorText(error: unknown): string {
  return error instanceof Error ? error.message : String(error);
}

/** `line L, column C` from a JSON.parse error's "position N", or the end of the text when truncated. */
function describeJsonErrorPlace(text: string, error: unknown): string {
  const match = /position (\d+)/.exec(errorText(error));
  const offset = match ? Number(match[1]) : text.length;
  const before = text.slice(0, offset);
  const line = before.split('\n').length;
  const column = offset - before.lastIndexOf('\n');
  return `line ${line}, column ${column}`;
}

/** Entries sorted by id (code-unit order, so every platform sorts the same). */
export function sortEntries(entries: readonly LibraryEntry[]): LibraryEntry[] {
  return [...entries].sort((a, b) => (a.id < b.id ? -1 : a.id > b.id ? 1 : 0));
}
