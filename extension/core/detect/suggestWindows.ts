/**
 * Suggests the incident window and a baseline window for a frame (REFERENCE.md §4.1): robust
 * per-metric deviation (seasonal where a daily/weekly cycle exists), a family-pooled consensus
 * score, the strongest contiguous abnormal segment as the incident, a quiet stretch right before
 * it as the baseline, and a change-point timeline (tabular CUSUM onsets and PELT level changes).
 */
import type { MetricFrame } from '../frame/types';
import { computeRobustDeviation, type RobustDeviation } from './robustDeviation';
import { computeConsensusScore, findAbnormalSegments, type AbnormalSegment } from './consensusScore';
import { detectSequentialShifts } from './tabularCusum';
import { refineOnsetIndex } from './refineOnset';
import { detectPelt, estimateDifferenceSigma } from './changePoints';
import {
  DEFAULT_WINDOW_OPTIONS, type ChangePointEvent, type IncidentCandidate, type SuggestWindowsOptions,
  type SuggestedWindow, type WindowSuggestion,
} from './windowTypes';

type ResolvedOptions = Required<SuggestWindowsOptions>;

/** Largest fraction of abnormal steps a baseline may contain before a quieter one is sought. */
const QUIET_FRACTION = 0.1;
/** PELT runs on block means of at most this many blocks, to keep it linear-ish on long frames. */
const PELT_MAX_BLOCKS = 200;

/**
 * Suggests incident and baseline windows for `frame`.
 * - Frames with no series or fewer than `minSamples` (default 8) steps: status 'insufficient-data'.
 * - No step with consensus ≥ threshold: status 'no-incident' (consensus and series still returned).
 * - Otherwise 'ok': incident = strongest segment, its start moved back to the CUSUM onset of the
 *   metrics carrying it (refineOnsetIndex); baseline = a quiet stretch just before it, of equal
 *   length where the data allow and ≥ 3 samples, else after it (isBaselineAfterIncident), else none.
 * - A series whose length differs from the grid: 'insufficient-data' naming the series and both lengths.
 * Gaps (NaN) are skipped everywhere; constant series score 0; ±Infinity counts as a huge deviation.
 * Never throws on data.
 */
export function suggestWindows(frame: MetricFrame, options: SuggestWindowsOptions = {}): WindowSuggestion {
  const n = frame.timesMs.length;
  const o: ResolvedOptions = { ...DEFAULT_WINDOW_OPTIONS, ...options };
  const base = { isBaselineAfterIncident: false, candidates: [], changePoints: [], series: [] };
  if (frame.series.length === 0) {
    return { ...base, status: 'insufficient-data', reason: 'the frame has no series', consensus: new Float64Array(n) };
  }
  if (n < o.minSamples) {
    return { ...base, status: 'insufficient-data', consensus: new Float64Array(n),
      reason: `expected at least ${o.minSamples} samples to suggest a window, got ${n}` };
  }
  const misfit = frame.series.find((s) => s.values.length !== n);
  if (misfit) {
    return { ...base, status: 'insufficient-data', consensus: new Float64Array(n),
      reason: `series "${misfit.id}": expected ${n} values (one per grid time), got ${misfit.values.length}` };
  }
  const deviations = frame.series.map((s) => computeRobustDeviation(s.values, frame.stepMs, o.isSeasonalEnabled));
  const zs = deviations.map((d) => d.z);
  const consensus = computeConsensusScore(zs, frame.series.map((s) => s.family), o.zFloor, o.zCap);
  const segments = findAbnormalSegments(consensus, o.consensusThreshold, o.mergeGapSteps);
  if (segments.length === 0) {
    return { ...base, status: 'no-incident', consensus, series: summarizeSeries(frame, deviations),
      reason: `no step reached the consensus threshold ${o.consensusThreshold} (|robust z| ≤ ${o.zFloor} + threshold everywhere)` };
  }
  const candidates = segments.slice(0, o.candidateCount).map((s) => toCandidate(frame, s));
  const refinedStart = refineOnsetIndex(zs, candidates[0], o.zFloor);
  const incident: IncidentCandidate = { ...candidates[0], ...toWindow(frame, refinedStart, candidates[0].endIndex) };
  candidates[0] = incident;
  const picked = pickBaseline(frame, consensus, o.consensusThreshold, incident);
  const regionStart = picked.window?.startIndex ?? Math.max(0, incident.startIndex - (incident.endIndex - incident.startIndex + 1));
  const regionEnd = Math.min(n - 1, incident.endIndex + (incident.endIndex - incident.startIndex + 1));
  const changePoints = buildTimeline(frame, deviations, regionStart, regionEnd, o);
  return {
    status: 'ok', reason: picked.reason, incident, baseline: picked.window,
    isBaselineAfterIncident: picked.isAfter, candidates, consensus, changePoints,
    series: summarizeSeries(frame, deviations, incident),
  };
}

