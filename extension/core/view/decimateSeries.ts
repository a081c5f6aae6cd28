/** A decimated series: parallel arrays, `valuesY` null where the source has a gap. */
export interface DecimatedSeries {
  readonly timesMs: number[];
  readonly valuesY: (number | null)[];
}

/**
 * Min-max decimation (common practice for line charts; chart.js ships the same idea as its
 * 'min-max' decimation algorithm): the index range [from, to) is cut into `bucketCount` equal
 * buckets and each bucket keeps its minimum and maximum in time order, so spikes survive.
 * A bucket holding any gap also emits one null point, so a gap stays visible as a break.
 * Returns at most 3 points per bucket; when the range is already small it is copied as is.
 * Empty ranges give empty arrays; bucketCount < 1 is treated as 1.
 */
export function decimateMinMax(
  timesMs: ArrayLike<number>,
  values: ArrayLike<number>,
  bucketCount: number,
  from = 0,
  to = values.length,
): DecimatedSeries {
  const start = Math.max(0, Math.floor(from));
  const end = Math.min(values.length, timesMs.length, Math.floor(to));
  const out: DecimatedSeries = { timesMs: [], valuesY: [] };
  const length = end - start;
  if (length <= 0) return out;
  const buckets = Math.max(1, Math.floor(bucketCount));
  if (length <= buckets * 2) {
    for (let i = start; i < end; i++) push(out, timesMs[i], values[i]);
    return out;
  }
  for (let b = 0; b < buckets; b++) {
    const bucketStart = start + Math.floor((b * length) / buckets);
    const bucketEnd = start + Math.floor(((b + 1) * length) / buckets);
    let minIndex = -1;
    let maxIndex = -1;
    let gapIndex = -1;
    for (let i = bucketStart; i < bucketEnd; i++) {
      const v = values[i];
      if (!Number.isFinite(v)) { if (gapIndex < 0) gapIndex = i; continue; }
      if (minIndex < 0 || v < values[minIndex]) minIndex = i;
      if (maxIndex < 0 || v > values[maxIndex]) maxIndex = i;
    }
    const kept = [minIndex, maxIndex, gapIndex].filter((i) => i >= 0);
    const unique = Array.from(new Set(kept)).sort((a, b2) => a - b2);
    for (const i of unique) push(out, timesMs[i], values[i]);
  }
  return out;
}

function push(out: DecimatedSeries, timeMs: number, value: number): void {
  out.timesMs.push(timeMs);
  out.valuesY.push(Number.isFinite(value) ? value : null);
}

/**
 * Index range [from, to) of the grid times within [startMs, endMs] (inclusive), found by binary
 * search on the strictly increasing `timesMs`. Returns from === to when nothing falls inside.
 */
export function findIndexRange(timesMs: ArrayLike<number>, startMs: number, endMs: number): { from: number; to: number } {
  return { from: lowerBound(timesMs, startMs), to: upperBound(timesMs, endMs) };
}

function lowerBound(sorted: ArrayLike<number>, target: number): number {
  let lo = 0;
  let hi = sorted.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (sorted[mid] < target) lo = mid + 1; else hi = mid;
  }
  return lo;
}

function upperBound(sorted: ArrayLike<number>, target: number): number {
  let lo = 0;
  let hi = sorted.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (sorted[mid] <= target) lo = mid + 1; else hi = mid;
  }
  return lo;
}
