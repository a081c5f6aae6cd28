/**
 * Renders one system instance: drivers → faults and benign events → observables → exported
 * series with per-series noise, heavy-tailed bursts, quantisation, cumulative counters with
 * resets, and gaps (NaN).
 */
import { applyBenignEvent, drawBenignEvents, type BenignKind } from './benignEvents';
import { applyFault, type FaultPlan } from './faults';
import { borrowScratch, copyDrivers, createDrivers, deriveObservables, deriveObservablesWithCounterfactual, drawAr1, drawBaseTraffic, DRIVER_KEYS, ScratchSlot, type ObservableKey, type Observables } from './latentModel';
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
  /**
   * Render into buffers reused by the next render: series values, times and observables of the
   * result are then valid only until renderSystem is called again. For callers that copy what
   * they need at once (sampleExamples); the values are the same either way. Observables that no
   * rendered series reads are then left out (NaN).
   */
  readonly reuseBuffers?: boolean;
  /**
   * With reuseBuffers: the only steps [from, to) of the counterfactual anyone reads (an
   * example's window); it is left unspecified elsewhere.
   */
  readonly counterfactualSteps?: readonly [number, number];
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
  const count = Math.ceil(values.length / stride);
  const picks = count <= quantumPicks.length ? quantumPicks.subarray(0, count) : new Float64Array(count);
  let hasNaN = false;
  for (let i = 0, k = 0; i < values.length; i += stride, k += 1) {
    const v = values[i] as number;
    if (v !== v) hasNaN = true;
    picks[k] = v;
  }
  // Without NaN a numeric typed-array sort orders as the comparator a − b does; ±0 may swap
  // places, and the level is an absolute value, so the median level is the same.
  const sorted = hasNaN ? Array.from(picks).sort((a, b) => a - b) : picks.sort();
  const level = Math.abs(sorted[sorted.length >> 1] as number);
  return level > 0 ? 10 ** (Math.floor(Math.log10(level)) - digits + 1) : Number.NaN;
}
const quantumPicks = new Float64Array(128);

/** Rounds every value to a multiple of `quantum` (a monotone map, so ordered copies stay ordered). */
function quantise(values: Float64Array, quantum: number): void {
  if (!(quantum > 0)) return;
  for (let i = 0; i < values.length; i += 1) values[i] = Math.round((values[i] as number) / quantum) * quantum;
}

/**
 * Renders series `s` into `out` (length n). `walk` is scratch (length n); `tailFactor`
 * holds exp(s.tailWeight · log tail) per step (shared by every copy with that weight).
 */
function renderValues(s: SeriesSpec, o: Observables, rng: Random, stepMs: number, burstProbability: number, shared: Float64Array, tailFactor: Float64Array | undefined, out: Float64Array, walk: Float64Array): void {
  const n = out.length;
  const factor = s.factor;
  const noiseSigma = s.noiseSigma;
  if (s.role.isIrrelevant) {
    drawAr1(rng, n, Math.min(0.999, Math.exp(-stepMs / 3_600_000)), 0.2, walk);
    let shift = 0;
    for (let i = 0; i < n; i += 1) {
      if (rng.chance(0.002)) shift += 0.3 * rng.normal();
      out[i] = factor * Math.exp((walk[i] as number) + shift + noiseSigma * rng.normal());
    }
    return;
  }
  const base = o[s.role.source];
  const isRatio = RATIO_SOURCES.has(s.role.source);
  const ceiling = Math.abs(factor);
  const sigma = noiseSigma;
  // Next burst position drawn geometrically: one draw per burst instead of one per step.
  // Quantile copies get their bursts from the shared tail instead, so they never cross.
  const ownBurstProbability = s.tailWeight > 0 ? 0 : burstProbability;
  const logNoBurst = Math.log(1 - ownBurstProbability);
  // Quantiles of one distribution move almost together; pod/node copies less so.
  const sharedWeight = s.tailWeight > 0 ? 0.95 : 0.8;
  const ownWeight = Math.sqrt(1 - sharedWeight * sharedWeight);
  let burstAt = ownBurstProbability > 0 ? Math.floor(Math.log(1 - rng.next()) / logNoBurst) : n;
  // Own noise drawn in blocks up to and including the next burst step; the burst's own draws
  // follow it, so the generator sees the same sequence as one draw per step.
  const own = walk;
  let i = 0;
  while (i < n) {
    const end = Math.min(n, burstAt + 1);
    rng.fillNormal(own, i, end);
    for (; i < end; i += 1) {
      let v = (base[i] as number) * factor;
      if (tailFactor) v *= tailFactor[i] as number;
      // 1 + σz is lognormal noise to first order for σ <= 0.16, at a fraction of the cost. Copies
      // of one role share most of it (weights with squares summing to 1), so percentiles stay
      // ordered and pod/node copies move together, as real family members do.
      v *= 1 + sigma * (sharedWeight * (shared[i] as number) + ownWeight * (own[i] as number));
      if (i === burstAt) {
        v *= 1 + 0.4 * Math.abs(rng.studentT2());
        burstAt = i + 1 + Math.floor(Math.log(1 - rng.next()) / logNoBurst);
      }
      // Ratios keep their natural ceiling (100 % busy, 100 % success).
      if (isRatio && v > ceiling) v = ceiling;
      out[i] = v > 0 ? v : 0;
    }
  }
}

