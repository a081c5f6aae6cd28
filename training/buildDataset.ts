/**
 * Dataset builder: labelled examples → frozen node features, using the SAME encode and temporal
 * transform as inference (extension/core/model), so training and the bundled model cannot drift apart.
 */
import { encodeMetricWindows, type WindowSpec } from '../extension/core/model/encode';
import { computeNodeFeatures, buildLinearProjection, NODE_FEATURE_COUNT } from '../extension/core/model/temporalFeatures';
import { CLASSES, type MetricWindow } from '../extension/core/model/types';

/** One example ready for the set model. */
export interface EncodedExample {
  /** [nodeCount, NODE_FEATURE_COUNT] row-major. */
  readonly features: Float32Array;
  readonly familyIds: Int32Array;
  /** 1 = usable node, 0 = metric the encoder could not normalize. */
  readonly mask: Float32Array;
  /** Index in CLASSES. */
  readonly label: number;
  readonly systemId: string;
}

/** Minimal shape of a labelled example (the simulator's TrainingExample satisfies it). */
export interface LabelledWindows {
  readonly label: string;
  readonly systemId: string;
  readonly metrics: readonly MetricWindow[];
}

/**
 * Encode examples whose label is one of `classes` (default the built-in CLASSES; the label is the
 * index there); others (held-out few-shot classes) are skipped. Examples with no usable metric are
 * kept (mask all 0): the model must cope with them.
 */
export function encodeExamples(examples: readonly LabelledWindows[], spec: WindowSpec, classes: readonly string[] = CLASSES): EncodedExample[] {
  const projection = buildLinearProjection(spec);
  const out: EncodedExample[] = [];
  for (const example of examples) {
    const label = classes.indexOf(example.label);
    if (label < 0) continue;
    const batch = encodeMetricWindows(example.metrics, spec);
    const features = computeNodeFeatures(batch.values, batch.nodeCount, spec, projection);
    const familyIds = Int32Array.from(batch.families, (f) => Number(f));
    out.push({ features, familyIds, mask: batch.mask, label, systemId: example.systemId });
  }
  return out;
}

/** Per-feature mean and standard deviation over the usable nodes (std floored at 1e-3). */
export function computeFeatureNormalization(examples: readonly EncodedExample[]): { mean: Float32Array; std: Float32Array } {
  const f = NODE_FEATURE_COUNT;
  const sum = new Float64Array(f);
  const sumSquares = new Float64Array(f);
  let count = 0;
  for (const ex of examples) {
    for (let n = 0; n < ex.mask.length; n++) {
      if (ex.mask[n] === 0) continue;
      count++;
      for (let i = 0; i < f; i++) { const v = ex.features[n * f + i]; sum[i] += v; sumSquares[i] += v * v; }
    }
  }
  const mean = new Float32Array(f);
  const std = new Float32Array(f).fill(1);
  if (count === 0) return { mean, std };
  for (let i = 0; i < f; i++) {
    mean[i] = sum[i] / count;
    std[i] = Math.max(1e-3, Math.sqrt(Math.max(0, sumSquares[i] / count - mean[i] * mean[i])));
  }
  return { mean, std };
}
