import type { IngestIssue, RawSeries, SeriesKind } from './types';

/**
 * Growable Float64Array pair for one series: appends without per-sample objects, so memory stays
 * near 16 bytes per sample (8 when the time column is shared, see `FloatColumn`).
 */
export class FloatColumn {
  #data: Float64Array;
  #length = 0;

  constructor(initialCapacity = 64) {
    this.#data = new Float64Array(Math.max(4, initialCapacity));
  }

  /** Number of values appended. */
  get length(): number {
    return this.#length;
  }

  /** Appends one value (NaN allowed: it marks a gap). */
  push(value: number): void {
    if (this.#length === this.#data.length) {
      const grown = new Float64Array(this.#data.length * 2);
      grown.set(this.#data);
      this.#data = grown;
    }
    this.#data[this.#length++] = value;
  }

  /** Value at `index` (no bounds check beyond the typed array's own). */
  at(index: number): number {
    return this.#data[index];
  }

  /** Last value appended; NaN when empty. */
  last(): number {
    return this.#length === 0 ? NaN : this.#data[this.#length - 1];
  }

  /**
   * A right-sized copy of the values. The internal buffer is released at once (the column is empty
   * afterwards), so converting many columns in turn peaks at one extra column, not twice them all.
   */
  toArray(): Float64Array {
    const out = this.#data.length === this.#length ? this.#data : this.#data.slice(0, this.#length);
    this.#data = new Float64Array(4);
    this.#length = 0;
    return out;
  }
}

/** Identity of a series: its name plus labels sorted by key, `name{a="1",b="2"}`. */
export function formatSeriesId(name: string, labels: Readonly<Record<string, string>>): string {
  const keys = Object.keys(labels).sort();
  if (keys.length === 0) return name;
  const parts = keys.map((k) => `${k}="${labels[k].replace(/\\/g, '\\\\').replace(/"/g, '\\"')}"`);
  return `${name}{${parts.join(',')}}`;
}

/**
 * Name and labels back from an id written by {@link formatSeriesId}. An id that is not in that
 * form (a free-text column header, say) is a name without labels.
 */
export function parseSeriesId(id: string): { readonly name: string; readonly labels: Readonly<Record<string, string>> } {
  const open = id.indexOf('{');
  if (open <= 0 || !id.endsWith('}')) return { name: id, labels: {} };
  const labels: Record<string, string> = {};
  const body = id.slice(open + 1, -1);
  const pair = /([^=,{}"]+)="((?:[^"\\]|\\.)*)"(,|$)/y;
  let at = 0;
  while (at < body.length) {
    pair.lastIndex = at;
    const match = pair.exec(body);
    if (!match) return { name: id, labels: {} };
    labels[match[1]] = match[2].replace(/\\(.)/g, '$1');
    at = pair.lastIndex;
  }
  return { name: id.slice(0, open), labels };
}

/** Kind implied by a metric name alone: `_total` marks a counter (Prometheus naming guide). */
export function inferKindFromName(name: string): SeriesKind {
  return /_total$/.test(name) ? 'counter' : 'gauge';
}

/** One series being read: metadata plus its own time and value columns. */
export class SeriesAccumulator {
  readonly timesMs = new FloatColumn();
  readonly values = new FloatColumn();
  unit: string | undefined;
  hasMixedUnits = false;
  /** Created on the first known start time (OTLP cumulative points). */
  startTimesMs: FloatColumn | undefined;

  constructor(readonly name: string, readonly labels: Readonly<Record<string, string>>, public kind: SeriesKind) {}

  /** Appends one sample; `startTimeMs` is the start of a cumulative point's accumulation, if known. */
  add(timeMs: number, value: number, startTimeMs = NaN): void {
    if (!Number.isNaN(startTimeMs) && this.startTimesMs === undefined) {
      this.startTimesMs = new FloatColumn();
      for (let i = 0; i < this.timesMs.length; i++) this.startTimesMs.push(NaN);
    }
    this.timesMs.push(timeMs);
    this.values.push(value);
    this.startTimesMs?.push(startTimeMs);
  }

  /** Records the unit a cell carried; a second, different unit marks the series as mixed. */
  noteUnit(unit: string): void {
    if (unit === '') return;
    if (this.unit === undefined) this.unit = unit;
    else if (this.unit !== unit) this.hasMixedUnits = true;
  }

  /** Finished RawSeries. */
  toRawSeries(): RawSeries {
    return {
      id: formatSeriesId(this.name, this.labels),
      name: this.name,
      labels: this.labels,
      unit: this.unit,
      kind: this.kind,
      timesMs: this.timesMs.toArray(),
      values: this.values.toArray(),
      ...(this.startTimesMs === undefined ? {} : { startTimesMs: this.startTimesMs.toArray() }),
    };
  }
}

/**
 * Issue list with a cap: a file with a million bad lines must not hold a million messages.
 * Past `maxPerSeverity`, issues are only counted and summarised at the end.
 */
export class IssueCollector {
  readonly issues: IngestIssue[] = [];
  #dropped = { error: 0, warning: 0 };
  #kept = { error: 0, warning: 0 };

  constructor(readonly file: string, readonly maxPerSeverity = 50) {}

  /** Number of errors reported so far (kept or dropped). */
  get errorCount(): number {
    return this.#kept.error + this.#dropped.error;
  }

  error(line: number, message: string): void {
    this.#add('error', line, message);
  }

  warning(line: number, message: string): void {
    this.#add('warning', line, message);
  }

  #add(severity: 'error' | 'warning', line: number, message: string): void {
    if (this.#kept[severity] >= this.maxPerSeverity) { this.#dropped[severity]++; return; }
    this.#kept[severity]++;
    this.issues.push({ severity, file: this.file, line, message });
  }

  /** Issues including a summary line per severity that overflowed. */
  finish(lastLine: number): IngestIssue[] {
    for (const severity of ['error', 'warning'] as const) {
      const dropped = this.#dropped[severity];
      if (dropped > 0) {
        this.issues.push({ severity, file: this.file, line: lastLine, message: `${dropped} more ${severity}s like the above were not listed` });
      }
    }
    return this.issues;
  }
}