/** Turns per-second rates into a cumulative counter, in place; resets on restarts and at random. */
function accumulate(s: SeriesSpec, values: Float64Array, o: Observables, rng: Random, stepMs: number): void {
  const n = values.length;
  const stepS = stepMs / 1000;
  const isInteger = s.form.isInteger;
  const restarts = o.restarts;
  const resetsOnRestart = s.role.source !== 'restarts';
  const resetProbability = s.resetProbability;
  let total = isInteger ? Math.floor(rng.logUniform(1, 1e7)) : rng.logUniform(1, 1e6);
  // The draws of every step (dither, then reset chance unless a restart already resets) are known
  // in number before any is drawn, so they are taken in one block, in the same order.
  let drawCount = 0;
  for (let i = 0; i < n; i += 1) {
    if (isInteger) drawCount += 1;
    const isRestart = i > 0 && (restarts[i] as number) > (restarts[i - 1] as number);
    if (!(isRestart && resetsOnRestart)) drawCount += 1;
  }
  const u = borrowScratch(ScratchSlot.Uniforms, drawCount);
  rng.fillUniform(u, 0, drawCount);
  let next = 0;
  for (let i = 0; i < n; i += 1) {
    let increment = (values[i] as number) * stepS;
    if (isInteger) increment = Math.floor(increment + (u[next++] as number));
    const isRestart = i > 0 && (restarts[i] as number) > (restarts[i - 1] as number);
    if ((isRestart && resetsOnRestart) || (u[next++] as number) < resetProbability) total = 0;
    total += increment;
    values[i] = total;
  }
}

/** Observables read when rendering `spec`: every series' source, the tail (quantile copies), restarts (counter resets). */
function findNeededObservables(spec: SystemSpec): ReadonlySet<ObservableKey> {
  const needed = new Set<ObservableKey>(['tail', 'restarts']);
  for (const s of spec.series) if (!s.role.isIrrelevant) needed.add(s.role.source);
  return needed;
}

