import type { IngestResult, RawSeries } from '../ingest/types';
import { formatRfc3339Utc } from '../ingest/timestamps';
import { inferFamily } from './families';
import type { FrameSeries, MetricFrame } from './types';
import { applySamplePlan, computeGridIndex, computeMedianStepMs, convertCounterToRate, convertDeltaToRate, median, placeOnGrid, planSamples, type SamplePlan } from './alignSeries';

/** Options for `buildFrame`. */
export interface BuildFrameOptions {
  /** Grid step in ms; default = median of the series' median sampling intervals. */
  readonly stepMs?: number;
  /** Most grid points (time steps) allowed; past it the step is widened (decimation) and a warning says so. Default 2,000,000. */
  readonly maxGridPoints?: number;
  /** Most cells (grid points × series) allowed; past it buildFrame throws a FrameTooLargeError. Default 200,000,000 (1.6 GB of Float64). */
  readonly maxCells?: number;
}

/** Thrown when a frame would not fit in memory even after decimation; the message names sizes. */
export class FrameTooLargeError extends Error {
  override readonly name = 'FrameTooLargeError';
}

/**
 * Aligns every series of an ingest result on one regular grid.
 * - Step: the median of per-series median sampling intervals (or `options.stepMs`); the grid runs
 *   from the earliest to the latest sample. With no or one distinct time, the grid has that many
 *   points and `stepMs` is 0.
 * - Unsorted samples are sorted; duplicate timestamps keep the last value written (counted in
 *   `duplicateCount` once per distinct time array — a duplicated row of a wide CSV counts once —
 *   and warned). Samples with a non-finite time are dropped.
 * - Decimation past `maxGridPoints` keeps the last sample per widened step and warns.
 * - Counters (kind 'counter') become per-second rates with resets handled; 'delta' series become
 *   rates over their interval; both set `isConvertedToRate`. The first point of a rate is a gap.
 * - Gaps stay NaN (one missing grid point between two samples is forward-filled); `gapFraction`
 *   is the NaN share of each series.
 * - Families come from `inferFamily(name, unit, labels)` (a 5xx status-code label reads as errors).
 * @throws FrameTooLargeError when grid points × series exceed `maxCells`.
 */
export function buildFrame(result: IngestResult, options: BuildFrameOptions = {}): MetricFrame {
  const warnings: string[] = [];
  // Wide CSV series share one time array: plan its sorting once and reuse it for every column.
  const plans = new Map<Float64Array, SamplePlan>();
  for (const raw of result.series) if (!plans.has(raw.timesMs)) plans.set(raw.timesMs, planSamples(raw.timesMs));
  const distinct = [...plans.values()];
  const duplicateCount = distinct.reduce((sum, p) => sum + p.duplicateCount, 0);
  const unsortedCount = result.series.filter((raw) => plans.get(raw.timesMs)?.wasUnsorted === true).length;
  const grid = chooseGrid(distinct, options, warnings, result.series.length);
  const gridIndexes = new Map<SamplePlan, Int32Array>();
  const series: FrameSeries[] = result.series.map((raw) => {
    const plan = plans.get(raw.timesMs) as SamplePlan;
    let gridIndex = gridIndexes.get(plan);
    if (gridIndex === undefined) {
      gridIndex = computeGridIndex(plan.timesMs, grid.timesMs.length > 0 ? grid.timesMs[0] : 0, grid.stepMs > 0 ? grid.stepMs : 1);
      gridIndexes.set(plan, gridIndex);
    }
    return alignOne(raw, plan, gridIndex, grid.timesMs.length, warnings);
  });
  if (unsortedCount > 0) warnings.push(`${unsortedCount} series were not in time order and were sorted`);
  if (duplicateCount > 0) warnings.push(`${duplicateCount} duplicate timestamps resolved: the last value written was kept`);
  return { timesMs: grid.timesMs, stepMs: grid.stepMs, series, warnings, assumptions: [...result.assumptions], duplicateCount };
}

