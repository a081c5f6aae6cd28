/**
 * Renders one system instance: drivers → faults and benign events → observables → exported
 * series with per-series noise, heavy-tailed bursts, quantisation, cumulative counters with
 * resets, and gaps (NaN).
 */
import { applyBenignEvent, drawBenignEvents, type BenignKind } from './benignEvents';
import { applyFault, type FaultPlan } from './faults';
import { copyDrivers, createDrivers, deriveObservables, deriveObservablesWithCounterfactual, drawAr1, drawBaseTraffic, type Observables } from './latentModel';
import type { Random } from './random';
import type { SeriesSpec, SystemSpec } from './systemSpec';
import type { SimSeries, SimSystem } from './types';

export interface RenderRequest {
  readonly lengthSteps: number;
  readonly startMs: number;
  readonly faults: readonly FaultPlan[];
  /** Background benign events per step (random kinds and places). */
  readonly benignPerStep: number;
  /** Benign events at chosen places (used to put harmless bumps inside normal windows). */
  readonly benignEvents?: ReadonlyArray<{ readonly kind: BenignKind; readonly at: number }>;
  /** Also derive the observables without the faults (same noise), to measure what a fault moved. */
  readonly keepCounterfactual?: boolean;
}

/** Observables with and without the faults, drawn from the same noise (see measureFaultEvidence). */
export interface CounterfactualObservables {
  readonly faulted: Observables;
  readonly counterfactual: Observables;
}

/** A rendered system; `observables` is set when the request asked for the counterfactual. */
export type RenderedSystem = SimSystem & { readonly observables?: CounterfactualObservables };

const RATIO_SOURCES = new Set(['cpu', 'steal', 'iowait', 'idle', 'throttle', 'mem', 'memAvailable', 'diskBusy', 'errorRatio', 'successRatio', 'poolUse']);

/** Rounding step for `digits` significant digits of the series' typical level; NaN if the level is 0. */
function findQuantum(values: Float64Array, digits: number): number {
  // Median of at most 33 evenly spaced samples: the level only picks the rounding quantum.
  const stride = Math.max(1, Math.floor(values.length / 33));
  const picks: number[] = [];
  for (let i = 0; i < values.length; i += stride) picks.push(values[i] as number);
  picks.sort((a, b) => a - b);
  const level = Math.abs(picks[picks.length >> 1] as number);
  return level > 0 ? 10 ** (Math.floor(Math.log10(level)) - digits + 1) : Number.NaN;
}

/** Rounds every value to a multiple of `quantum` (a monotone map, so ordered copies stay ordered). */
function quantise(values: Float64Array, quantum: number): void {
  if (!(quantum > 0)) return;
  for (let i = 0; i < values.length; i += 1) values[i] = Math.round((values[i] as number) / quantum) * quantum;
}

function renderValues(s: SeriesSpec, o: Observables, rng: Random, stepMs: number, burstProbability: number, shared: Float64Array, logTail: Float64Array): Float64Array {
  const n = o.traffic.length;
  const out = new Float64Array(n);
  if (s.role.isIrrelevant) {
    const walk = drawAr1(rng, n, Math.min(0.999, Math.exp(-stepMs / 3_600_000)), 0.2);
    let shift = 0;
    for (let i = 0; i < n; i += 1) {
      if (rng.chance(0.002)) shift += 0.3 * rng.normal();
      out[i] = s.factor * Math.exp((walk[i] as number) + shift + s.noiseSigma * rng.normal());
    }
    return out;
  }
  const base = o[s.role.source];
  const isRatio = RATIO_SOURCES.has(s.role.source);
  const ceiling = Math.abs(s.factor);
  const sigma = s.noiseSigma;
  // Next burst position drawn geometrically: one draw per burst instead of one per step.
  // Quantile copies get their bursts from the shared tail instead, so they never cross.
  const ownBurstProbability = s.tailWeight > 0 ? 0 : burstProbability;
  // Quantiles of one distribution move almost together; pod/node copies less so.
  const sharedWeight = s.tailWeight > 0 ? 0.95 : 0.8;
  const ownWeight = Math.sqrt(1 - sharedWeight * sharedWeight);
  const nextBurst = (from: number): number =>
    ownBurstProbability > 0 ? from + Math.floor(Math.log(1 - rng.next()) / Math.log(1 - ownBurstProbability)) : n;
  let burstAt = nextBurst(0);
  for (let i = 0; i < n; i += 1) {
    let v = (base[i] as number) * s.factor;
    if (s.tailWeight > 0) v *= Math.exp(s.tailWeight * (logTail[i] as number));
    // 1 + σz is lognormal noise to first order for σ <= 0.16, at a fraction of the cost. Copies
    // of one role share most of it (weights with squares summing to 1), so percentiles stay
    // ordered and pod/node copies move together, as real family members do.
    v *= 1 + sigma * (sharedWeight * (shared[i] as number) + ownWeight * rng.normal());
    if (i === burstAt) {
      v *= 1 + 0.4 * Math.abs(rng.studentT2());
      burstAt = nextBurst(i + 1);
    }
    // Ratios keep their natural ceiling (100 % busy, 100 % success).
    if (isRatio && v > ceiling) v = ceiling;
    out[i] = v > 0 ? v : 0;
  }
  return out;
}

