/**
 * Cumulative counter → per-second rate, as the frame does at inference: a drop is a reset and
 * the increment is the new value (PromQL rate() rule, REFERENCE.md §1.3); a gap bridges to the
 * last value seen within `maxGapSteps` steps, otherwise the rate is unknown (NaN).
 */
export function convertCounterToRates(values: Float64Array, stepMs: number, maxGapSteps = 5): Float64Array {
  const out = new Float64Array(values.length).fill(Number.NaN);
  let lastIndex = -1;
  for (let i = 0; i < values.length; i += 1) {
    const v = values[i] as number;
    if (Number.isNaN(v)) continue;
    if (lastIndex >= 0 && i - lastIndex <= maxGapSteps) {
      const prev = values[lastIndex] as number;
      const delta = v >= prev ? v - prev : v;
      out[i] = delta / (((i - lastIndex) * stepMs) / 1000);
    }
    lastIndex = i;
  }
  return out;
}