/** exp(tailWeight · log tail) per step, computed once per weight (quantile copies of many roles share a weight). */
function findTailFactor(cache: Map<number, Float64Array>, tailWeight: number, logTail: Float64Array, carve: () => Float64Array): Float64Array {
  let factor = cache.get(tailWeight);
  if (!factor) {
    factor = carve();
    for (let i = 0; i < logTail.length; i += 1) factor[i] = Math.exp(tailWeight * (logTail[i] as number));
    cache.set(tailWeight, factor);
  }
  return factor;
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
  const reuse = request.reuseBuffers === true;
  const timesMs = reuse ? borrowScratch(ScratchSlot.Times, n).subarray(0, n) : new Float64Array(n);
  for (let i = 0; i < n; i += 1) timesMs[i] = request.startMs + i * spec.stepMs;
  // Drivers never leave this function, so their buffers are always reused.
  const drivers = createDrivers(n, borrowScratch(ScratchSlot.Drivers, DRIVER_KEYS.length * n));
  drawBenignEvents(drivers, rng, request.benignPerStep);
  for (const event of request.benignEvents ?? []) applyBenignEvent(drivers, event.kind, event.at, rng);
  const quietDrivers = request.keepCounterfactual ? copyDrivers(drivers, borrowScratch(ScratchSlot.QuietDrivers, DRIVER_KEYS.length * n)) : undefined;
  for (const plan of request.faults) applyFault(drivers, plan, spec.params, rng, quietDrivers);
  const baseTraffic = drawBaseTraffic(spec.params, rng, timesMs, spec.stepMs, true);
  // The counterfactual sees the same noise as the faulted run, so only the fault differs between the two.
  // With reused buffers the result is read at once, by the series rendered here and by whoever
  // measures their evidence: observables no series renders from are not needed.
  const deriveOptions = reuse ? { intoScratch: true, needed: findNeededObservables(spec), counterfactualSteps: request.counterfactualSteps } : {};
  const both = quietDrivers ? deriveObservablesWithCounterfactual(spec.params, drivers, quietDrivers, baseTraffic, rng, spec.stepMs, deriveOptions) : undefined;
  const o = both ? both.faulted : deriveObservables(spec.params, drivers, baseTraffic, rng, spec.stepMs, deriveOptions);
  const quiet = both?.counterfactual;
  // Every per-step array of the series comes from one allocation: each typed array of this size
  // otherwise gets its own off-heap store, and making and freeing those cost more than filling them.
  const roleCount = new Set(spec.series.map((s) => s.role.key)).size;
  const tailWeightCount = new Set(spec.series.filter((s) => s.tailWeight > 0).map((s) => s.tailWeight)).size;
  const arenaSize = n * (spec.series.length + roleCount + tailWeightCount + 2);
  const arena = reuse ? borrowScratch(ScratchSlot.Series, arenaSize) : new Float64Array(arenaSize);
  let arenaUsed = 0;
  const carve = (): Float64Array => arena.subarray(arenaUsed, (arenaUsed += n));
  const walk = carve();
  const logTail = carve();
  const tail = o.tail;
  // Only quantile copies (tail weight > 0) read the tail.
  if (tailWeightCount > 0) for (let i = 0; i < n; i += 1) logTail[i] = Math.log(tail[i] as number);
  const sharedNoise = new Map<string, Float64Array>();
  const quanta = new Map<string, number>();
  const tailFactors = new Map<number, Float64Array>();
  const series: SimSeries[] = spec.series.map((s) => {
    let shared = sharedNoise.get(s.role.key);
    if (!shared) {
      shared = carve();
      rng.fillNormal(shared, 0, n);
      sharedNoise.set(s.role.key, shared);
    }
    const rendered = carve();
    renderValues(s, o, rng, spec.stepMs, spec.params.burstProbability, shared, s.tailWeight > 0 ? findTailFactor(tailFactors, s.tailWeight, logTail, carve) : undefined, rendered, walk);
    if (s.kind === 'gauge' && s.significantDigits > 0) {
      // The first copy of a role fixes the quantum for all its copies (same exporter, same format).
      let quantum = quanta.get(s.role.key);
      if (quantum === undefined) {
        quantum = findQuantum(rendered, s.significantDigits);
        quanta.set(s.role.key, quantum);
      }
      quantise(rendered, quantum);
    }
    if (s.kind === 'counter') accumulate(s, rendered, o, rng, spec.stepMs);
    punchGaps(rendered, s.gapProbability, rng);
    return { name: s.name, labels: s.labels, unit: s.unit, kind: s.kind, trueFamily: s.trueFamily, role: s.role.key, values: rendered };
  });
  const incidents = request.faults
    .filter((f) => f.label !== 'normal')
    .map((f) => ({ label: f.label, startIndex: f.startIndex, endIndex: Math.min(n - 1, f.endIndex) }))
    .sort((a, b) => a.startIndex - b.startIndex);
  const system: SimSystem = { id: spec.id, seed: spec.seed, namingStyle: spec.namingStyle, stepMs: spec.stepMs, timesMs, series, incidents };
  return quiet ? { ...system, observables: { faulted: o, counterfactual: quiet } } : system;
}
