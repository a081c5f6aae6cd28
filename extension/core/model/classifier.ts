import type { IndexWindow, MetricFrame } from '../frame/types';
import type { ClassifierSpec } from './classifierSpec';
import { encodeBatch, encodeMetricWindows } from './encode';
import type { InferenceRunner, MetricWindow, NodeBatch } from './types';
import { chooseTimelineBaseline, gatherRanges } from './timelineBaseline';

/** One class with its calibrated probability. */
export interface ClassProbability {
  readonly classIndex: number;
  readonly className: string;
  readonly probability: number;
}

/** The classifier's verdict on one incident window (a decision aid, never a root cause). */
export interface WindowVerdict extends ClassProbability {
  readonly runnerUp: ClassProbability;
  /** Calibrated probability per class (softmax(logits / T)), in spec.classes order. */
  readonly probabilities: Float64Array;
  readonly isAbstained: boolean;
  /** Why it abstained: low confidence, out of distribution, or no usable metric. */
  readonly abstainReason?: string;
  readonly isOutOfDistribution: boolean;
  /** Euclidean distance of the embedding to the nearest training class centroid. */
  readonly centroidDistance: number;
  readonly embedding: Float32Array;
  /** Metrics the model saw, and those skipped for too few valid samples (ids). */
  readonly usedMetricCount: number;
  readonly skippedMetricIds: readonly string[];
}

/** Class probabilities for the window ending at one grid step. */
export interface TimelinePoint {
  /** Grid index of the last step of the classified window (the point is known from this step on). */
  readonly index: number;
  /** Grid index of the first step of the classified window. */
  readonly startIndex: number;
  /** Time of `index`, epoch ms. */
  readonly timeMs: number;
  readonly probabilities: Float64Array;
  readonly classIndex: number;
}

export interface ClassifyOptions {
  /** Series (frame.series indices) to use; default all. */
  readonly seriesIndices?: readonly number[];
  /** Overrides spec.abstainThreshold. */
  readonly abstainThreshold?: number;
}

export interface TimelineOptions {
  /** Window length in grid steps (default 10, at least spec.windowSpec.minWindowSamples). */
  readonly windowSteps?: number;
  /** Steps between points (default 1). */
  readonly strideSteps?: number;
  /** Baseline length in steps before each window (default 60; shorter near the start, never under minBaselineSamples). */
  readonly baselineSteps?: number;
  /**
   * Grid ranges no baseline may use (the incident under review): a window's baseline skips them
   * and reaches further back, so the recovery after an incident is compared with the quiet period
   * before it rather than with the incident (see chooseTimelineBaseline).
   */
  readonly excludeFromBaseline?: readonly IndexWindow[];
  readonly isCancelled?: () => boolean;
}

export interface Classifier {
  classifyWindow(frame: MetricFrame, incident: IndexWindow, baseline: IndexWindow, options?: ClassifyOptions): Promise<WindowVerdict>;
  timeline(frame: MetricFrame, options?: TimelineOptions): Promise<TimelinePoint[]>;
  createSubsetValue(frame: MetricFrame, incident: IndexWindow, baseline: IndexWindow, classIndex: number, options?: { seriesIndices?: readonly number[] }): (coalitions: readonly Uint8Array[]) => Promise<Float64Array>;
}

/** Windows per runner call in the timeline and subset values (bounds memory: 256 × N × row floats). */
const RUN_CHUNK = 256;

/** Calibrated log-probabilities log softmax(logits / T) of one row. */
export function computeCalibratedLogProbabilities(logits: ArrayLike<number>, temperature: number): Float64Array {
  const out = Float64Array.from(logits, (v) => v / temperature);
  let max = -Infinity;
  for (const v of out) max = Math.max(max, v);
  let sum = 0;
  for (const v of out) sum += Math.exp(v - max);
  const logSum = max + Math.log(sum);
  for (let i = 0; i < out.length; i++) out[i] -= logSum;
  return out;
}

function checkWindow(frame: MetricFrame, w: IndexWindow, name: string): void {
  const last = frame.timesMs.length - 1;
  if (!Number.isInteger(w.startIndex) || !Number.isInteger(w.endIndex) || w.startIndex < 0 || w.endIndex > last || w.startIndex > w.endIndex) {
    throw new RangeError(`${name} window: expected 0 ≤ start ≤ end ≤ ${last}, got [${w.startIndex}, ${w.endIndex}]`);
  }
}

/**
 * Bucket means (NaN-aware) down to `maxSamples`: a long incident at a fine step (a 20-minute fault
 * at 1 s is 1,200 samples) keeps its shape, and the model sees at most the window length it knows.
 */
