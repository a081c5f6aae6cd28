import { basename } from 'node:path';
import { suggestWindows } from '../core/detect';
import { describeReaderIssues } from '../core/ingest';
import { computeEffectSizes, computeShapley } from '../core/explain';
import type { IndexWindow, MetricFrame } from '../core/frame/types';
import { createClassifier } from '../core/model/classifier';
import { buildFinding } from '../core/report/buildFinding';
import type { ChangePointEntry, Finding, MetricEffect, TimeSpan, VerdictSummary } from '../core/report/types';
import { loadClassifierModel } from '../runtime/onnxRunner';
import { loadFrame } from './readExport';
import { matchLibrary } from '../core/model/libraryMatch';
import { formatLibraryModelVersion } from '../core/model/libraryEntry';
import { readLibraryFile } from './libraryStore';

/** A window in epoch ms UTC, inclusive. */
export interface MsRange {
  readonly startMs: number;
  readonly endMs: number;
}

/** Options of analyzeExport. */
export interface AnalyzeOptions {
  readonly modelDir: string;
  readonly incident?: MsRange;
  readonly baseline?: MsRange;
  readonly onProgress?: (fraction: number, message: string) => void;
  readonly isCancelled?: () => boolean;
  readonly libraryPath?: string;
  /** Shapley sampling budget in ms when there are more than 12 metrics (default 1000). */
  readonly shapleyBudgetMs?: number;
  /** Timeline window length and stride in grid steps (defaults: the classifier's). */
  readonly timelineWindowSteps?: number;
  readonly timelineStrideSteps?: number;
  /** Abstain below this calibrated probability (default: the model's calibrated threshold). */
  readonly abstainThreshold?: number;
  /** Clock for the finding's creation time (tests pass a fixed one). */
  readonly nowMs?: number;
}

/** One analysis of an export: the frame, the finding, the suggested windows and the timeline. */
export interface AnalysisResult {
  readonly frame: MetricFrame;
  readonly finding: Finding;
  readonly suggestion: { readonly incident: TimeSpan; readonly baseline: TimeSpan };
  /** Class probabilities over time, row-major [T, C]; timesMs[t] is the centre of the window point t classified. */
  readonly timeline: { readonly timesMs: Float64Array; readonly classNames: readonly string[]; readonly probabilities: Float32Array };
}

/** Thrown when the analysis cannot go on; the message says what the user can do. */
export class AnalysisError extends Error {}

function toSpan(frame: MetricFrame, w: IndexWindow): TimeSpan {
  return { startIndex: w.startIndex, endIndex: w.endIndex, startMs: frame.timesMs[w.startIndex], endMs: frame.timesMs[w.endIndex] };
}

/** Grid indices covering [startMs, endMs]; an error names the range when it misses the frame. */
export function findIndexWindow(frame: MetricFrame, range: MsRange, what: string): IndexWindow {
  const t = frame.timesMs;
  let startIndex = -1;
  let endIndex = -1;
  for (let i = 0; i < t.length; i++) {
    if (startIndex < 0 && t[i] >= range.startMs) startIndex = i;
    if (t[i] <= range.endMs) endIndex = i;
  }
  if (startIndex < 0 || endIndex < startIndex) {
    throw new AnalysisError(`the ${what} ${new Date(range.startMs).toISOString()}/${new Date(range.endMs).toISOString()} holds no sample of the export (${new Date(t[0]).toISOString()} to ${new Date(t[t.length - 1]).toISOString()})`);
  }
  return { startIndex, endIndex };
}

/**
 * A baseline as long as the incident window (3 samples at least) right before it, or right after it
 * when fewer than 3 samples come before; undefined when neither side holds 3 samples.
 */
function defaultBaseline(frame: MetricFrame, incident: IndexWindow): IndexWindow | undefined {
  const length = Math.max(3, incident.endIndex - incident.startIndex + 1);
  if (incident.startIndex >= 3) return { startIndex: Math.max(0, incident.startIndex - length), endIndex: incident.startIndex - 1 };
  const n = frame.timesMs.length;
  if (n - 1 - incident.endIndex >= 3) return { startIndex: incident.endIndex + 1, endIndex: Math.min(n - 1, incident.endIndex + length) };
  return undefined;
}

function requireBaseline(frame: MetricFrame, incident: IndexWindow): IndexWindow {
  const baseline = defaultBaseline(frame, incident);
  if (baseline) return baseline;
  throw new AnalysisError(`the incident window ${formatSpan(frame, incident)} leaves fewer than 3 samples before and after it for a baseline; expected 3 or more quiet samples to compare it with (give a baseline window, or a shorter incident window)`);
}

