/**
 * `library add`: from an export file to everything an entry needs — the metrics cut to the
 * windows, the bundled model's embedding of the window (the same path as `classify`) and the
 * export's sha256.
 */
import { existsSync } from 'node:fs';
import { basename, join, relative, resolve } from 'node:path';
import { createClassifier } from '../core/model/classifier';
import { formatLibraryModelVersion } from '../core/model/libraryEntry';
import { extractLibraryMetrics, findIndexWindow } from '../core/model/libraryFrame';
import type { LibraryTimeSpan } from '../core/model/libraryTypes';
import type { IndexWindow, MetricFrame } from '../core/frame/types';
import { loadFrame } from '../node/readExport';
import { describeReaderIssues } from '../core/ingest';
import { loadClassifierModel } from '../runtime/onnxRunner';
import type { PreparedEntry } from './library';

/** The bundled model folder: dist/cli.js → ../media/model; under tsx → ../../media/model. */
export function findDefaultModelDir(): string {
  const candidates = [join(__dirname, '..', 'media', 'model'), join(__dirname, '..', '..', 'media', 'model')];
  return candidates.find((c) => existsSync(join(c, 'classifier.json'))) ?? candidates[0];
}

/**
 * Read `exportFile`, cut the window (and the baseline: given, or by default four times the
 * window's length right before it), embed with the bundled model. Throws an Error naming the file
 * and what was expected when the export has no data in the windows.
 */
export async function prepareEntryFromExport(command: { exportFile: string; window: LibraryTimeSpan; baseline?: LibraryTimeSpan; modelDir?: string }, cwd: string): Promise<PreparedEntry> {
  const file = resolve(cwd, command.exportFile);
  const { frame, sha256, result } = await loadFrame(file);
  if (frame.series.length === 0 || frame.timesMs.length < 3) {
    const readerIssues = describeReaderIssues(result.issues);
    throw new Error(`${command.exportFile}: expected at least 3 time steps of a numeric series, got ${frame.timesMs.length} steps of ${frame.series.length} series${readerIssues ? `. ${readerIssues}` : ''}`);
  }
  const window = requireWindow(frame, command.window, 'window', command.exportFile);
  const baseline = command.baseline !== undefined ? requireWindow(frame, command.baseline, 'baseline', command.exportFile) : chooseBaseline(frame, window, command.exportFile);
  const model = await loadClassifierModel(command.modelDir ?? findDefaultModelDir());
  try {
    const verdict = await createClassifier(model.runner, model.spec).classifyWindow(frame, window, baseline);
    if (verdict.usedMetricCount === 0) throw new Error(`${command.exportFile}: ${verdict.abstainReason ?? 'no usable metric in the window'}`);
    const exportFile = relative(cwd, file).startsWith('..') ? basename(file) : relative(cwd, file);
    return {
      window: spanOf(frame, window), baseline: spanOf(frame, baseline), exportSha256: sha256, exportFile,
      modelVersion: formatLibraryModelVersion(model.spec.version, model.sha256), embedding: verdict.embedding,
      metrics: extractLibraryMetrics(frame, window, baseline),
    };
  } finally {
    await model.runner.release();
  }
}

function requireWindow(frame: MetricFrame, span: LibraryTimeSpan, what: string, file: string): IndexWindow {
  const found = findIndexWindow(frame.timesMs, span);
  if (found === undefined) {
    const t = frame.timesMs;
    throw new Error(`${file}: expected the ${what} ${iso(span.startMs)}/${iso(span.endMs)} to hold samples of the export, which covers ${iso(t[0])} to ${iso(t[t.length - 1])}`);
  }
  return found;
}

function chooseBaseline(frame: MetricFrame, window: IndexWindow, file: string): IndexWindow {
  const length = window.endIndex - window.startIndex + 1;
  if (window.startIndex < 3) throw new Error(`${file}: expected at least 3 samples before the window for a baseline, got ${window.startIndex}; pass --baseline START/END`);
  return { startIndex: Math.max(0, window.startIndex - 4 * Math.max(3, length)), endIndex: window.startIndex - 1 };
}

function spanOf(frame: MetricFrame, w: IndexWindow): LibraryTimeSpan {
  return { startMs: frame.timesMs[w.startIndex], endMs: frame.timesMs[w.endIndex] };
}

function iso(ms: number): string {
  return new Date(ms).toISOString();
}
