/** Formats the ingest layer recognises. */
export type ExportFormat = 'wide-csv' | 'long-csv' | 'range-query-json' | 'otlp-jsonl' | 'line-protocol' | 'text-exposition';

/** How a series accumulates: gauges are levels; counters are cumulative totals (become rates). */
export type SeriesKind = 'gauge' | 'counter' | 'delta' | 'histogram';

/** One series as read from an export, before alignment to a shared grid. */
export interface RawSeries {
  /** Stable identity: name plus sorted labels, e.g. `http_requests_total{code="500",host="a"}`. */
  readonly id: string;
  readonly name: string;
  readonly labels: Readonly<Record<string, string>>;
  /** Unit as written by the source (OTLP unit, a name suffix, a header annotation); undefined if unknown. */
  readonly unit?: string;
  readonly kind: SeriesKind;
  /** Sample times, epoch milliseconds UTC (may be unsorted and contain duplicates as read). */
  readonly timesMs: Float64Array;
  /** Sample values; NaN = gap (no recorded value). */
  readonly values: Float64Array;
  /**
   * Start of each cumulative point's accumulation, epoch ms (OTLP `startTimeUnixNano`), aligned
   * with `timesMs`; NaN where unknown. A later start time marks a counter reset even when the
   * value did not drop. Absent for formats that do not carry it.
   */
  readonly startTimesMs?: Float64Array;
}

/** A problem found while reading; `line` is 1-based (record number for JSON documents). */
export interface IngestIssue {
  readonly severity: 'error' | 'warning';
  readonly file: string;
  readonly line: number;
  readonly message: string;
}

/** Result of reading one export; readers never throw on bad data, they report issues. */
export interface IngestResult {
  readonly file: string;
  readonly format: ExportFormat;
  readonly series: readonly RawSeries[];
  readonly issues: readonly IngestIssue[];
  /** Things assumed and shown to the user, e.g. "naive timestamps read as UTC", "epoch unit: ms". */
  readonly assumptions: readonly string[];
}

/** Progress and cancellation for streamed reads. */
export interface IngestOptions {
  readonly onProgress?: (bytesRead: number, totalBytes: number) => void;
  readonly isCancelled?: () => boolean;
}
