import type { FrameSeries, MetricFrame } from '../frame/types';
import type { Finding, TimeSpan, VerdictSummary } from '../report/types';
import { describeProbability } from '../report/estimativeWords';
import { decimateMinMax, findIndexRange } from './decimateSeries';
import { CAUTION_TEXT, describeCliffsDelta, formatClassTitle, formatLabels, formatPercent, formatValue } from './formatView';
import type {
  AnalysisUpdateView, ContributionView, SeriesGroupView, TimelineView, VerdictView, ViewerModel, WindowRangeView,
} from './types';

/** Class probabilities over time as the analysis returns them: row-major [T, C]. */
export interface TimelineInput {
  readonly timesMs: ArrayLike<number>;
  readonly classNames: readonly string[];
  readonly probabilities: ArrayLike<number>;
}

/** Sizes of what is sent to the webview; the defaults keep a 100×10,000 export under ~2 MB. */
export interface ViewBudget {
  /** Min-max buckets per small multiple (≤ 2 points each, plus gap markers). */
  readonly bucketsPerSeries: number;
  readonly bucketsPerContribution: number;
  readonly timelinePoints: number;
}

export const DEFAULT_VIEW_BUDGET: ViewBudget = { bucketsPerSeries: 300, bucketsPerContribution: 120, timelinePoints: 400 };

/** Labels that name where a series comes from, in the order they are preferred for grouping. */
const ORIGIN_LABELS = ['service', 'service_name', 'service.name', 'job', 'host', 'host_name', 'host.name', 'instance', 'pod', 'container'];

/** `service=basket-api` for the first origin label present, '' when the series has none. */
export function findOriginLabel(labels: Readonly<Record<string, string>>): string {
  for (const key of ORIGIN_LABELS) {
    if (labels[key] !== undefined && labels[key] !== '') return `${key}=${labels[key]}`;
  }
  return '';
}

/**
 * Small multiples grouped by family, then by origin label (service/host…). Groups keep the
 * family order of FAMILIES-as-met and series order of the frame; an empty frame gives [].
 */
export function buildSeriesGroups(frame: MetricFrame, budget: ViewBudget = DEFAULT_VIEW_BUDGET): SeriesGroupView[] {
  const groups = new Map<string, { family: FrameSeries['family']; origin: string; series: FrameSeries[] }>();
  for (const series of frame.series) {
    const origin = findOriginLabel(series.labels);
    const key = `${series.family}|${origin}`;
    const group = groups.get(key) ?? { family: series.family, origin, series: [] };
    group.series.push(series);
    groups.set(key, group);
  }
  return Array.from(groups.entries()).map(([key, group]) => ({
    key,
    title: group.origin ? `${group.family} · ${group.origin}` : group.family,
    family: group.family,
    series: group.series.map((s) => {
      const decimated = decimateMinMax(frame.timesMs, s.values, budget.bucketsPerSeries);
      return {
        id: s.id, name: s.name, labelText: formatLabels(s.labels), unit: s.unit ?? '', family: s.family,
        timesMs: decimated.timesMs, valuesY: decimated.valuesY, sourcePointCount: frame.timesMs.length,
      };
    }),
  }));
}

/** Header text of a verdict: title, calibrated probability, Kent word, runner-up, abstain state. */
export function buildVerdictView(verdict: VerdictSummary): VerdictView {
  return {
    className: verdict.className,
    title: verdict.isAbstained ? 'Not sure — no class is clear enough' : formatClassTitle(verdict.className),
    probability: verdict.probability,
    probabilityText: formatPercent(verdict.probability),
    estimativeWord: describeProbability(verdict.probability),
    runnerUpTitle: formatClassTitle(verdict.runnerUp.className),
    runnerUpProbabilityText: formatPercent(verdict.runnerUp.probability),
    isAbstained: verdict.isAbstained,
    abstainReason: verdict.abstainReason ?? '',
    caution: CAUTION_TEXT,
  };
}

/**
 * The probability strip: bucket means of each class over time, at most `points` buckets.
 * NaN probabilities are skipped; a bucket with none gives null. Empty input gives empty rows.
 */
