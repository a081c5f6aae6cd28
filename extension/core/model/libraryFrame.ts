import type { IndexWindow, MetricFrame } from '../frame/types';
import type { LibraryMetricInput } from './libraryEntry';
import type { LibraryTimeSpan } from './libraryTypes';

/**
 * Grid indices covering a time span (epoch ms, inclusive): the first and last grid times inside
 * it. Returns undefined when the span holds no grid point (outside the export, or between two
 * samples), so the caller can say what the export covers instead of guessing.
 */
export function findIndexWindow(timesMs: ArrayLike<number>, span: LibraryTimeSpan): IndexWindow | undefined {
  let startIndex = -1;
  let endIndex = -1;
  for (let i = 0; i < timesMs.length; i++) {
    const t = timesMs[i];
    if (t < span.startMs || t > span.endMs) continue;
    if (startIndex === -1) startIndex = i;
    endIndex = i;
  }
  return startIndex === -1 ? undefined : { startIndex, endIndex };
}

/**
 * Every frame series cut to the baseline and incident windows (inclusive grid indices), as input
 * for createLibraryEntry. Values are copied (NaN gaps kept); series are in frame order. Throws
 * (programmer error) when a window lies outside the frame or ends before it starts.
 */
export function extractLibraryMetrics(frame: MetricFrame, window: IndexWindow, baseline: IndexWindow): LibraryMetricInput[] {
  const length = frame.timesMs.length;
  for (const [what, w] of [['window', window], ['baseline', baseline]] as const) {
    if (!(w.startIndex >= 0 && w.endIndex >= w.startIndex && w.endIndex < length)) {
      throw new Error(`expected the ${what} inside grid indices 0..${length - 1}, got ${w.startIndex}..${w.endIndex}`);
    }
  }
  return frame.series.map((s) => ({
    id: s.id, name: s.name, family: s.family,
    baseline: s.values.slice(baseline.startIndex, baseline.endIndex + 1),
    window: s.values.slice(window.startIndex, window.endIndex + 1),
  }));
}