export function coarsenWindow(values: Float64Array, maxSamples: number): Float64Array {
  if (values.length <= maxSamples) return values;
  const out = new Float64Array(maxSamples);
  for (let b = 0; b < maxSamples; b++) {
    const from = Math.floor((b * values.length) / maxSamples);
    const to = Math.floor(((b + 1) * values.length) / maxSamples);
    let sum = 0;
    let count = 0;
    for (let i = from; i < to; i++) if (Number.isFinite(values[i])) { sum += values[i]; count++; }
    out[b] = count > 0 ? sum / count : Number.NaN;
  }
  return out;
}

/** The metrics of one window; the baseline is one grid range or several (in time order). */
function buildMetricWindows(frame: MetricFrame, incident: IndexWindow, baseline: IndexWindow | readonly IndexWindow[], indices: readonly number[], maxWindowSamples: number): MetricWindow[] {
  const ranges = 'startIndex' in baseline ? [baseline] : baseline;
  return indices.map((i) => {
    const s = frame.series[i];
    if (!s) throw new RangeError(`series index: expected 0..${frame.series.length - 1}, got ${i}`);
    return {
      id: s.id, family: s.family, name: s.name, labels: s.labels,
      baseline: gatherRanges(s.values, ranges),
      window: coarsenWindow(s.values.subarray(incident.startIndex, incident.endIndex + 1), maxWindowSamples),
    };
  });
}

function rankClasses(probabilities: Float64Array, classes: readonly string[]): [ClassProbability, ClassProbability] {
  const order = [...probabilities.keys()].sort((a, b) => probabilities[b] - probabilities[a]);
  const pick = (i: number): ClassProbability => ({ classIndex: i, className: classes[i], probability: probabilities[i] });
  return [pick(order[0]), pick(order[Math.min(1, order.length - 1)])];
}

function nearestCentroidDistance(embedding: ArrayLike<number>, centroids: readonly (readonly number[])[]): number {
  let best = Infinity;
  for (const c of centroids) {
    let d = 0;
    for (let j = 0; j < c.length; j++) d += (embedding[j] - c[j]) ** 2;
    best = Math.min(best, Math.sqrt(d));
  }
  return best;
}

/** One copy of a batch-of-1 per mask, so each coalition runs with its own node mask. */
function repeatBatch(base: NodeBatch, masks: readonly Float32Array[]): NodeBatch {
  const b = masks.length;
  const { nodeCount: n, windowLength: w } = base;
  const values = new Float32Array(b * n * w);
  const families = new BigInt64Array(b * n);
  const mask = new Float32Array(b * n);
  masks.forEach((m, i) => {
    values.set(base.values, i * n * w);
    families.set(base.families, i * n);
    mask.set(m, i * n);
  });
  return { batchSize: b, nodeCount: n, windowLength: w, values, families, mask };
}

/**
 * Build the classifier over an inference runner (the ONNX model) and its spec (classifier.json).
 * All probabilities are temperature-calibrated. Probabilities are a decision aid: callers must show
 * them with that caution and never as a root cause.
 */