export function buildTimelineView(timeline: TimelineInput, points = DEFAULT_VIEW_BUDGET.timelinePoints): TimelineView {
  const stepCount = timeline.timesMs.length;
  const classCount = timeline.classNames.length;
  if (timeline.probabilities.length !== stepCount * classCount) {
    throw new Error(`expected ${stepCount}×${classCount} timeline probabilities, got ${timeline.probabilities.length}`);
  }
  const buckets = Math.max(1, Math.min(points, stepCount));
  const timesMs: number[] = [];
  const rows: (number | null)[][] = timeline.classNames.map(() => []);
  for (let b = 0; b < buckets && stepCount > 0; b++) {
    const from = Math.floor((b * stepCount) / buckets);
    const to = Math.max(from + 1, Math.floor(((b + 1) * stepCount) / buckets));
    timesMs.push(timeline.timesMs[from]);
    for (let c = 0; c < classCount; c++) {
      let sum = 0;
      let count = 0;
      for (let t = from; t < to; t++) {
        const p = timeline.probabilities[t * classCount + c];
        if (Number.isFinite(p)) { sum += p; count++; }
      }
      rows[c].push(count > 0 ? sum / count : null);
    }
  }
  return { timesMs, classNames: [...timeline.classNames], classTitles: timeline.classNames.map(formatClassTitle), probabilities: rows };
}

/**
 * One panel per metric of the finding, sorted by Shapley value (largest first; ties by name).
 * The chart is zoomed on baseline ∪ incident plus a quarter of that span either side.
 * Metrics missing from the frame still get a panel, with an empty chart.
 */
export function buildContributionViews(frame: MetricFrame, finding: Finding, budget: ViewBudget = DEFAULT_VIEW_BUDGET): ContributionView[] {
  const byId = new Map(frame.series.map((s) => [s.id, s]));
  const startMs = Math.min(finding.baseline.startMs, finding.incident.startMs);
  const endMs = Math.max(finding.baseline.endMs, finding.incident.endMs);
  const padMs = (endMs - startMs) / 4;
  const range = findIndexRange(frame.timesMs, startMs - padMs, endMs + padMs);
  const sorted = [...finding.metrics].sort((a, b) => b.shapley - a.shapley || a.name.localeCompare(b.name));
  return sorted.map((metric, index) => {
    const series = byId.get(metric.id);
    const decimated = series
      ? decimateMinMax(frame.timesMs, series.values, budget.bucketsPerContribution, range.from, range.to)
      : { timesMs: [], valuesY: [] };
    const unit = metric.unit ?? '';
    return {
      id: metric.id, rank: index + 1, name: metric.name, labelText: formatLabels(metric.labels), family: metric.family, unit,
      shapley: metric.shapley, shapleyCi95: metric.shapleyCi95,
      shapleyText: `${metric.shapley >= 0 ? '+' : '−'}${Math.abs(metric.shapley).toFixed(3)} ± ${metric.shapleyCi95.toFixed(3)}`,
      baselineMedianText: formatValue(metric.effect.baselineMedian, unit),
      incidentMedianText: formatValue(metric.effect.incidentMedian, unit),
      cliffsDelta: metric.effect.cliffsDelta,
      effectText: describeCliffsDelta(metric.effect.cliffsDelta),
      timesMs: decimated.timesMs, valuesY: decimated.valuesY,
    };
  });
}

function toRange(span: TimeSpan): WindowRangeView {
  return { startMs: span.startMs, endMs: span.endMs };
}

/** Data caveats and open questions shown under the verdict, caveats first. */
function buildNotes(finding: Finding): string[] {
  return [...finding.caveats, ...finding.openQuestions.map((q) => `Open question: ${q}`)];
}

/** What changes after a re-classification: windows, verdict, contributions, notes. */
export function buildAnalysisUpdate(frame: MetricFrame, finding: Finding, budget: ViewBudget = DEFAULT_VIEW_BUDGET): AnalysisUpdateView {
  return {
    incident: toRange(finding.incident),
    baseline: toRange(finding.baseline),
    verdict: buildVerdictView(finding.verdict),
    contributions: buildContributionViews(frame, finding, budget),
    findingId: finding.id,
    notes: buildNotes(finding),
  };
}

/** The full `init` model. An empty frame gives a zero-length range at 0 and no groups. */
export function buildViewerModel(input: {
  readonly fileName: string;
  readonly isTrusted: boolean;
  readonly frame: MetricFrame;
  readonly finding: Finding;
  readonly timeline: TimelineInput;
  readonly budget?: ViewBudget;
}): ViewerModel {
  const budget = input.budget ?? DEFAULT_VIEW_BUDGET;
  const times = input.frame.timesMs;
  return {
    fileName: input.fileName,
    modelVersion: input.finding.provenance.modelVersion,
    isTrusted: input.isTrusted,
    stepMs: input.frame.stepMs,
    rangeMs: { startMs: times.length ? times[0] : 0, endMs: times.length ? times[times.length - 1] : 0 },
    groups: buildSeriesGroups(input.frame, budget),
    timeline: buildTimelineView(input.timeline, budget.timelinePoints),
    ...buildAnalysisUpdate(input.frame, input.finding, budget),
  };
}
