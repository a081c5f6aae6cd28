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
  for (const { spec, baseline } of metrics) {
    if (spec.role.isIrrelevant) continue;
    const source = spec.role.source;
    const withFault = faulted[source];
    const withoutFault = counterfactual[source];
    const stats = computeRobustStats(baseline);
    const scale = Math.max(stats.scale, RELATIVE_SCALE_FLOOR * Math.abs(stats.median), 1e-12);
    const factor = Math.abs(spec.factor);
    for (let k = 0; k < windowSteps; k += 1) {
      const i = windowStart + k;
      let a = (withFault[i] as number) * factor;
      let b = (withoutFault[i] as number) * factor;
      if (spec.tailWeight > 0) {
        a *= (faulted.tail[i] as number) ** spec.tailWeight;
        b *= (counterfactual.tail[i] as number) ** spec.tailWeight;
      }
      effects[k] = Math.abs(a - b) / scale;
    }
    const sorted = Array.from(effects).sort((x, y) => x - y);
    const effect = sorted[Math.floor(EFFECT_QUANTILE * (sorted.length - 1))] as number;
    if (effect > best) best = effect;
  }
  return best;
}
