/**
 * How visible a fault is in the metrics an example exports. The simulator derives every
 * observable twice from the same noise, once with the fault and once without; a metric shows the
 * fault by how far the fault moved it, in units of that metric's own baseline noise. An example
 * whose fault moved no exported metric beyond its noise is not an example of the fault: its
 * metrics look exactly like a quiet period, and labelling it as the fault would teach (and score)
 * a guess.
 */
import { computeRobustStats } from '../../extension/core/model/encode';
import type { CounterfactualObservables } from './renderSystem';
import type { SeriesSpec } from './systemSpec';

/** Quantile of the per-step effect taken as the metric's evidence (intermittent faults need not move every step). */
const EFFECT_QUANTILE = 0.75;
/** Scale floor relative to |baseline median|, as in the encoder's DEFAULT_WINDOW_SPEC. */
const RELATIVE_SCALE_FLOOR = 0.01;

/** One exported metric of an example: its catalogue spec and its baseline as the example holds it. */
export interface EvidenceMetric {
  readonly spec: SeriesSpec;
  /** Baseline values as in the example (counters as per-second rates); NaN gaps allowed. */
  readonly baseline: ArrayLike<number>;
}

/**
 * The fault's evidence in an example: the largest, over exported metrics, of the 75th percentile
 * over window steps of |with fault − without fault| / baseline robust scale (values as the series
 * renders them before its own noise). 0 when no metric moved (or the example has no metrics);
 * irrelevant metrics never count. `windowStart`/`windowSteps` index the rendered grid.
 */
export function measureFaultEvidence(metrics: readonly EvidenceMetric[], observables: CounterfactualObservables, windowStart: number, windowSteps: number): number {
  const { faulted, counterfactual } = observables;
  let best = 0;
  const effects = new Float64Array(windowSteps);
  const faultedTail = faulted.tail;
  const quietTail = counterfactual.tail;
  // tail ** weight over the window, once per weight: quantile copies of several roles share weights.
  const tailPowers = new Map<number, { readonly faulted: Float64Array; readonly quiet: Float64Array }>();
  const findTailPowers = (weight: number): { readonly faulted: Float64Array; readonly quiet: Float64Array } => {
    let powers = tailPowers.get(weight);
    if (!powers) {
      powers = { faulted: new Float64Array(windowSteps), quiet: new Float64Array(windowSteps) };
      for (let k = 0; k < windowSteps; k += 1) {
        powers.faulted[k] = (faultedTail[windowStart + k] as number) ** weight;
        powers.quiet[k] = (quietTail[windowStart + k] as number) ** weight;
      }
      tailPowers.set(weight, powers);
    }
    return powers;
  };
  for (const { spec, baseline } of metrics) {
    if (spec.role.isIrrelevant) continue;
    const source = spec.role.source;
    const withFault = faulted[source];
    const withoutFault = counterfactual[source];
    const factor = Math.abs(spec.factor);
    const tailWeight = spec.tailWeight;
    // |a − b| first, divided by the scale below: the same operations in the same order as one
    // expression, so the effects are bit for bit what they were.
    let isUnmoved = true;
    const powers = tailWeight > 0 ? findTailPowers(tailWeight) : undefined;
    for (let k = 0; k < windowSteps; k += 1) {
      const i = windowStart + k;
      let a = (withFault[i] as number) * factor;
      let b = (withoutFault[i] as number) * factor;
      if (powers) {
        a *= powers.faulted[k] as number;
        b *= powers.quiet[k] as number;
      }
      const difference = Math.abs(a - b);
      if (difference !== 0) isUnmoved = false;
      effects[k] = difference;
    }
    // A metric the fault did not move has effect 0 whatever its scale, and 0 never beats `best`:
    // its baseline statistics would be computed for nothing.
    if (isUnmoved) continue;
    const stats = computeRobustStats(baseline);
    const scale = Math.max(stats.scale, RELATIVE_SCALE_FLOOR * Math.abs(stats.median), 1e-12);
    let hasNaN = false;
    for (let k = 0; k < windowSteps; k += 1) {
      const effect = (effects[k] as number) / scale;
      if (effect !== effect) hasNaN = true;
      effects[k] = effect;
    }
    const effect = hasNaN ? pickQuantileWithNaN(effects) : pickQuantile(effects);
    if (effect > best) best = effect;
  }
  return best;
}

/** The EFFECT_QUANTILE order statistic of NaN-free values (sorts `values` in place). */
function pickQuantile(values: Float64Array): number {
  // Without NaN a numeric typed-array sort orders exactly as the comparator x − y would, and the
  // effects are never −0 (absolute values), so the picked value is the same.
  values.sort();
  return values[Math.floor(EFFECT_QUANTILE * (values.length - 1))] as number;
}

/** As pickQuantile, with the comparator sort the evidence has always used when a NaN is present. */
function pickQuantileWithNaN(values: Float64Array): number {
  const sorted = Array.from(values).sort((x, y) => x - y);
  return sorted[Math.floor(EFFECT_QUANTILE * (sorted.length - 1))] as number;
}
