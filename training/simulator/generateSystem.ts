/** A whole simulated system with injected incidents on a long grid (for demos, detectors, checks). */
import { CLASSES } from '../../extension/core/model/types';
import type { FaultPlan } from './faults';
import { createRandom, hashString, mixSeeds } from './random';
import { renderSystem } from './renderSystem';
import { buildSystemSpec } from './systemSpec';
import type { SimClass, SimSystem } from './types';

export interface GenerateOptions {
  /** Faults to inject, once each, in this order; default one or two random built-in faults. */
  readonly faults?: readonly SimClass[];
  /** Grid length in steps; default 1,440. */
  readonly lengthSteps?: number;
}

/**
 * System `seed` rendered over `lengthSteps` steps with each listed fault injected once, in
 * order, non-overlapping, after the first quarter of the grid (so each has a baseline).
 * Incident durations are 3 to 120 steps, scaled down when many faults must fit.
 * Throws when the faults cannot fit (fewer than 8 steps per fault after the first quarter).
 */
export function generateSystem(seed: number, options: GenerateOptions = {}): SimSystem {
  const spec = buildSystemSpec(seed);
  const lengthSteps = options.lengthSteps ?? 1440;
  if (!Number.isInteger(lengthSteps) || lengthSteps < 16) {
    throw new Error(`generateSystem: expected lengthSteps as an integer >= 16, got ${lengthSteps}`);
  }
  const rng = createRandom(mixSeeds(seed, hashString((options.faults ?? ['default']).join(',')), lengthSteps));
  const faults: readonly SimClass[] = options.faults
    ?? Array.from({ length: rng.int(1, 2) }, () => rng.pick(CLASSES.filter((c) => c !== 'normal')));
  const first = Math.floor(lengthSteps / 4);
  const slot = faults.length > 0 ? Math.floor((lengthSteps - first) / faults.length) : 0;
  if (faults.length > 0 && slot < 8) {
    throw new Error(`generateSystem: expected at least 8 steps per fault after the first quarter, got ${slot} for ${faults.length} faults in ${lengthSteps} steps`);
  }
  const plans: FaultPlan[] = faults.map((label, k) => {
    const duration = Math.max(3, Math.min(Math.floor(slot * 0.6), rng.int(3, 120)));
    const start = first + k * slot + rng.int(0, slot - duration - 1);
    return { label, startIndex: start, endIndex: start + duration - 1, intensity: rng.uniform(0.3, 1) };
  });
  const startMs = Date.UTC(2026, 2, 1) + Math.floor(rng.uniform(0, 200 * 86_400_000) / spec.stepMs) * spec.stepMs;
  return renderSystem(spec, { lengthSteps, startMs, faults: plans, benignPerStep: 1 / 200 }, rng);
}
