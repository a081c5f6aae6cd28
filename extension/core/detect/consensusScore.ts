/**
 * Pools per-metric robust z-scores into one abnormality score per step and cuts it into
 * contiguous abnormal segments.
 */
import type { Family } from '../frame/types';

/**
 * Consensus score per step: each metric contributes its excess e = min(|z|, zCap) − zFloor (≥ 0);
 * members of a family are averaged (so twenty correlated latency percentiles count as one
 * family), and family scores are summed (several families moving together add evidence).
 * NaN z (gaps) are skipped; a step where every metric is NaN scores NaN (unknown, not normal).
 */
export function computeConsensusScore(zs: readonly Float64Array[], families: readonly Family[],
  zFloor: number, zCap: number): Float64Array {
  const n = zs.length > 0 ? zs[0].length : 0;
  const groups = new Map<Family, number[]>();
  families.forEach((f, i) => { const g = groups.get(f); if (g) g.push(i); else groups.set(f, [i]); });
  const out = new Float64Array(n).fill(Number.NaN);
  const sum = new Float64Array(n);
  const count = new Int32Array(n);
  for (const members of groups.values()) {
    sum.fill(0); count.fill(0);
    for (const m of members) {
      const z = zs[m];
      for (let t = 0; t < n; t++) {
        const a = Math.abs(z[t]);
        if (Number.isNaN(a)) continue;
        sum[t] += Math.max(0, Math.min(a, zCap) - zFloor);
        count[t]++;
      }
    }
    for (let t = 0; t < n; t++) if (count[t] > 0) out[t] = (Number.isNaN(out[t]) ? 0 : out[t]) + sum[t] / count[t];
  }
  return out;
}

/** A contiguous abnormal stretch (inclusive indices). */
export interface AbnormalSegment {
  readonly startIndex: number;
  readonly endIndex: number;
  readonly score: number;
  readonly peak: number;
}

/**
 * Runs of steps with score ≥ threshold, merged across at most `mergeGapSteps` normal steps; NaN
 * steps (no data at all) neither break nor extend a run. A segment's score is the sum of the
 * non-NaN scores over it. Sorted by score, strongest first; [] when no step reaches the threshold.
 */
export function findAbnormalSegments(score: Float64Array, threshold: number, mergeGapSteps: number): AbnormalSegment[] {
  const segments: AbnormalSegment[] = [];
  let start = -1, lastAbnormal = -1, normalRun = 0;
  const close = (): void => {
    let s = 0, peak = 0;
    for (let t = start; t <= lastAbnormal; t++) {
      if (Number.isNaN(score[t])) continue;
      s += score[t]; peak = Math.max(peak, score[t]);
    }
    segments.push({ startIndex: start, endIndex: lastAbnormal, score: s, peak });
  };
  for (let t = 0; t < score.length; t++) {
    const v = score[t];
    if (Number.isNaN(v)) continue;
    if (!(v >= threshold)) { normalRun++; continue; }
    if (start >= 0 && normalRun > mergeGapSteps) close();
    if (start < 0 || normalRun > mergeGapSteps) start = t;
    lastAbnormal = t;
    normalRun = 0;
  }
  if (start >= 0) close();
  return segments.sort((a, b) => b.score - a.score);
}
