/**
 * Cumulative counter → per-second rate through the frame's own converter, so training examples
 * see exactly what inference sees (a drop is a reset and the increment is the new value, the
 * PromQL rate() rule; gaps are bridged from the last finite sample).
 */
import { convertCounterToRate } from '../../extension/core/frame/alignSeries';

/** Rates on a regular grid of `stepMs`; the first sample (and leading gaps) have no rate: NaN. */
export function convertCounterToRates(values: Float64Array, stepMs: number): Float64Array {
  return convertCounterToRate(gridTimes(values.length, stepMs), values).rates;
}

/**
 * Grid times 0, stepMs, 2·stepMs, … for at least `length` steps, shared between calls: every
 * counter of an example sits on the same grid, and the converter only reads the times.
 */
let cachedTimesMs = new Float64Array(0);
let cachedStepMs = Number.NaN;
let cachedView = new Float64Array(0);
function gridTimes(length: number, stepMs: number): Float64Array {
  if (stepMs !== cachedStepMs || cachedTimesMs.length < length) {
    cachedTimesMs = new Float64Array(Math.max(length, 1024));
    for (let i = 0; i < cachedTimesMs.length; i += 1) cachedTimesMs[i] = i * stepMs;
    cachedStepMs = stepMs;
    cachedView = cachedTimesMs.subarray(0, length);
  }
  if (cachedView.length !== length) cachedView = cachedTimesMs.subarray(0, length);
  return cachedView;
}
