import type { IndexWindow } from '../frame/types';

/**
 * The baseline of one timeline window: up to `steps` grid steps just before the window
 * (`windowStart`), skipping the steps of `exclude` (a known incident) and reaching further back
 * instead. A window right after an incident is then compared with the quiet period before the
 * incident, not with the incident itself — otherwise the recovery reads as a fault of its own.
 * Returns contiguous ranges in time order. When fewer than `minSteps` steps are left outside the
 * excluded ranges, the plain trailing baseline is returned (the best there is).
 */
export function chooseTimelineBaseline(windowStart: number, steps: number, exclude: readonly IndexWindow[], minSteps: number): IndexWindow[] {
  const plain: IndexWindow[] = [{ startIndex: Math.max(0, windowStart - steps), endIndex: windowStart - 1 }];
  const isOverlapping = exclude.some((w) => w.startIndex < windowStart && w.endIndex >= windowStart - steps);
  if (!isOverlapping) return plain;
  const ranges: IndexWindow[] = [];
  let taken = 0;
  let end = windowStart - 1;
  // Excluded ranges nearest first; each one ends a run of kept steps.
  const blocks = exclude.filter((w) => w.startIndex < windowStart).sort((a, b) => b.endIndex - a.endIndex);
  let block = 0;
  while (end >= 0 && taken < steps) {
    while (block < blocks.length && blocks[block].startIndex > end) block++;
    const next = blocks[block];
    if (next && next.endIndex >= end) {
      end = next.startIndex - 1;
      block++;
      continue;
    }
    const floor = next ? next.endIndex + 1 : 0;
    const start = Math.max(floor, end - (steps - taken) + 1);
    ranges.push({ startIndex: start, endIndex: end });
    taken += end - start + 1;
    end = start - 1;
  }
  if (taken < minSteps) return plain;
  return ranges.reverse();
}

/** The values of `ranges` of one series, in order; a single range is a view, not a copy. */
export function gatherRanges(values: Float64Array, ranges: readonly IndexWindow[]): Float64Array {
  if (ranges.length === 1) return values.subarray(ranges[0].startIndex, ranges[0].endIndex + 1);
  let length = 0;
  for (const r of ranges) length += r.endIndex - r.startIndex + 1;
  const out = new Float64Array(length);
  let at = 0;
  for (const r of ranges) {
    out.set(values.subarray(r.startIndex, r.endIndex + 1), at);
    at += r.endIndex - r.startIndex + 1;
  }
  return out;
}
