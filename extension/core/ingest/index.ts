/** Public surface of the ingest layer. */
export type { ExportFormat, IngestIssue, IngestOptions, IngestResult, RawSeries, SeriesKind } from './types';
export type { ExportReader } from './exportReader';
export { createExportReader, readExportText } from './createExportReader';
export { sniffFormat, type SniffResult } from './sniffFormat';
export { describeReaderIssues } from './describeIssues';
export { formatRfc3339Utc, parseDateTime, inferEpochUnit, convertNanosStringToMs, type EpochUnit } from './timestamps';