export function createClassifier(runner: InferenceRunner, spec: ClassifierSpec): Classifier {
  const ws = spec.windowSpec;
  const logPriors = spec.classPriors.map((p) => Math.log(Math.max(p, 1e-12)));
  const allIndices = (frame: MetricFrame): number[] => frame.series.map((_, i) => i);

  async function classifyWindow(frame: MetricFrame, incident: IndexWindow, baseline: IndexWindow, options: ClassifyOptions = {}): Promise<WindowVerdict> {
    checkWindow(frame, incident, 'incident');
    checkWindow(frame, baseline, 'baseline');
    const length = incident.endIndex - incident.startIndex + 1;
    if (length < ws.minWindowSamples) {
      throw new RangeError(`incident window: expected at least ${ws.minWindowSamples} samples, got ${length}`);
    }
    const metrics = buildMetricWindows(frame, incident, baseline, options.seriesIndices ?? allIndices(frame), ws.maxWindowSamples);
    const batch = encodeMetricWindows(metrics, ws);
    const skippedMetricIds = metrics.filter((_, i) => batch.mask[i] === 0).map((m) => m.id);
    const usedMetricCount = metrics.length - skippedMetricIds.length;
    const threshold = options.abstainThreshold ?? spec.abstainThreshold;
    if (usedMetricCount === 0) {
      const probabilities = Float64Array.from(spec.classPriors);
      const [top, runnerUp] = rankClasses(probabilities, spec.classes);
      return {
        ...top, runnerUp, probabilities, isAbstained: true, isOutOfDistribution: true, centroidDistance: Infinity,
        abstainReason: `no metric has enough valid samples (need ≥ ${ws.minBaselineSamples} in the baseline and ≥ ${Math.round(ws.minWindowValidFraction * 100)}% of the window)`,
        embedding: new Float32Array(spec.embeddingSize), usedMetricCount, skippedMetricIds,
      };
    }
    const output = await runner.run(batch);
    const probabilities = computeCalibratedLogProbabilities(output.logits.subarray(0, output.classCount), spec.temperature).map(Math.exp);
    const [top, runnerUp] = rankClasses(probabilities, spec.classes);
    const embedding = output.embedding.slice(0, output.embeddingSize);
    const centroidDistance = nearestCentroidDistance(embedding, spec.embeddingCentroids);
    const isOutOfDistribution = centroidDistance > spec.oodDistance;
    let abstainReason: string | undefined;
    if (isOutOfDistribution) abstainReason = `input unlike the training data (embedding distance ${centroidDistance.toFixed(2)} > ${spec.oodDistance.toFixed(2)})`;
    else if (top.probability < threshold) abstainReason = `low confidence (${(top.probability * 100).toFixed(0)}% < ${(threshold * 100).toFixed(0)}%)`;
    return {
      ...top, runnerUp, probabilities, isAbstained: abstainReason !== undefined, abstainReason, isOutOfDistribution,
      centroidDistance, embedding, usedMetricCount, skippedMetricIds,
    };
  }

  async function timeline(frame: MetricFrame, options: TimelineOptions = {}): Promise<TimelinePoint[]> {
    const windowSteps = Math.min(ws.maxWindowSamples, Math.max(ws.minWindowSamples, Math.round(options.windowSteps ?? 10)));
    const strideSteps = Math.max(1, Math.round(options.strideSteps ?? 1));
    const baselineSteps = Math.max(ws.minBaselineSamples, Math.round(options.baselineSteps ?? 60));
    const indices = allIndices(frame);
    const ends: number[] = [];
    for (let end = ws.minBaselineSamples + windowSteps - 1; end < frame.timesMs.length; end += strideSteps) ends.push(end);
    const points: TimelinePoint[] = [];
    if (indices.length === 0) return points;
    for (let start = 0; start < ends.length; start += RUN_CHUNK) {
      if (options.isCancelled?.()) throw new Error('timeline cancelled');
      const chunk = ends.slice(start, start + RUN_CHUNK);
      const examples = chunk.map((end) => {
        const incident = { startIndex: end - windowSteps + 1, endIndex: end };
        const baseline = chooseTimelineBaseline(incident.startIndex, baselineSteps, options.excludeFromBaseline ?? [], ws.minBaselineSamples);
        return buildMetricWindows(frame, incident, baseline, indices, ws.maxWindowSamples);
      });
      const batch = encodeBatch(examples, ws);
      const output = await runner.run(batch);
      chunk.forEach((end, i) => {
        const hasNode = batch.mask.subarray(i * batch.nodeCount, (i + 1) * batch.nodeCount).some((m) => m > 0);
        const probabilities = hasNode
          ? computeCalibratedLogProbabilities(output.logits.subarray(i * output.classCount, (i + 1) * output.classCount), spec.temperature).map(Math.exp)
          : Float64Array.from(spec.classPriors);
        points.push({ index: end, startIndex: end - windowSteps + 1, timeMs: frame.timesMs[end], probabilities, classIndex: rankClasses(probabilities, spec.classes)[0].classIndex });
      });
    }
    return points;
  }

  function createSubsetValue(frame: MetricFrame, incident: IndexWindow, baseline: IndexWindow, classIndex: number, options: { seriesIndices?: readonly number[] } = {}): (coalitions: readonly Uint8Array[]) => Promise<Float64Array> {
    checkWindow(frame, incident, 'incident');
    checkWindow(frame, baseline, 'baseline');
    if (!Number.isInteger(classIndex) || classIndex < 0 || classIndex >= spec.classes.length) {
      throw new RangeError(`class index: expected 0..${spec.classes.length - 1}, got ${classIndex}`);
    }
    const metrics = buildMetricWindows(frame, incident, baseline, options.seriesIndices ?? allIndices(frame), ws.maxWindowSamples);
    const base = encodeMetricWindows(metrics, ws);
    return async (coalitions) => {
      const values = new Float64Array(coalitions.length);
      const pending: number[] = [];
      const masks: Float32Array[] = [];
      coalitions.forEach((c, i) => {
        if (c.length !== base.nodeCount) throw new RangeError(`coalition ${i}: expected ${base.nodeCount} entries, got ${c.length}`);
        const mask = Float32Array.from(base.mask, (m, k) => (c[k] ? m : 0));
        // v(∅) is the log class prior (training class frequencies); a coalition of unusable metrics counts as empty.
        if (!mask.some((m) => m > 0)) values[i] = logPriors[classIndex];
        else { pending.push(i); masks.push(mask); }
      });
      for (let start = 0; start < pending.length; start += RUN_CHUNK) {
        const output = await runner.run(repeatBatch(base, masks.slice(start, start + RUN_CHUNK)));
        for (let j = 0; j < Math.min(RUN_CHUNK, pending.length - start); j++) {
          const row = output.logits.subarray(j * output.classCount, (j + 1) * output.classCount);
          values[pending[start + j]] = computeCalibratedLogProbabilities(row, spec.temperature)[classIndex];
        }
      }
      return values;
    };
  }

  return { classifyWindow, timeline, createSubsetValue };
}
