/**
 * `npm run evaluate:detect`: runs suggestWindows on the real labelled cloud series in
 * test/fixtures/nab-cloud (Numenta Anomaly Benchmark subset, MIT licence kept beside it) and
 * prints one row per file plus totals.
 *
 * Rule (stated in the report): the one suggested incident window counts as a HIT for every
 * labelled window it overlaps (at least one shared sample), and as a FALSE window when it overlaps
 * none (also on a file that has no labelled window). Onset error = suggested start − labelled
 * start, in samples, for the overlapped labelled window (negative = early). NAB windows are wide
 * and centred on the labelled anomaly point, so the onset error against that point (listed in
 * labels.csv notes) is reported too.
 */
import { readFileSync } from 'node:fs';
import { join, basename } from 'node:path';
import Papa from 'papaparse';
import type { FrameSeries, MetricFrame } from '../extension/core/frame/types';
import { inferFamily } from '../extension/core/frame/families';
import { suggestWindows } from '../extension/core/detect/suggestWindows';
import type { SuggestWindowsOptions } from '../extension/core/detect/windowTypes';

/** Result for one series file. */
export interface FileEvaluation {
  readonly file: string;
  readonly sampleCount: number;
  readonly labelledCount: number;
  readonly status: string;
  readonly suggested?: { readonly startIndex: number; readonly endIndex: number };
  readonly hitCount: number;
  readonly isFalseWindow: boolean;
  /** Onset errors (samples) for each overlapped labelled window. */
  readonly onsetErrors: readonly number[];
  /** Suggested start − labelled anomaly point (samples), for overlapped windows that list one. */
  readonly pointErrors: readonly number[];
}

/** Totals over all files. */
export interface DetectionEvaluation {
  readonly files: readonly FileEvaluation[];
  readonly labelledWindows: number;
  readonly hits: number;
  readonly falseWindows: number;
  readonly filesWithSuggestion: number;
  readonly medianOnsetErrorSamples: number;
  readonly medianAbsOnsetErrorSamples: number;
  readonly medianPointErrorSamples: number;
}

interface LabelRow { readonly file: string; readonly fault_start: string; readonly fault_end: string; readonly notes: string }

function parseCsv<T>(path: string): T[] {
  const parsed = Papa.parse<T>(readFileSync(path, 'utf8'), { header: true, skipEmptyLines: true });
  if (parsed.errors.length > 0) {
    const e = parsed.errors[0];
    throw new Error(`${path}: CSV error at row ${e.row ?? '?'}: ${e.message}`);
  }
  return parsed.data;
}

/** Reads a two-column wide CSV (timestamp,value) into a one-series MetricFrame. */
export function readNabFrame(path: string): MetricFrame {
  const rows = Papa.parse<string[]>(readFileSync(path, 'utf8'), { skipEmptyLines: true }).data;
  const header = rows[0];
  if (!header || header.length !== 2) throw new Error(`${path}: expected 2 columns in the header, got ${header?.length ?? 0}`);
  const body = rows.slice(1);
  const timesMs = new Float64Array(body.length);
  const values = new Float64Array(body.length);
  body.forEach((r, i) => {
    timesMs[i] = Date.parse(r[0]);
    if (Number.isNaN(timesMs[i])) throw new Error(`${path}: expected an RFC 3339 time at line ${i + 2}, got "${r[0]}"`);
    values[i] = r[1] === '' ? Number.NaN : Number(r[1]);
  });
  const diffs = Array.from(timesMs.subarray(1), (t, i) => t - timesMs[i]).sort((a, b) => a - b);
  const name = header[1];
  const series: FrameSeries = { id: name, name, labels: {}, family: inferFamily(name), kind: 'gauge',
    isConvertedToRate: false, values, gapFraction: 0 };
  return { timesMs, stepMs: diffs[diffs.length >> 1] ?? 0, series: [series], warnings: [], assumptions: [], duplicateCount: 0 };
}

function indexAtOrAfter(timesMs: Float64Array, t: number): number {
  let i = 0;
  while (i < timesMs.length && timesMs[i] < t) i++;
  return i;
}

