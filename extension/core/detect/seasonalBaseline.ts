/**
 * Seasonal baseline: the expected value at t is the median of the same phase in other periods
 * (the same time on previous days or weeks), so daily peaks are not flagged as incidents
 * (REFERENCE.md §4.1, "compare with the same time last day/week").
 */
import { computeMad, computeMedian } from './robustStats';

/** Candidate periods, shortest first: one day and one week, in ms. */
export const SEASON_CANDIDATES_MS: readonly number[] = [86_400_000, 604_800_000];

/** A chosen seasonal period. */
export interface SeasonPeriod {
  readonly periodSteps: number;
  readonly periodMs: number;
  /** MAD of the seasonal residual divided by the MAD around the plain median (< 1 = it helps). */
  readonly scaleRatio: number;
  /** The seasonal baseline for this period (computeSeasonalBaseline), so callers need not redo it. */
  readonly expected: Float64Array;
}

/** Median of the first `count` entries of a small scratch buffer (sorted in place). */
function computeSmallMedian(buf: Float64Array, count: number): number {
  for (let i = 1; i < count; i++) {
    const v = buf[i];
    let j = i - 1;
    while (j >= 0 && buf[j] > v) { buf[j + 1] = buf[j]; j--; }
    buf[j + 1] = v;
  }
  return count % 2 === 1 ? buf[count >> 1] : (buf[count / 2 - 1] + buf[count / 2]) / 2;
}

/**
 * Expected value per step: the median of x[t − k·P] for k = 1..maxPeriods (non-NaN only). Where
 * fewer than two previous periods exist (the start of the series), the nearest following periods
 * fill in, so every step of a series spanning ≥ 3 periods gets a baseline from ≥ 2 other periods.
 * Steps with fewer than 2 usable samples get NaN. `periodSteps` must be ≥ 1.
 */
export function computeSeasonalBaseline(values: ArrayLike<number>, periodSteps: number, maxPeriods = 4): Float64Array {
  if (!(periodSteps >= 1)) throw new Error(`seasonal baseline: expected periodSteps ≥ 1, got ${periodSteps}`);
  const n = values.length;
  const out = new Float64Array(n);
  const buf = new Float64Array(2 * maxPeriods);
  for (let t = 0; t < n; t++) {
    let count = 0;
    for (let k = 1; k <= maxPeriods; k++) {
      const j = t - k * periodSteps;
      if (j < 0) break;
      const v = values[j];
      if (!Number.isNaN(v)) buf[count++] = v;
    }
    for (let k = 1; count < 2 && k <= maxPeriods; k++) {
      const j = t + k * periodSteps;
      if (j >= n) break;
      const v = values[j];
      if (!Number.isNaN(v)) buf[count++] = v;
    }
    out[t] = count >= 2 ? computeSmallMedian(buf, count) : Number.NaN;
  }
  return out;
}

/**
 * Picks a daily or weekly period when the data span at least 3 periods (so each step has ≥ 2
 * others to compare with), the period is ≥ 4 steps, and the seasonal residual's MAD is below
 * `maxScaleRatio` (default 0.8) of the MAD around the plain median, i.e. the cycle is real.
 * Returns undefined otherwise (also for stepMs ≤ 0, or constant/empty series).
 */
export function chooseSeasonPeriod(values: ArrayLike<number>, stepMs: number, maxScaleRatio = 0.8): SeasonPeriod | undefined {
  if (!(stepMs > 0)) return undefined;
  const plainMad = computeMad(values);
  if (!(plainMad > 0)) return undefined;
  let best: SeasonPeriod | undefined;
  for (const periodMs of SEASON_CANDIDATES_MS) {
    const periodSteps = Math.round(periodMs / stepMs);
    if (periodSteps < 4 || values.length < 3 * periodSteps) continue;
    const expected = computeSeasonalBaseline(values, periodSteps);
    const residual = computeSeasonalResidual(values, expected);
    const scaleRatio = computeMad(residual, computeMedian(residual)) / plainMad;
    if (scaleRatio < maxScaleRatio && (!best || scaleRatio < best.scaleRatio)) best = { periodSteps, periodMs, scaleRatio, expected };
  }
  return best;
}

/** x − expected, elementwise; NaN where either is NaN. */
export function computeSeasonalResidual(values: ArrayLike<number>, expected: ArrayLike<number>): Float64Array {
  const out = new Float64Array(values.length);
  for (let i = 0; i < values.length; i++) out[i] = values[i] - expected[i];
  return out;
}
