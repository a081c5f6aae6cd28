import type { SeriesKind } from '../ingest/types';

/** Metric families (DESIGN.md §4). The order is part of the model contract: family id = index. */
export const FAMILIES = [
  'cpu', 'memory', 'disk', 'filesystem', 'network', 'latency',
  'errors', 'traffic', 'saturation', 'runtime', 'other',
] as const;
export type Family = (typeof FAMILIES)[number];

/** One series aligned to the frame's grid. */
export interface FrameSeries {
  readonly id: string;
  readonly name: string;
  readonly labels: Readonly<Record<string, string>>;
  readonly unit?: string;
  readonly family: Family;
  /** Kind as read; counters are already converted to per-second rates in `values`. */
  readonly kind: SeriesKind;
  readonly isConvertedToRate: boolean;
  /** Values on the grid; NaN = gap. Length = frame.timesMs.length. */
  readonly values: Float64Array;
  /** Fraction of grid points that are NaN, 0..1. */
  readonly gapFraction: number;
}

/** All series of one export on one regular time grid. */
export interface MetricFrame {
  /** Grid times, epoch ms UTC, strictly increasing, regular with step `stepMs`. */
  readonly timesMs: Float64Array;
  readonly stepMs: number;
  readonly series: readonly FrameSeries[];
  /** Data caveats to carry into the findings (duplicates resolved, resets, unsorted input...). */
  readonly warnings: readonly string[];
  readonly assumptions: readonly string[];
  readonly duplicateCount: number;
}

/** A window on the frame grid; indices are inclusive. */
export interface IndexWindow {
  readonly startIndex: number;
  readonly endIndex: number;
}
