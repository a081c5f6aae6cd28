/**
 * Labelled classifier examples drawn from simulated systems: per metric a baseline and a window
 * (counters as per-second rates), families as inference would infer them from the names.
 */
import { inferFamily } from '../../extension/core/frame/families';
import type { Family } from '../../extension/core/frame/types';
import { CLASSES } from '../../extension/core/model/types';
import type { MetricWindow } from '../../extension/core/model/types';
import { BENIGN_KINDS, QUIET_WINDOW_KINDS } from './benignEvents';
import { convertCounterToRates } from './counterRates';
import { measureFaultEvidence } from './faultEvidence';
import type { FaultPlan } from './faults';
import { createRandom, mixSeeds, type Random } from './random';
import { renderSystem } from './renderSystem';
import { buildSystemSpec, type SeriesSpec, type SystemSpec } from './systemSpec';
import type { MetricTruth, SimClass, TrainingExample } from './types';
import { resolveDifficulty, resolveDifficultyCached, type Difficulty, type ResolvedDifficulty } from './difficulty';

export type { Difficulty } from './difficulty';

export interface SampleOptions {
  readonly seed: number;
  readonly count: number;
  readonly systemSeeds: readonly number[];
  readonly classes?: readonly SimClass[];
  /** Inclusive range of window lengths in steps; default [3, 64]. */
  readonly windowSteps?: readonly [number, number];
  /** Inclusive range of baseline lengths in steps; default [3, 720]. */
  readonly baselineSteps?: readonly [number, number];
  readonly difficulty?: Difficulty;
  /**
   * Index of the first example to draw (default 0): examples [firstIndex, firstIndex + count) are
   * those of one call drawing firstIndex + count, so a large set can be drawn in chunks.
   */
  readonly firstIndex?: number;
}

/** Draws per fault example before the last one is kept whatever its evidence (rare: see README). */
const MAX_EVIDENCE_ATTEMPTS = 12;

/** Typical incident durations, ms (log-uniform between the bounds). */
const DURATION_MS: Readonly<Record<SimClass, readonly [number, number]>> = {
  normal: [60_000, 60_000],
  cpu_saturation: [180_000, 7_200_000],
  memory_leak: [1_200_000, 43_200_000],
  disk_io_saturation: [180_000, 3_600_000],
  network_latency: [120_000, 3_600_000],
  packet_loss: [120_000, 3_600_000],
  traffic_surge: [300_000, 7_200_000],
  error_storm: [120_000, 3_600_000],
  connection_pool_exhaustion: [180_000, 3_600_000],
  cpu_steal_noisy_neighbour: [600_000, 10_800_000],
};

/** Roles that carry each fault's key signal; dropped together at random (vantage points). */
export const KEY_ROLES: Readonly<Record<SimClass, readonly string[]>> = {
  normal: [],
  cpu_saturation: ['cpuUtil', 'cpuIdle'],
  memory_leak: ['memUsed', 'memRatio', 'memAvailable'],
  disk_io_saturation: ['diskBusy', 'diskQueue'],
  network_latency: ['callerLatency', 'clientLatency'],
  packet_loss: ['retrans', 'drops'],
  traffic_surge: ['requests'],
  error_storm: ['errorRatio', 'successRatio', 'errorCount'],
  connection_pool_exhaustion: ['poolUse', 'poolPending'],
  cpu_steal_noisy_neighbour: ['cpuSteal'],
};

const BASE_TIME_MS = Date.UTC(2026, 0, 5);

const familyCache = new WeakMap<SeriesSpec, Family>();
/** inferFamily is pure, and a system's series specs recur in every example drawn from it. */
function inferSpecFamily(spec: SeriesSpec): Family {
  let family = familyCache.get(spec);
  if (family === undefined) {
    family = inferFamily(spec.name, spec.unit, spec.labels);
    familyCache.set(spec, family);
  }
  return family;
}

