/**
 * Effect sizes of every series of a frame between a baseline and an incident window, ranked the
 * way REFERENCE.md §4.2 advises: by effect size (|Cliff's δ|, then |robust z|), never by p-value.
 */
import type { Family, IndexWindow, MetricFrame } from '../frame/types';
import { computeEffectSizes, type MetricEffectSizes } from './effectSizes';

/** One series' effect sizes. */
export interface SeriesEffect {
  readonly seriesId: string;
  readonly family: Family;
  readonly effect: MetricEffectSizes;
}

function checkWindow(name: string, w: IndexWindow, length: number): void {
  const isValid = Number.isInteger(w.startIndex) && Number.isInteger(w.endIndex)
    && w.startIndex >= 0 && w.endIndex < length && w.startIndex <= w.endIndex;
  if (!isValid) {
    throw new Error(`${name} window: expected indices 0 ≤ start ≤ end ≤ ${length - 1}, got ${w.startIndex}..${w.endIndex}`);
  }
}

/**
 * Effect sizes per series, strongest first (|δ| descending, ties by |robust z|; NaN last).
 * Windows are inclusive grid indices; overlapping windows are allowed but weaken every effect.
 * Throws an Error naming the window and the valid range when a window lies outside the frame.
 */
export function computeFrameEffects(frame: MetricFrame, baseline: IndexWindow, incident: IndexWindow): SeriesEffect[] {
  const n = frame.timesMs.length;
  checkWindow('baseline', baseline, n);
  checkWindow('incident', incident, n);
  const rows = frame.series.map((s) => ({
    seriesId: s.id, family: s.family,
    effect: computeEffectSizes(s.values.subarray(baseline.startIndex, baseline.endIndex + 1),
      s.values.subarray(incident.startIndex, incident.endIndex + 1)),
  }));
  const key = (e: MetricEffectSizes): [number, number] => [
    Number.isNaN(e.cliffsDelta) ? -1 : Math.abs(e.cliffsDelta), Number.isNaN(e.robustZ) ? -1 : Math.abs(e.robustZ)];
  return rows.sort((a, b) => {
    const [da, za] = key(a.effect), [db, zb] = key(b.effect);
    return db - da || zb - za;
  });
}
