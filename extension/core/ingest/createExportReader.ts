import type { ExportReader } from './exportReader';
import { createLineProtocolReader } from './lineProtocolReader';
import { createLongCsvReader } from './longCsvReader';
import { createOtlpJsonReader } from './otlpJsonReader';
import { createRangeQueryJsonReader } from './rangeQueryJsonReader';
import { sniffFormat } from './sniffFormat';
import type { ExportFormat, IngestResult } from './types';
import { createTextExpositionReader } from './textExpositionReader';
import { createWideCsvReader } from './wideCsvReader';

const FACTORIES: Readonly<Record<ExportFormat, (file: string) => ExportReader>> = {
  'wide-csv': createWideCsvReader,
  'long-csv': createLongCsvReader,
  'range-query-json': createRangeQueryJsonReader,
  'otlp-jsonl': createOtlpJsonReader,
  'line-protocol': createLineProtocolReader,
  'text-exposition': createTextExpositionReader,
};

/**
 * Streaming reader for `format`. The returned reader never throws: an unexpected failure inside a
 * reader (a defect, not bad data) is turned into an error issue naming the file, so one odd export
 * cannot crash the caller. After such a failure further chunks are ignored.
 */
export function createExportReader(format: ExportFormat, file: string): ExportReader {
  const inner = FACTORIES[format](file);
  let failure: string | undefined;
  return {
    push(chunk: string): void {
      if (failure !== undefined) return;
      try { inner.push(chunk); } catch (err) { failure = describeFailure(err); }
    },
    finish(): IngestResult {
      let result: IngestResult;
      try {
        result = inner.finish();
      } catch (err) {
        failure ??= describeFailure(err);
        result = { file, format, series: [], issues: [], assumptions: [] };
      }
      if (failure === undefined) return result;
      const issue = { severity: 'error' as const, file, line: 1, message: `reading stopped by an internal error (please report it): ${failure}` };
      return { ...result, issues: [...result.issues, issue] };
    },
  };
}

function describeFailure(err: unknown): string {
  return err instanceof Error ? `${err.name}: ${err.message}` : String(err);
}

/**
 * Reads a whole export held in memory (tests, small files, pasted text). The format is sniffed
 * from the content (file name as a hint) unless given. Never throws on bad data.
 */
export function readExportText(text: string, file: string, format?: ExportFormat): IngestResult {
  const reader = createExportReader(format ?? sniffFormat(text.slice(0, 65536), file).format, file);
  reader.push(text);
  return reader.finish();
}
