import type { Family } from '../frame/types';

/** A window in time, for reports and the webview (epoch ms UTC, inclusive grid indices). */
export interface TimeSpan {
  readonly startIndex: number;
  readonly endIndex: number;
  readonly startMs: number;
  readonly endMs: number;
}

/** Verdict of the bundled classifier (blended with the incident library when one is given). */
export interface VerdictSummary {
  /** Winning class name (built-in class or an incident-library label). */
  readonly className: string;
  /** Calibrated probability of the winning class, 0..1. */
  readonly probability: number;
  readonly runnerUp: { readonly className: string; readonly probability: number };
  /** True when the model declines to call it (low confidence or out of distribution). */
  readonly isAbstained: boolean;
  readonly abstainReason?: string;
  /** Calibrated probability per class. */
  readonly probabilities: Readonly<Record<string, number>>;
  /** Set when an incident-library class won: label and number of examples behind it. */
  readonly libraryMatch?: {
    readonly label: string;
    readonly exampleCount: number;
    /** Metrics (series ids) that moved alike in this window and in that label's incidents, strongest first. */
    readonly movedAlike?: readonly { readonly id: string; readonly direction: 'up' | 'down' }[];
  };
}

/** Baseline-vs-incident effect sizes of one metric. */
export interface MetricEffect {
  readonly baselineMedian: number;
  readonly incidentMedian: number;
  readonly robustZ: number;
  readonly hodgesLehmann: number;
  readonly cliffsDelta: number;
  readonly ksD: number;
  /** Indicative only: samples are autocorrelated. */
  readonly mannWhitneyP: number;
}

/** One metric's contribution to the verdict. */
export interface MetricContribution {
  readonly id: string;
  readonly name: string;
  readonly labels: Readonly<Record<string, string>>;
  readonly unit?: string;
  readonly family: Family;
  readonly shapley: number;
  readonly shapleyCi95: number;
  readonly effect: MetricEffect;
  /** A few values across baseline+incident for an inline trend (sparkline). */
  readonly trend: readonly number[];
}

export interface ChangePointEntry {
  readonly timeMs: number;
  readonly seriesId: string;
  readonly description: string;
}

export interface Provenance {
  readonly exportFile: string;
  readonly exportSha256: string;
  readonly modelVersion: string;
  readonly modelSha256: string;
  readonly settings: Readonly<Record<string, string | number | boolean>>;
}

/** Everything the postmortem block says, as data. */
export interface Finding {
  /** Stable id: the same export + window gives the same id, so re-running replaces the block. */
  readonly id: string;
  readonly createdMs: number;
  readonly verdict: VerdictSummary;
  readonly incident: TimeSpan;
  readonly baseline: TimeSpan;
  readonly stepMs: number;
  readonly metrics: readonly MetricContribution[];
  readonly changePoints: readonly ChangePointEntry[];
  readonly caveats: readonly string[];
  readonly openQuestions: readonly string[];
  readonly provenance: Provenance;
  readonly nearestIncidents?: readonly { readonly label: string; readonly similarity: number; readonly postmortem?: string }[];
}
