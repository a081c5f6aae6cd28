/**
 * Moves an incident's start back to the CUSUM onset estimate (Montgomery §9.1: onset = signal − N + 1)
 * of the metrics that carry it. A threshold on |z| fires late on ramps (a leak crosses 3.5σ long
 * after it began); the CUSUM chain of same-direction shifts leading into the window dates it.
 */
import type { IndexWindow } from '../frame/types';
import { computeMedian } from './robustStats';
import { detectSequentialShifts } from './tabularCusum';

/** Largest gap (steps) between one shift's signal and the next shift's onset within a chain. */
const CHAIN_GAP_STEPS = 2;

/**
 * Onset of one metric: the earliest onset of the unbroken chain of same-direction CUSUM shifts
 * (k = 0.5, h = 5 in z units) that reaches the incident start, scanning at most `lookbackSteps`
 * before it. Undefined when no shift in `direction` signals by start + 2.
 */
export function findMetricOnset(z: Float64Array, startIndex: number, lookbackSteps: number, direction: 'up' | 'down'): number | undefined {
  const lo = Math.max(0, startIndex - lookbackSteps);
  const hi = Math.min(z.length, startIndex + 3);
  const shifts = detectSequentialShifts(z.subarray(lo, hi), { targetMean: 0, sigma: 1, k: 0.5, h: 5 })
    .map((s) => ({ ...s, onsetIndex: s.onsetIndex + lo, signalIndex: s.signalIndex + lo }));
  let k = shifts.length - 1;
  while (k >= 0 && shifts[k].direction !== direction) k--;
  if (k < 0) return undefined;
  let onset = shifts[k].onsetIndex;
  for (let j = k - 1; j >= 0; j--) {
    if (shifts[j].direction !== direction || onset - shifts[j].signalIndex > CHAIN_GAP_STEPS) break;
    onset = shifts[j].onsetIndex;
  }
  return onset;
}

/**
 * Refined start index: the median onset over the metrics whose median |z| in the window is ≥
 * `minAbsZ` (direction = sign of that median), never later than the current start nor earlier than
 * one window length before it. Returns the current start when no metric gives an onset.
 */
export function refineOnsetIndex(zs: readonly Float64Array[], window: IndexWindow, minAbsZ: number): number {
  const length = window.endIndex - window.startIndex + 1;
  const onsets: number[] = [];
  for (const z of zs) {
    const level = computeMedian(z.subarray(window.startIndex, window.endIndex + 1));
    if (!(Math.abs(level) >= minAbsZ)) continue;
    const onset = findMetricOnset(z, window.startIndex, length, level > 0 ? 'up' : 'down');
    if (onset !== undefined) onsets.push(onset);
  }
  if (onsets.length === 0) return window.startIndex;
  return Math.max(window.startIndex - length, Math.min(window.startIndex, Math.round(computeMedian(onsets))));
}