function validateRange(name: string, range: readonly [number, number]): void {
  const [lo, hi] = range;
  if (!Number.isInteger(lo) || !Number.isInteger(hi) || lo < 3 || hi < lo) {
    throw new Error(`sampleExamples: expected ${name} as integers [lo, hi] with 3 <= lo <= hi, got [${lo}, ${hi}]`);
  }
}

/** Window length: half log-uniform (short windows are common in practice), half uniform. */
function drawLength(rng: Random, [lo, hi]: readonly [number, number]): number {
  if (lo === hi) return lo;
  const x = rng.chance(0.5) ? rng.logUniform(lo, hi + 1) : rng.uniform(lo, hi + 1);
  return Math.min(hi, Math.max(lo, Math.floor(x)));
}

interface Layout {
  readonly lengthSteps: number;
  readonly baselineStart: number;
  readonly windowStart: number;
  readonly windowSteps: number;
  readonly baselineSteps: number;
  readonly fault?: FaultPlan;
}

function planLayout(spec: SystemSpec, label: SimClass, rng: Random, windowSteps: number, baselineSteps: number, weakFaultShare: number): Layout {
  const baselineStart = 1; // index 0 only feeds the first counter rate
  const anchor = baselineStart + baselineSteps + (rng.chance(0.3) ? rng.int(1, 2) : 0);
  if (label === 'normal') {
    return { lengthSteps: anchor + windowSteps, baselineStart, windowStart: anchor, windowSteps, baselineSteps };
  }
  const [loMs, hiMs] = DURATION_MS[label];
  const drawn = Math.round(rng.logUniform(loMs, hiMs) / spec.stepMs);
  // The incident fills most of a window: a window that is mostly quiet is not a fault example.
  const duration = Math.max(3, Math.ceil(windowSteps * 0.6), Math.min(300, drawn));
  // Windows deep inside long incidents are capped at 48 steps after onset: the steps between
  // baseline and window cost rendering time and add nothing the window does not show.
  // A leak is only visible once it has grown, so its windows may sit anywhere in the ramp.
  const maxLead = label === 'memory_leak' ? duration - windowSteps : Math.min(48, duration - windowSteps);
  let lead = rng.chance(label === 'memory_leak' ? 0.1 : 0.4) ? -rng.int(0, Math.floor(windowSteps * 0.3)) : rng.int(0, Math.max(0, maxLead));
  // Some leak windows reach past the end of the ramp, so they hold the OOM kill and restart.
  if (label === 'memory_leak' && windowSteps >= 6 && rng.chance(0.25)) lead = Math.max(0, duration - windowSteps) + rng.int(1, Math.floor(windowSteps * 0.3));
  const onset = lead >= 0 ? anchor : anchor - lead;
  const windowStart = lead >= 0 ? anchor + lead : anchor;
  const windowEnd = windowStart + windowSteps - 1;
  const incidentEnd = onset + duration - 1;
  // Nothing after the window can reach the example (all noise is causal), so stop rendering there.
  const lengthSteps = windowEnd + 1;
  const intensity = rng.chance(weakFaultShare) ? rng.uniform(0.15, 0.4) : rng.uniform(0.4, 1);
  return { lengthSteps, baselineStart, windowStart, windowSteps, baselineSteps, fault: { label, startIndex: onset, endIndex: incidentEnd, intensity } };
}

function chooseKept(spec: SystemSpec, label: SimClass, rng: Random, difficulty: ResolvedDifficulty): boolean[] {
  const keep = spec.series.map(() => true);
  if (rng.chance(difficulty.keyMetricDropProbability)) {
    const key = new Set(KEY_ROLES[label]);
    spec.series.forEach((s, k) => { if (key.has(s.role.key)) keep[k] = false; });
  }
  if (rng.chance(difficulty.randomDropProbability)) {
    const dropShare = rng.uniform(0.1, 0.5);
    keep.forEach((_, k) => { if (rng.chance(dropShare)) keep[k] = false; });
  }
  if (!keep.some(Boolean)) keep[rng.int(0, keep.length - 1)] = true;
  return keep;
}

