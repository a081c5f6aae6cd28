import type { Family } from '../../extension/core/frame/types';
import type { FaultClass, MetricWindow } from '../../extension/core/model/types';

/** Built-in classes plus fault signatures held out from the bundled model (few-shot evaluation). */
export type HeldOutClass = 'connection_pool_exhaustion' | 'cpu_steal_noisy_neighbour';
export type SimClass = FaultClass | HeldOutClass;

export type NamingStyle = 'dotted' | 'snake_total' | 'free_text';

/** One simulated series as an export would hold it (counters cumulative). */
export interface SimSeries {
  readonly name: string;
  readonly labels: Readonly<Record<string, string>>;
  readonly unit?: string;
  readonly kind: 'gauge' | 'counter';
  /** The simulator's own truth, for checks only; models see inferFamily(name, unit, labels). */
  readonly trueFamily: Family;
  /** Catalogue role (what the metric measures, e.g. `cpuUtil`, `serverLatency`); simulator truth. */
  readonly role?: string;
  /** Raw values on the system grid; NaN = gap; counters are cumulative and may reset. */
  readonly values: Float64Array;
}

export interface SimIncident {
  readonly label: SimClass;
  /** Inclusive grid indices. */
  readonly startIndex: number;
  readonly endIndex: number;
}

/** A whole simulated system: one invented service of the invented company, on one grid. */
export interface SimSystem {
  readonly id: string;
  readonly seed: number;
  readonly namingStyle: NamingStyle;
  readonly stepMs: number;
  readonly timesMs: Float64Array;
  readonly series: readonly SimSeries[];
  readonly incidents: readonly SimIncident[];
}

/** One labelled classifier example: per-metric baseline + window, counters already as rates. */
export interface TrainingExample {
  readonly label: SimClass;
  readonly systemId: string;
  readonly metrics: readonly MetricWindow[];
  /** Simulator truth per metric (same order as `metrics`), for checks and analysis only. */
  readonly truth?: readonly MetricTruth[];
  /** Grid step of the system the example came from. */
  readonly stepMs?: number;
  readonly namingStyle?: NamingStyle;
  /** Fault examples: how far the fault moved the most-moved exported metric, in baseline noise units. */
  readonly faultEvidence?: number;
}

/** What the simulator knows about one metric of an example; never a model input. */
export interface MetricTruth {
  readonly role: string;
  readonly trueFamily: Family;
  /** True when the export held a cumulative counter (the example holds its per-second rate). */
  readonly isCounter: boolean;
  /** Metric name without labels, and unit as exported (inference sees these two). */
  readonly name: string;
  readonly unit?: string;
  /** Labels as exported (inference reads a status-code label too). */
  readonly labels?: Readonly<Record<string, string>>;
}
