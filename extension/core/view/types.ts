import type { Family } from '../frame/types';

/**
 * View models sent to the metric viewer webview. Plain JSON only: numbers, strings, arrays —
 * NaN cannot cross postMessage as JSON, so gaps are `null`.
 */

/** A window the user sees and may drag; epoch ms UTC, inclusive. */
export interface WindowRangeView {
  readonly startMs: number;
  readonly endMs: number;
}

/** One decimated series for a small multiple. `valuesY[i]` is null where the export has a gap. */
export interface SeriesView {
  readonly id: string;
  readonly name: string;
  /** `host=a, service=basket-api` style text; '' when the series has no labels. */
  readonly labelText: string;
  readonly unit: string;
  readonly family: Family;
  readonly timesMs: readonly number[];
  readonly valuesY: readonly (number | null)[];
  /** Points in the export before decimation. */
  readonly sourcePointCount: number;
}

/** Small multiples that belong together: same family and same host/service label. */
export interface SeriesGroupView {
  readonly key: string;
  readonly title: string;
  readonly family: Family;
  readonly series: readonly SeriesView[];
}

/** The verdict header. Text is prepared here so every surface words it the same way. */
export interface VerdictView {
  readonly className: string;
  readonly title: string;
  readonly probability: number;
  readonly probabilityText: string;
  readonly estimativeWord: string;
  readonly runnerUpTitle: string;
  readonly runnerUpProbabilityText: string;
  readonly isAbstained: boolean;
  readonly abstainReason: string;
  readonly caution: string;
}

/** Class probabilities over the whole export, one row per class (decimated in time). */
export interface TimelineView {
  readonly timesMs: readonly number[];
  readonly classNames: readonly string[];
  readonly classTitles: readonly string[];
  /** `probabilities[c][t]`, 0..1; null where no window could be scored. */
  readonly probabilities: readonly (readonly (number | null)[])[];
}

/** One contribution panel: a metric's share of the verdict and its before→during numbers. */
export interface ContributionView {
  readonly id: string;
  readonly rank: number;
  readonly name: string;
  readonly labelText: string;
  readonly family: Family;
  readonly unit: string;
  readonly shapley: number;
  readonly shapleyCi95: number;
  readonly shapleyText: string;
  readonly baselineMedianText: string;
  readonly incidentMedianText: string;
  readonly cliffsDelta: number;
  readonly effectText: string;
  /** The series around the windows only (zoomed), decimated. */
  readonly timesMs: readonly number[];
  readonly valuesY: readonly (number | null)[];
}

/** One past incident of the team's library near the classified window. */
export interface NearestIncidentView {
  readonly label: string;
  /** Cosine similarity of the embeddings, 3 significant digits. */
  readonly similarityText: string;
  /** Workspace-relative path or link of its postmortem; '' when none was recorded. */
  readonly postmortem: string;
  /**
   * Library entry id the webview sends back to open the entry (added for the library links).
   * Absent when the host could not tie the incident to an entry: the item is then plain text.
   */
  readonly entryId?: string;
  /** What the link opens: the postmortem, or the export file when no postmortem was recorded. */
  readonly opensKind?: 'postmortem' | 'export';
  /** The path the link opens, as recorded in the library (shown beside the link). */
  readonly opensPath?: string;
}

/** What the team's incident library says about the verdict; absent when no library was used. */
export interface LibraryView {
  /** "Matches your past incident <label> (n examples)" when a library class won; '' otherwise. */
  readonly matchText: string;
  /** "Moved alike here and in those incidents: a ↑, b ↓" under a match; '' when none. */
  readonly movedAlikeText: string;
  /** Nearest past incidents, nearest first (may be empty). */
  readonly nearest: readonly NearestIncidentView[];
}

/** Everything the webview shows after `init`. */
export interface ViewerModel {
  readonly fileName: string;
  readonly modelVersion: string;
  readonly isTrusted: boolean;
  readonly stepMs: number;
  readonly rangeMs: WindowRangeView;
  readonly incident: WindowRangeView;
  readonly baseline: WindowRangeView;
  readonly groups: readonly SeriesGroupView[];
  readonly verdict: VerdictView;
  readonly timeline: TimelineView;
  readonly contributions: readonly ContributionView[];
  readonly findingId: string;
  readonly notes: readonly string[];
  /** Present when the workspace has an incident library (added for the library flow). */
  readonly library?: LibraryView;
}

/** What changes after the user moves a window: everything below the charts. */
export interface AnalysisUpdateView {
  readonly incident: WindowRangeView;
  readonly baseline: WindowRangeView;
  readonly verdict: VerdictView;
  readonly contributions: readonly ContributionView[];
  readonly findingId: string;
  readonly notes: readonly string[];
  /** Present when the workspace has an incident library (added for the library flow). */
  readonly library?: LibraryView;
}