function toWindow(frame: MetricFrame, startIndex: number, endIndex: number): SuggestedWindow {
  return { startIndex, endIndex, startMs: frame.timesMs[startIndex], endMs: frame.timesMs[endIndex],
    uncertaintySteps: 1, uncertaintyMs: frame.stepMs };
}

function toCandidate(frame: MetricFrame, s: AbnormalSegment): IncidentCandidate {
  return { ...toWindow(frame, s.startIndex, s.endIndex), score: s.score, peakConsensus: s.peak };
}

function summarizeSeries(frame: MetricFrame, deviations: readonly RobustDeviation[], incident?: IncidentCandidate):
  WindowSuggestion['series'] {
  return frame.series.map((s, i) => {
    let peak = 0;
    if (incident) {
      const z = deviations[i].z;
      for (let t = incident.startIndex; t <= incident.endIndex; t++) if (Math.abs(z[t]) > peak) peak = Math.abs(z[t]);
    }
    return { seriesId: s.id, family: s.family, referenceMethod: deviations[i].referenceMethod,
      periodSteps: deviations[i].periodSteps, peakAbsZInIncident: peak };
  });
}

/**
 * Baseline search: windows ending just before the incident (sliding back at most one incident
 * length to skip an abnormal lead-in), first one with ≤ 10% abnormal steps, else the quietest;
 * the same after the incident when nothing ≥ 3 samples fits before.
 */
function pickBaseline(frame: MetricFrame, consensus: Float64Array, threshold: number, incident: IncidentCandidate):
  { window?: SuggestedWindow; isAfter: boolean; reason: string } {
  const n = consensus.length;
  const abnormal = new Int32Array(n + 1);
  for (let t = 0; t < n; t++) abnormal[t + 1] = abnormal[t] + (consensus[t] >= threshold ? 1 : 0);
  const incidentLength = incident.endIndex - incident.startIndex + 1;
  const length = Math.max(3, incidentLength);
  const fraction = (s: number, e: number): number => (abnormal[e + 1] - abnormal[s]) / (e - s + 1);
  let best: { s: number; e: number; f: number } | undefined;
  for (let e = incident.startIndex - 1; e >= 2 && e >= incident.startIndex - 1 - incidentLength; e--) {
    const s = Math.max(0, e - length + 1);
    const f = fraction(s, e);
    if (!best || f < best.f) best = { s, e, f };
    if (f <= QUIET_FRACTION) break;
  }
  if (best && best.f < 0.5) {
    return { window: toWindow(frame, best.s, best.e), isAfter: false,
      reason: `baseline: ${best.e - best.s + 1} samples before the incident, ${(100 * best.f).toFixed(0)}% of them abnormal` };
  }
  let after: { s: number; e: number; f: number } | undefined;
  for (let s = incident.endIndex + 1; s <= n - 3 && s <= incident.endIndex + 1 + incidentLength; s++) {
    const e = Math.min(n - 1, s + length - 1);
    const f = fraction(s, e);
    if (!after || f < after.f) after = { s, e, f };
    if (f <= QUIET_FRACTION) break;
  }
  if (after && after.f < 0.5) {
    return { window: toWindow(frame, after.s, after.e), isAfter: true,
      reason: `baseline: no quiet stretch of ≥ 3 samples before the incident; taken after it (${after.e - after.s + 1} samples)` };
  }
  return { isAfter: false, reason: 'no quiet stretch of at least 3 samples before or after the incident; choose a baseline by hand' };
}