function formatSpan(frame: MetricFrame, w: IndexWindow): string {
  return `${new Date(frame.timesMs[w.startIndex]).toISOString()}/${new Date(frame.timesMs[w.endIndex]).toISOString()}`;
}

function chooseWindows(frame: MetricFrame, options: AnalyzeOptions): { incident: IndexWindow; baseline: IndexWindow; suggested: { incident: IndexWindow; baseline: IndexWindow }; caveats: string[]; changePoints: ChangePointEntry[] } {
  const suggestion = suggestWindows(frame);
  const caveats: string[] = [];
  const n = frame.timesMs.length;
  const fallbackIncident = { startIndex: Math.max(0, n - Math.max(3, Math.floor(n / 4))), endIndex: n - 1 };
  const suggestedIncident: IndexWindow = suggestion.incident ?? fallbackIncident;
  const suggestedBaseline = suggestion.baseline ?? defaultBaseline(frame, suggestedIncident);
  // What the suggestion did is said only when the suggestion is what is used.
  if (!options.incident && !suggestion.incident) caveats.push(`No incident window stood out (${suggestion.reason}); the last quarter of the export was used.`);
  if (!options.incident && !options.baseline && suggestion.isBaselineAfterIncident) caveats.push('Nothing quiet came before the incident; the baseline was taken after it.');
  let incident = options.incident ? findIndexWindow(frame, options.incident, 'incident window') : suggestedIncident;
  if (options.incident) caveats.push('The incident window was chosen by hand.');
  if (incident.endIndex - incident.startIndex + 1 < 3) {
    // The classifier needs 3 samples; widen forward (or back at the end of the export) and say so.
    const endIndex = Math.min(n - 1, incident.startIndex + 2);
    incident = { startIndex: Math.max(0, endIndex - 2), endIndex };
    caveats.push('The incident window held fewer than 3 samples and was widened to 3.');
  }
  // The default baseline is placed around the (widened) incident window, so the two never overlap.
  const baseline = options.baseline ? findIndexWindow(frame, options.baseline, 'baseline window')
    : options.incident || !suggestedBaseline ? requireBaseline(frame, incident) : suggestedBaseline;
  const overlap = Math.min(baseline.endIndex, incident.endIndex) - Math.max(baseline.startIndex, incident.startIndex) + 1;
  if (overlap > 0) caveats.push(`The baseline window shares ${overlap} of its ${baseline.endIndex - baseline.startIndex + 1} samples with the incident window, so the changes shown are understated.`);
  // One entry per series (its earliest change), so a metric that keeps shifting does not crowd out the rest.
  const firstPerSeries = new Map<string, (typeof suggestion.changePoints)[number]>();
  for (const c of [...suggestion.changePoints].sort((a, b) => a.timeMs - b.timeMs)) {
    if (!firstPerSeries.has(c.seriesId)) firstPerSeries.set(c.seriesId, c);
  }
  const changePoints = [...firstPerSeries.values()].map((c) => ({
    timeMs: c.timeMs, seriesId: c.seriesId,
    description: `level shift ${c.direction} (robust z ${c.magnitude.toFixed(1)}, ${c.method === 'cusum' ? 'CUSUM' : 'PELT'})`,
  }));
  return { incident, baseline, suggested: { incident: suggestedIncident, baseline: suggestedBaseline ?? baseline }, caveats, changePoints };
}

function slice(values: Float64Array, w: IndexWindow): Float64Array {
  return values.subarray(w.startIndex, w.endIndex + 1);
}

/**
 * The whole job on one export: read it (streamed), build the frame, suggest windows (or use the
 * given ones), classify the incident window, compute the timeline, Shapley values (nodes masked)
 * and effect sizes per metric, and assemble the Finding. Throws AnalysisError (or the reader's
 * error) with a message naming the file and what was expected when the export cannot be used.
 */