/**
 * Draws one example of class `label` from system `spec`. A fault example whose fault stays inside
 * the noise of every exported metric (evidence below difficulty.minFaultEvidence) is drawn again
 * from the same generator, up to MAX_EVIDENCE_ATTEMPTS times; the example records its evidence.
 */
export function sampleOneExample(spec: SystemSpec, label: SimClass, rng: Random, windowRange: readonly [number, number], baselineRange: readonly [number, number], difficulty?: Difficulty): TrainingExample {
  return sampleWithSlab(spec, label, rng, windowRange, baselineRange, resolveDifficultyCached(difficulty), new ValueSlab());
}

function sampleWithSlab(spec: SystemSpec, label: SimClass, rng: Random, windowRange: readonly [number, number], baselineRange: readonly [number, number], knobs: ResolvedDifficulty, slab: ValueSlab): TrainingExample {
  const isChecked = label !== 'normal' && knobs.minFaultEvidence > 0;
  for (let attempt = 1; ; attempt += 1) {
    // A draw the evidence rejects is not assembled (assembling takes no random draws).
    const example = drawExample(spec, label, rng, windowRange, baselineRange, knobs, isChecked, attempt >= MAX_EVIDENCE_ATTEMPTS, slab);
    if (example) return example;
  }
}

/**
 * Hands out views of large shared buffers for the examples' baselines and windows: one
 * allocation per ~0.5 MB of values instead of one per example, which the collector then has to
 * track. Views keep their slab alive, which is what holding the examples means anyway.
 */
class ValueSlab {
  private buffer = new Float64Array(0);
  private used = 0;

  take(length: number): Float64Array {
    if (this.used + length > this.buffer.length) {
      this.buffer = new Float64Array(Math.max(length, SLAB_VALUES));
      this.used = 0;
    }
    const view = this.buffer.subarray(this.used, this.used + length);
    this.used += length;
    return view;
  }
}
const SLAB_VALUES = 65_536;

/**
 * One draw of an example; undefined when the evidence check rejects it (isChecked, evidence below
 * the minimum, and not the last attempt), as sampleOneExample has always decided.
 */