/** CUSUM onsets and PELT level changes of each metric inside [regionStart, regionEnd]. */
function buildTimeline(frame: MetricFrame, deviations: readonly RobustDeviation[], regionStart: number,
  regionEnd: number, o: ResolvedOptions): ChangePointEvent[] {
  const events: ChangePointEvent[] = [];
  deviations.forEach((d, i) => {
    const seriesId = frame.series[i].id;
    // Only the stretch around the incident is scanned: the timeline is for the report, and a
    // whole 10,000-step series of noise would add nothing but false alarms and time.
    const shifts = detectSequentialShifts(d.z.subarray(regionStart, regionEnd + 1), { targetMean: 0, sigma: 1, k: 0.5, h: 5 });
    for (const s of shifts) {
      const index = regionStart + s.onsetIndex;
      events.push({ timeMs: frame.timesMs[index], index, seriesId, direction: s.direction,
        magnitude: s.toLevel - s.fromLevel, method: 'cusum' });
    }
    events.push(...detectLevelChanges(frame, d.z, seriesId, regionStart, regionEnd, o.zFloor));
  });
  const kept = events.length <= o.maxTimelineEntries ? events
    : [...events].sort((a, b) => Math.abs(b.magnitude) - Math.abs(a.magnitude)).slice(0, o.maxTimelineEntries);
  return kept.sort((a, b) => a.timeMs - b.timeMs || Math.abs(b.magnitude) - Math.abs(a.magnitude));
}

function detectLevelChanges(frame: MetricFrame, z: Float64Array, seriesId: string, regionStart: number,
  regionEnd: number, minMagnitude: number): ChangePointEvent[] {
  const length = regionEnd - regionStart + 1;
  const block = Math.max(1, Math.ceil(length / PELT_MAX_BLOCKS));
  const blockCount = Math.ceil(length / block);
  const means = new Float64Array(blockCount);
  for (let b = 0; b < blockCount; b++) {
    let s = 0, c = 0;
    for (let t = regionStart + b * block; t < Math.min(regionEnd + 1, regionStart + (b + 1) * block); t++) {
      if (!Number.isNaN(z[t])) { s += z[t]; c++; }
    }
    means[b] = c > 0 ? s / c : Number.NaN;
  }
  const sigma = Math.max(estimateDifferenceSigma(means) || 0, 0.25);
  const points = detectPelt(means, { sigma, minSegmentLength: 2 });
  const bounds = [0, ...points, blockCount];
  const out: ChangePointEvent[] = [];
  for (let k = 1; k < bounds.length - 1; k++) {
    const delta = computeMean(means, bounds[k], bounds[k + 1]) - computeMean(means, bounds[k - 1], bounds[k]);
    if (!(Math.abs(delta) >= minMagnitude)) continue;
    const index = regionStart + bounds[k] * block;
    out.push({ timeMs: frame.timesMs[index], index, seriesId, direction: delta > 0 ? 'up' : 'down', magnitude: delta, method: 'pelt' });
  }
  return out;
}

function computeMean(values: Float64Array, start: number, end: number): number {
  let s = 0, c = 0;
  for (let i = start; i < end; i++) if (!Number.isNaN(values[i])) { s += values[i]; c++; }
  return c > 0 ? s / c : Number.NaN;
}