interface Grid {
  readonly timesMs: Float64Array;
  readonly stepMs: number;
}

function chooseGrid(all: readonly SamplePlan[], options: BuildFrameOptions, warnings: string[], seriesCount: number): Grid {
  let minMs = Infinity;
  let maxMs = -Infinity;
  const steps: number[] = [];
  for (const s of all) {
    if (s.timesMs.length === 0) continue;
    minMs = Math.min(minMs, s.timesMs[0]);
    maxMs = Math.max(maxMs, s.timesMs[s.timesMs.length - 1]);
    const step = computeMedianStepMs(s.timesMs);
    if (Number.isFinite(step)) steps.push(step);
  }
  if (minMs === Infinity) return { timesMs: new Float64Array(0), stepMs: 0 };
  // Series of one sample each (one per time) have no step of their own: take it from all their times.
  if (steps.length === 0) {
    const union = Float64Array.from(new Set(all.flatMap((s) => Array.from(s.timesMs)))).sort();
    const step = computeMedianStepMs(union);
    if (Number.isFinite(step)) steps.push(step);
  }
  let stepMs = options.stepMs ?? median(steps);
  if (!(stepMs > 0)) return { timesMs: Float64Array.of(minMs), stepMs: 0 };
  const maxGridPoints = options.maxGridPoints ?? 2_000_000;
  let length = Math.floor((maxMs - minMs) / stepMs) + 1;
  if (length > maxGridPoints) {
    const factor = Math.ceil(length / maxGridPoints);
    warnings.push(`grid of ${length} points exceeds ${maxGridPoints}: step widened ${factor}× to ${stepMs * factor} ms (decimated, last sample per step kept)`);
    stepMs *= factor;
    length = Math.floor((maxMs - minMs) / stepMs) + 1;
  }
  const maxCells = options.maxCells ?? 200_000_000;
  if (length * seriesCount > maxCells) {
    throw new FrameTooLargeError(`expected at most ${maxCells} grid cells, got ${length} points × ${seriesCount} series from ${formatRfc3339Utc(minMs)} to ${formatRfc3339Utc(maxMs)}; choose a shorter time range or fewer series`);
  }
  const timesMs = new Float64Array(length);
  for (let k = 0; k < length; k++) timesMs[k] = minMs + k * stepMs;
  return { timesMs, stepMs };
}

function alignOne(raw: RawSeries, plan: SamplePlan, gridIndex: Int32Array, length: number, warnings: string[]): FrameSeries {
  let values = applySamplePlan(plan, raw.values);
  let isConvertedToRate = false;
  if (raw.kind === 'counter') {
    const startTimesMs = raw.startTimesMs === undefined ? undefined : applySamplePlan(plan, raw.startTimesMs);
    const { rates, resetCount } = convertCounterToRate(plan.timesMs, values, startTimesMs);
    values = rates;
    isConvertedToRate = true;
    if (resetCount > 0) warnings.push(`${raw.id}: ${resetCount} counter reset(s) handled (increase taken from zero)`);
  } else if (raw.kind === 'delta') {
    values = convertDeltaToRate(plan.timesMs, values);
    isConvertedToRate = true;
  }
  const onGrid = placeOnGrid(gridIndex, values, length);
  let gapCount = 0;
  for (let k = 0; k < onGrid.length; k++) if (Number.isNaN(onGrid[k])) gapCount++;
  return {
    id: raw.id,
    name: raw.name,
    labels: raw.labels,
    unit: isConvertedToRate ? `${raw.unit ?? '1'}/s` : raw.unit,
    family: inferFamily(raw.name, raw.unit, raw.labels),
    kind: raw.kind,
    isConvertedToRate,
    values: onGrid,
    gapFraction: onGrid.length === 0 ? 1 : gapCount / onGrid.length,
  };
}