/** Turns per-second rates into a cumulative counter; resets on restarts and at random. */
function accumulate(s: SeriesSpec, rates: Float64Array, o: Observables, rng: Random, stepMs: number): Float64Array {
  const n = rates.length;
  const out = new Float64Array(n);
  const stepS = stepMs / 1000;
  let total = s.form.isInteger ? Math.floor(rng.logUniform(1, 1e7)) : rng.logUniform(1, 1e6);
  for (let i = 0; i < n; i += 1) {
    let increment = (rates[i] as number) * stepS;
    if (s.form.isInteger) increment = Math.floor(increment + rng.next());
    const isRestart = i > 0 && (o.restarts[i] as number) > (o.restarts[i - 1] as number);
    if ((isRestart && s.role.source !== 'restarts') || rng.chance(s.resetProbability)) total = 0;
    total += increment;
    out[i] = total;
  }
  return out;
}

function punchGaps(values: Float64Array, probability: number, rng: Random): void {
  if (probability <= 0) return;
  for (let i = 0; i < values.length; i += 1) {
    if (!rng.chance(probability)) continue;
    const run = rng.int(1, 6);
    for (let k = 0; k < run && i + k < values.length; k += 1) values[i + k] = Number.NaN;
    i += run;
  }
}

/** Renders `spec` on a grid of `lengthSteps` steps starting at `startMs` with the given faults. */
export function renderSystem(spec: SystemSpec, request: RenderRequest, rng: Random): RenderedSystem {
  const n = request.lengthSteps;
  const timesMs = new Float64Array(n);
  for (let i = 0; i < n; i += 1) timesMs[i] = request.startMs + i * spec.stepMs;
  const drivers = createDrivers(n);
  drawBenignEvents(drivers, rng, request.benignPerStep);
  for (const event of request.benignEvents ?? []) applyBenignEvent(drivers, event.kind, event.at, rng);
  const quietDrivers = request.keepCounterfactual ? copyDrivers(drivers) : undefined;
  for (const plan of request.faults) applyFault(drivers, plan, spec.params, rng);
  const baseTraffic = drawBaseTraffic(spec.params, rng, timesMs, spec.stepMs);
  // The counterfactual sees the same noise as the faulted run, so only the fault differs between the two.
  const both = quietDrivers ? deriveObservablesWithCounterfactual(spec.params, drivers, quietDrivers, baseTraffic, rng, spec.stepMs) : undefined;
  const o = both ? both.faulted : deriveObservables(spec.params, drivers, baseTraffic, rng, spec.stepMs);
  const quiet = both?.counterfactual;
  const sharedNoise = new Map<string, Float64Array>();
  const quanta = new Map<string, number>();
  const logTail = new Float64Array(n);
  for (let i = 0; i < n; i += 1) logTail[i] = Math.log(o.tail[i] as number);
  const series: SimSeries[] = spec.series.map((s) => {
    let shared = sharedNoise.get(s.role.key);
    if (!shared) {
      shared = new Float64Array(n);
      for (let i = 0; i < n; i += 1) shared[i] = rng.normal();
      sharedNoise.set(s.role.key, shared);
    }
    const rendered = renderValues(s, o, rng, spec.stepMs, spec.params.burstProbability, shared, logTail);
    if (s.kind === 'gauge' && s.significantDigits > 0) {
      // The first copy of a role fixes the quantum for all its copies (same exporter, same format).
      let quantum = quanta.get(s.role.key);
      if (quantum === undefined) {
        quantum = findQuantum(rendered, s.significantDigits);
        quanta.set(s.role.key, quantum);
      }
      quantise(rendered, quantum);
    }
    const values = s.kind === 'counter' ? accumulate(s, rendered, o, rng, spec.stepMs) : rendered;
    punchGaps(values, s.gapProbability, rng);
    return { name: s.name, labels: s.labels, unit: s.unit, kind: s.kind, trueFamily: s.trueFamily, role: s.role.key, values };
  });
  const incidents = request.faults
    .filter((f) => f.label !== 'normal')
    .map((f) => ({ label: f.label, startIndex: f.startIndex, endIndex: Math.min(n - 1, f.endIndex) }))
    .sort((a, b) => a.startIndex - b.startIndex);
  const system: SimSystem = { id: spec.id, seed: spec.seed, namingStyle: spec.namingStyle, stepMs: spec.stepMs, timesMs, series, incidents };
  return quiet ? { ...system, observables: { faulted: o, counterfactual: quiet } } : system;
}