export async function analyzeExport(path: string, options: AnalyzeOptions): Promise<AnalysisResult> {
  const progress = options.onProgress ?? (() => undefined);
  progress(0, 'Reading export');
  const loaded = await loadFrame(path, { isCancelled: options.isCancelled, onProgress: (read, total) => progress(0.4 * (total > 0 ? read / total : 0), 'Reading export') });
  const { frame, sha256 } = loaded;
  const readerIssues = describeReaderIssues(loaded.result.issues);
  if (frame.series.length === 0 || frame.timesMs.length < 6) {
    throw new AnalysisError(`${path}: expected at least 6 time steps (3 for a baseline, 3 for the incident window) of at least one numeric series, got ${frame.timesMs.length} steps of ${frame.series.length} series${readerIssues ? `. ${readerIssues}` : ''}`);
  }
  progress(0.4, 'Finding the incident window');
  let windows: ReturnType<typeof chooseWindows>;
  try {
    windows = chooseWindows(frame, options);
  } catch (error) {
    // Window problems name the export they are about.
    throw error instanceof AnalysisError ? new AnalysisError(`${path}: ${error.message}`) : error;
  }
  if (readerIssues) windows.caveats.unshift(readerIssues);
  const model = await loadClassifierModel(options.modelDir);
  const classifier = createClassifier(model.runner, model.spec);
  progress(0.5, 'Classifying');
  const abstainThreshold = options.abstainThreshold ?? model.spec.abstainThreshold;
  const verdict = await classifier.classifyWindow(frame, windows.incident, windows.baseline, { abstainThreshold });
  if (options.isCancelled?.()) throw new AnalysisError('cancelled');
  progress(0.6, 'Timeline');
  // Windows after the incident are compared with the quiet period before it, not with the incident.
  const timelinePoints = await classifier.timeline(frame, { isCancelled: options.isCancelled, windowSteps: options.timelineWindowSteps, strideSteps: options.timelineStrideSteps, excludeFromBaseline: [windows.incident] });
  progress(0.75, 'Explaining');
  const value = classifier.createSubsetValue(frame, windows.incident, windows.baseline, verdict.classIndex);
  const shapley = await computeShapley(frame.series.length, value, { timeBudgetMs: options.shapleyBudgetMs ?? 1000, seed: 1 });
  const effects: MetricEffect[] = frame.series.map((s) => computeEffectSizes(slice(s.values, windows.baseline), slice(s.values, windows.incident)));
  const classNames = model.spec.classes;
  const probabilities = new Float32Array(timelinePoints.length * classNames.length);
  timelinePoints.forEach((p, i) => probabilities.set(p.probabilities, i * classNames.length));
  let summary: VerdictSummary = {
    className: verdict.className, probability: verdict.probability, isAbstained: verdict.isAbstained,
    abstainReason: verdict.abstainReason, runnerUp: verdict.runnerUp,
    probabilities: Object.fromEntries(classNames.map((c, i) => [c, verdict.probabilities[i]])),
  };
  let nearestIncidents: Finding['nearestIncidents'];
  if (options.libraryPath) {
    const library = await readLibraryFile(options.libraryPath);
    const match = matchLibrary(summary.probabilities, verdict.embedding, library.entries, formatLibraryModelVersion(model.spec.version, model.sha256), { frame, incident: windows.incident, baseline: windows.baseline });
    if (match.staleEntryCount > 0) windows.caveats.push(`${match.staleEntryCount} incident-library entries were embedded by another model version and were left out; re-embed the library.`);
    nearestIncidents = match.nearest.map((n) => ({ label: n.label, similarity: n.cosineSimilarity, postmortem: n.postmortem }));
    if (match.verdict.libraryWeight > 0) {
      const v = match.verdict;
      // A library class can win; the abstain state then follows the blended probability.
      const isAbstained = v.probability < abstainThreshold;
      summary = {
        className: v.className, probability: v.probability, runnerUp: v.runnerUp, probabilities: v.probabilities,
        isAbstained, abstainReason: isAbstained ? `blended confidence ${v.probability.toFixed(2)} below ${abstainThreshold}` : undefined,
        libraryMatch: v.libraryMatch,
      };
    }
  }
  const finding = buildFinding({
    frame, verdict: summary, incident: toSpan(frame, windows.incident), baseline: toSpan(frame, windows.baseline),
    shapley: shapley.values, shapleyCi95: shapley.ci95HalfWidth, effects, changePoints: windows.changePoints,
    provenance: {
      exportFile: basename(path), exportSha256: sha256, modelVersion: model.spec.version, modelSha256: model.sha256,
      settings: { shapley: shapley.isExact ? 'exact' : `sampled (${shapley.permutations} permutations)`, abstainThreshold, ...(options.timelineWindowSteps ? { timelineWindowSteps: options.timelineWindowSteps } : {}), ...(options.timelineStrideSteps ? { timelineStrideSteps: options.timelineStrideSteps } : {}) },
    },
    createdMs: options.nowMs ?? Date.now(),
    extraCaveats: windows.caveats,
    nearestIncidents,
  });
  progress(1, 'Done');
  return {
    frame, finding,
    suggestion: { incident: toSpan(frame, windows.suggested.incident), baseline: toSpan(frame, windows.suggested.baseline) },
    // Each point is placed at the centre of the window it classified, so the strip lines up with the
    // incident shading instead of trailing it by half a window.
    timeline: { timesMs: Float64Array.from(timelinePoints.map((p) => frame.timesMs[Math.floor((p.startIndex + p.index) / 2)])), classNames, probabilities },
  };
}
