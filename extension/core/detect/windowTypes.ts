import type { Family, IndexWindow } from '../frame/types';
import type { ReferenceMethod } from './robustDeviation';

/** A window on the frame grid with its times; edges are uncertain by ± one step. */
export interface SuggestedWindow extends IndexWindow {
  /** Epoch ms UTC of the first and last sample (inclusive). */
  readonly startMs: number;
  readonly endMs: number;
  /** Edge uncertainty: one sampling interval, in steps (always 1) and in ms (= stepMs). */
  readonly uncertaintySteps: number;
  readonly uncertaintyMs: number;
}

/** A candidate incident segment and how strongly the metrics agree on it. */
export interface IncidentCandidate extends SuggestedWindow {
  /** Sum of the consensus score over the segment (larger = stronger and longer). */
  readonly score: number;
  /** Largest consensus score inside the segment. */
  readonly peakConsensus: number;
}

/** One change point for the report's timeline. */
export interface ChangePointEvent {
  /** Epoch ms UTC of the estimated onset. */
  readonly timeMs: number;
  readonly index: number;
  /** Series id, or CONSENSUS_SERIES_ID for the pooled score. */
  readonly seriesId: string;
  readonly direction: 'up' | 'down';
  /** Size of the change in robust z units (new level vs the metric's reference). */
  readonly magnitude: number;
  readonly method: 'cusum' | 'pelt';
}

/** How one series was scored. */
export interface SeriesDeviationSummary {
  readonly seriesId: string;
  readonly family: Family;
  readonly referenceMethod: ReferenceMethod;
  readonly periodSteps?: number;
  /** Largest |robust z| inside the suggested incident (0 when there is none). */
  readonly peakAbsZInIncident: number;
}

/** Result of suggestWindows. Never thrown: problems are reported through status and reason. */
export interface WindowSuggestion {
  readonly status: 'ok' | 'no-incident' | 'insufficient-data';
  /** Human-readable explanation, e.g. why there is no window or which baseline rule applied. */
  readonly reason: string;
  readonly incident?: IncidentCandidate;
  readonly baseline?: SuggestedWindow;
  /** True when nothing quiet fitted before the incident and the baseline was taken after it. */
  readonly isBaselineAfterIncident: boolean;
  /** Best segments by score, strongest first (the incident is candidates[0]). */
  readonly candidates: readonly IncidentCandidate[];
  /** Consensus score per step (pooled per family); length = frame length. */
  readonly consensus: Float64Array;
  readonly changePoints: readonly ChangePointEvent[];
  readonly series: readonly SeriesDeviationSummary[];
}

/** Tuning of suggestWindows; defaults in DEFAULT_WINDOW_OPTIONS. */
export interface SuggestWindowsOptions {
  /** |z| below this counts as normal noise (Leys et al. 2013 moderately conservative cut). */
  readonly zFloor?: number;
  /** |z| is capped here so one wild metric cannot outweigh the rest. */
  readonly zCap?: number;
  /** A step is abnormal when the consensus score reaches this. */
  readonly consensusThreshold?: number;
  /**
   * Abnormal runs separated by at most this many normal steps merge. Default 1: wider gaps chained
   * noise bursts into series-long windows on the labelled cloud data (training/evaluateDetection.ts).
   */
  readonly mergeGapSteps?: number;
  /** Frames shorter than this give status 'insufficient-data'. */
  readonly minSamples?: number;
  readonly isSeasonalEnabled?: boolean;
  readonly maxTimelineEntries?: number;
  readonly candidateCount?: number;
}

/** Defaults of SuggestWindowsOptions. */
export const DEFAULT_WINDOW_OPTIONS = {
  zFloor: 2.5, zCap: 10, consensusThreshold: 1, minSamples: 8, isSeasonalEnabled: true,
  maxTimelineEntries: 40, candidateCount: 5, mergeGapSteps: 1,
} as const;

/** seriesId used for change points of the pooled consensus score. */
export const CONSENSUS_SERIES_ID = '(all metrics)';
