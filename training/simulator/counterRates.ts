/**
 * Cumulative counter → per-second rate through the frame's own converter, so training examples
 * see exactly what inference sees (a drop is a reset and the increment is the new value, the
 * PromQL rate() rule; gaps are bridged from the last finite sample).
 */
import { convertCounterToRate } from '../../extension/core/frame/alignSeries';

/** Rates on a regular grid of `stepMs`; the first sample (and leading gaps) have no rate: NaN. */
export function convertCounterToRates(values: Float64Array, stepMs: number): Float64Array {
  const timesMs = new Float64Array(values.length);
  for (let i = 0; i < values.length; i += 1) timesMs[i] = i * stepMs;
  return convertCounterToRate(timesMs, values).rates;
}
