/**
 * Train / calibration / test sets from disjoint simulated systems, so evaluation always sees
 * whole systems (metric subsets, names, steps) that training never saw; and few-shot sets for
 * the held-out fault classes with support and query from disjoint systems.
 */
import { CLASSES } from '../../extension/core/model/types';
import { mixSeeds } from './random';
import { sampleExamples, type Difficulty, type SampleOptions } from './sampleExamples';
import type { HeldOutClass, TrainingExample } from './types';

export interface SplitOptions {
  readonly trainCount?: number;
  readonly calibrationCount?: number;
  readonly testCount?: number;
  /** Systems per split; defaults 300 / 80 / 80. */
  readonly trainSystems?: number;
  readonly calibrationSystems?: number;
  readonly testSystems?: number;
  /** Difficulty of all three splits (default: the realistic defaults of sampleExamples). */
  readonly difficulty?: Difficulty;
  /** Overrides `difficulty` for train only (e.g. a cleaner curriculum, same held-out test). */
  readonly trainDifficulty?: Difficulty;
}

export interface Splits {
  readonly train: TrainingExample[];
  readonly calibration: TrainingExample[];
  readonly test: TrainingExample[];
}

export const HELD_OUT_CLASSES: readonly HeldOutClass[] = ['connection_pool_exhaustion', 'cpu_steal_noisy_neighbour'];

/**
 * `count` system seeds for split number `split`, all distinct from every other split's seeds
 * (a shared set guards against the rare 32-bit collision).
 */
export function drawSystemSeeds(seed: number, split: number, count: number, taken: Set<number>): number[] {
  const seeds: number[] = [];
  for (let k = 0; seeds.length < count; k += 1) {
    const s = mixSeeds(seed, split, k, 0x5711);
    if (taken.has(s)) continue;
    taken.add(s);
    seeds.push(s);
  }
  return seeds;
}

/** Systems of the train split unless SplitOptions say otherwise. */
export const DEFAULT_TRAIN_SYSTEMS = 300;

/**
 * What buildSplits draws, as sampleExamples options: a caller can draw the (large) train split in
 * chunks with `firstIndex` and encode each chunk as it goes, instead of holding it all.
 */
export function describeSplits(seed: number, options: SplitOptions = {}): { readonly train: SampleOptions; readonly calibration: SampleOptions; readonly test: SampleOptions } {
  const taken = new Set<number>();
  const trainSeeds = drawSystemSeeds(seed, 1, options.trainSystems ?? DEFAULT_TRAIN_SYSTEMS, taken);
  const calibrationSeeds = drawSystemSeeds(seed, 2, options.calibrationSystems ?? 80, taken);
  const testSeeds = drawSystemSeeds(seed, 3, options.testSystems ?? 80, taken);
  const trainDifficulty = options.trainDifficulty ?? options.difficulty;
  const difficulty = options.difficulty;
  return {
    train: { seed: mixSeeds(seed, 11), count: options.trainCount ?? 6000, systemSeeds: trainSeeds, classes: CLASSES, ...(trainDifficulty ? { difficulty: trainDifficulty } : {}) },
    calibration: { seed: mixSeeds(seed, 12), count: options.calibrationCount ?? 1500, systemSeeds: calibrationSeeds, classes: CLASSES, ...(difficulty ? { difficulty } : {}) },
    test: { seed: mixSeeds(seed, 13), count: options.testCount ?? 1500, systemSeeds: testSeeds, classes: CLASSES, ...(difficulty ? { difficulty } : {}) },
  };
}

/** Built-in classes only, balanced; defaults 6,000 / 1,500 / 1,500 examples. */
export function buildSplits(seed: number, options: SplitOptions = {}): Splits {
  const described = describeSplits(seed, options);
  return { train: sampleExamples(described.train), calibration: sampleExamples(described.calibration), test: sampleExamples(described.test) };
}

export interface FewShotOptions {
  readonly supportPerClass?: number;
  readonly queryPerClass?: number;
  /** Systems of the main train split whose seeds are reserved (default DEFAULT_TRAIN_SYSTEMS). */
  readonly trainSystems?: number;
}

export interface FewShotSplits {
  readonly classes: readonly HeldOutClass[];
  /** Labelled examples a team would add to its library (default 5 per class). */
  readonly support: TrainingExample[];
  /** Examples to classify against the prototypes (default 100 per class). */
  readonly query: TrainingExample[];
}

/** Held-out classes only; support and query come from disjoint systems, also disjoint from buildSplits(seed). */
export function buildFewShotSplits(seed: number, options: FewShotOptions = {}): FewShotSplits {
  const taken = new Set<number>();
  // Reserve the main splits' seeds so few-shot systems are new to the trained model as well.
  drawSystemSeeds(seed, 1, options.trainSystems ?? DEFAULT_TRAIN_SYSTEMS, taken);
  drawSystemSeeds(seed, 2, 80, taken);
  drawSystemSeeds(seed, 3, 80, taken);
  const supportSeeds = drawSystemSeeds(seed, 4, 20, taken);
  const querySeeds = drawSystemSeeds(seed, 5, 60, taken);
  const support = (options.supportPerClass ?? 5) * HELD_OUT_CLASSES.length;
  const query = (options.queryPerClass ?? 100) * HELD_OUT_CLASSES.length;
  return {
    classes: HELD_OUT_CLASSES,
    support: sampleExamples({ seed: mixSeeds(seed, 14), count: support, systemSeeds: supportSeeds, classes: HELD_OUT_CLASSES }),
    query: sampleExamples({ seed: mixSeeds(seed, 15), count: query, systemSeeds: querySeeds, classes: HELD_OUT_CLASSES }),
  };
}