function median(xs: readonly number[]): number {
  if (xs.length === 0) return Number.NaN;
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[s.length >> 1] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
}

/** Evaluates suggestWindows on every file listed in `<dir>/labels.csv`. */
export function evaluateDetection(dir: string, options: SuggestWindowsOptions = {}): DetectionEvaluation {
  const labels = parseCsv<LabelRow>(join(dir, 'labels.csv'));
  const byFile = new Map<string, LabelRow[]>();
  for (const l of labels) byFile.set(l.file, [...(byFile.get(l.file) ?? []), l]);
  const files: FileEvaluation[] = [];
  for (const [file, rows] of byFile) {
    const frame = readNabFrame(join(dir, file));
    const windows = rows.filter((r) => r.fault_start !== '').map((r) => ({
      start: indexAtOrAfter(frame.timesMs, Date.parse(r.fault_start)),
      end: indexAtOrAfter(frame.timesMs, Date.parse(r.fault_end) + 1) - 1,
      points: (/anomaly point\(s\): ([^;]*)/.exec(r.notes ?? '')?.[1] ?? '').trim().split(/\s+/)
        .filter((t) => t !== '').map((t) => indexAtOrAfter(frame.timesMs, Date.parse(t))),
    }));
    const result = suggestWindows(frame, options);
    const inc = result.incident;
    const overlapped = inc ? windows.filter((w) => inc.startIndex <= w.end && inc.endIndex >= w.start) : [];
    files.push({ file: basename(file), sampleCount: frame.timesMs.length, labelledCount: windows.length,
      status: result.status, suggested: inc && { startIndex: inc.startIndex, endIndex: inc.endIndex },
      hitCount: overlapped.length, isFalseWindow: inc !== undefined && overlapped.length === 0,
      onsetErrors: overlapped.map((w) => (inc as { startIndex: number }).startIndex - w.start),
      pointErrors: overlapped.filter((w) => w.points.length > 0).map((w) => (inc as { startIndex: number }).startIndex - w.points[0]) });
  }
  const errors = files.flatMap((f) => f.onsetErrors);
  return { files, labelledWindows: files.reduce((a, f) => a + f.labelledCount, 0),
    hits: files.reduce((a, f) => a + f.hitCount, 0), falseWindows: files.filter((f) => f.isFalseWindow).length,
    filesWithSuggestion: files.filter((f) => f.suggested).length,
    medianOnsetErrorSamples: median(errors), medianAbsOnsetErrorSamples: median(errors.map(Math.abs)),
    medianPointErrorSamples: median(files.flatMap((f) => f.pointErrors)) };
}

function printReport(e: DetectionEvaluation): void {
  const out = process.stdout;
  out.write(`${'file'.padEnd(62)} ${'n'.padStart(6)} lab  status       suggested        hits onset\n`);
  for (const f of e.files) {
    const sug = f.suggested ? `${f.suggested.startIndex}-${f.suggested.endIndex}` : '-';
    out.write(`${f.file.padEnd(62)} ${String(f.sampleCount).padStart(6)} ${String(f.labelledCount).padStart(3)}  ` +
      `${f.status.padEnd(12)} ${sug.padEnd(16)} ${String(f.hitCount).padStart(4)} ${f.onsetErrors.join(',') || (f.isFalseWindow ? 'FALSE' : '')}\n`);
  }
  out.write(`\nfiles ${e.files.length}, labelled windows ${e.labelledWindows}, suggested windows ${e.filesWithSuggestion}\n`);
  out.write(`hits (labelled windows overlapped by the suggested window): ${e.hits}\n`);
  out.write(`false windows (suggested window overlapping no labelled window): ${e.falseWindows}\n`);
  out.write(`median onset error vs labelled window start: ${e.medianOnsetErrorSamples} samples (median |error| ${e.medianAbsOnsetErrorSamples})\n`);
  out.write(`median onset error vs the labelled anomaly point: ${e.medianPointErrorSamples} samples\n`);
}

if (require.main === module) {
  printReport(evaluateDetection(join(__dirname, '..', 'test', 'fixtures', 'nab-cloud')));
}