function drawExample(spec: SystemSpec, label: SimClass, rng: Random, windowRange: readonly [number, number], baselineRange: readonly [number, number], knobs: ResolvedDifficulty, isChecked: boolean, isLastAttempt: boolean, slab: ValueSlab): TrainingExample | undefined {
  const windowSteps = drawLength(rng, windowRange);
  const baselineSteps = Math.floor(Math.min(baselineRange[1], Math.max(baselineRange[0], rng.logUniform(baselineRange[0], baselineRange[1] + 1))));
  const layout = planLayout(spec, label, rng, windowSteps, baselineSteps, knobs.weakFaultShare);
  const benignEvents = [];
  if (label === 'normal' && rng.chance(0.6)) benignEvents.push({ kind: rng.pick(QUIET_WINDOW_KINDS), at: layout.windowStart + rng.int(0, windowSteps - 1) });
  if (rng.chance(0.15)) benignEvents.push({ kind: rng.pick(BENIGN_KINDS), at: layout.baselineStart + rng.int(0, baselineSteps - 1) });
  const startMs = BASE_TIME_MS + Math.floor(rng.uniform(0, 300 * 86_400_000) / spec.stepMs) * spec.stepMs;
  const keep = chooseKept(spec, label, rng, knobs);
  // Only the metrics this vantage point exports are rendered: dropped ones cost nothing.
  const kept = spec.series.filter((_, k) => keep[k]);
  const system = renderSystem({ ...spec, series: kept }, {
    lengthSteps: layout.lengthSteps, startMs, faults: layout.fault ? [layout.fault] : [],
    benignPerStep: rng.uniform(0, 1 / 100), benignEvents, keepCounterfactual: isChecked, reuseBuffers: true,
    counterfactualSteps: [layout.windowStart, layout.windowStart + windowSteps],
  }, rng);
  const baselineEnd = layout.baselineStart + baselineSteps;
  const windowEnd = layout.windowStart + windowSteps;
  const sources = system.series.map((s) => (s.kind === 'counter' ? convertCounterToRates(s.values, system.stepMs) : s.values));
  // Evidence first, on the baselines in place (the same values the example would copy).
  const faultEvidence = system.observables
    ? measureFaultEvidence(kept.map((spec, k) => ({ spec, baseline: (sources[k] as Float64Array).subarray(layout.baselineStart, baselineEnd) })), system.observables, layout.windowStart, windowSteps)
    : undefined;
  if (isChecked && !isLastAttempt && !((faultEvidence as number) >= knobs.minFaultEvidence)) return undefined;
  const metrics: MetricWindow[] = [];
  const truth: MetricTruth[] = [];
  const rangeLength = (length: number, start: number, end: number): number => Math.max(0, Math.min(end, length) - start);
  const copyRange = (values: Float64Array, start: number, end: number): Float64Array => {
    const length = rangeLength(values.length, start, end);
    const view = slab.take(length);
    view.set(values.subarray(start, start + length));
    return view;
  };
  system.series.forEach((s, k) => {
    const isCounter = s.kind === 'counter';
    const values = sources[k] as Float64Array;
    metrics.push({
      id: (kept[k] as SeriesSpec).id,
      name: s.name,
      labels: s.labels,
      family: inferSpecFamily(kept[k] as SeriesSpec),
      baseline: copyRange(values, layout.baselineStart, baselineEnd),
      window: copyRange(values, layout.windowStart, windowEnd),
    });
    truth.push({ role: s.role ?? 'unknown', trueFamily: s.trueFamily, isCounter, name: s.name, unit: s.unit, labels: s.labels });
  });
  return { label, systemId: spec.id, metrics, truth, stepMs: spec.stepMs, namingStyle: spec.namingStyle, ...(faultEvidence !== undefined ? { faultEvidence } : {}) };
}

/**
 * Labelled examples, balanced over `classes` (counts differ by at most one, in round-robin
 * order), each from a system picked from `systemSeeds`. Deterministic in (seed, systemSeeds).
 * Throws on an empty class list, no system seeds or invalid length ranges.
 */
export function sampleExamples(options: SampleOptions): TrainingExample[] {
  const classes = options.classes ?? CLASSES;
  const windowRange = options.windowSteps ?? [3, 64];
  const baselineRange = options.baselineSteps ?? [3, 720];
  if (classes.length === 0) throw new Error('sampleExamples: expected at least one class, got 0');
  if (options.systemSeeds.length === 0) throw new Error('sampleExamples: expected at least one system seed, got 0');
  if (!Number.isInteger(options.count) || options.count < 0) throw new Error(`sampleExamples: expected count as a non-negative integer, got ${options.count}`);
  const firstIndex = options.firstIndex ?? 0;
  if (!Number.isInteger(firstIndex) || firstIndex < 0) throw new Error(`sampleExamples: expected firstIndex as a non-negative integer, got ${firstIndex}`);
  validateRange('windowSteps', windowRange);
  validateRange('baselineSteps', baselineRange);
  const knobs = resolveDifficulty(options.difficulty);
  const slab = new ValueSlab();
  const specs = new Map<number, SystemSpec>();
  const examples: TrainingExample[] = [];
  for (let i = firstIndex; i < firstIndex + options.count; i += 1) {
    const rng = createRandom(mixSeeds(options.seed, i, 0xe1a));
    const systemSeed = rng.pick(options.systemSeeds);
    let spec = specs.get(systemSeed);
    if (!spec) {
      spec = buildSystemSpec(systemSeed);
      specs.set(systemSeed, spec);
    }
    examples.push(sampleWithSlab(spec, classes[i % classes.length] as SimClass, rng, windowRange, baselineRange, knobs, slab));
  }
  return examples;
}
