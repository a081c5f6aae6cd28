/**
 * Baselines for the classifier evaluation (issue 3): trained on the same training split and scored
 * on the same held-out systems as our model. The neural baselines read the same encoded node rows
 * (encodeBatch) as our model, so only the architecture differs.
 */
import * as tf from '@tensorflow/tfjs-core';
import '@tensorflow/tfjs-backend-cpu';
import { DEFAULT_WINDOW_SPEC, encodeBatch, getRowLength } from '../../extension/core/model/encode';
import { CLASSES, type NodeBatch } from '../../extension/core/model/types';
import type { TrainingExample } from '../simulator/types';
import { computeFamilySummary } from './familySummary';
import { createGcnBaseline, createGinBaseline } from './graphBaselines';
import { initGruParameters } from './gruParameters';
import { fitNearestCentroid, predictNearestCentroid } from './nearestCentroid';
import { fitRandomForest, predictRandomForest } from './randomForest';
import type { NodeSetModel, NodeSetModelSpec } from './nodeSetModel';
import { createRandom } from './seededRandom';
import { predictGruNetwork, trainGruNetwork } from './trainGruNetwork';
import { predictNodeSetModel, trainNodeSetModel } from './trainNodeSetModel';

/** One baseline's predictions on the test split. */
export interface BaselineResult {
  readonly name: string;
  /** predicted[i] = index into CLASSES for test[i]. */
  readonly predicted: Int32Array;
  /** Wall-clock training time (feature extraction/encoding of the training split included), seconds. */
  readonly trainSeconds: number;
}

/** Options of {@link scoreBaselines}. */
export interface BaselineOptions {
  /** Seed of weight init and minibatch order (default 7). */
  readonly seed?: number;
  /** Epochs of the neural baselines (default 3; training time grows linearly with it). */
  readonly epochs?: number;
  /** Adam learning rate of the GCN and GIN baselines (default 3e-3). */
  readonly learningRate?: number;
  /**
   * Peak Adam learning rate of the GRU baseline (default 3e-2, cosine-decayed over the run). The
   * shared 3e-3 left it near the chance loss ln 8 ≈ 2.08: measured on 2,000 simulated training
   * examples × 4 epochs at a constant rate, the training loss fell to 1.83 at 3e-3, 1.57 at 1e-2 and
   * 1.25 at 3e-2 (largest minibatch gradient norm about 1, so no clipping is needed), so
   * the GRU was under-trained, not unable to learn.
   */
  readonly gruLearningRate?: number;
  /** Minibatch size of the neural baselines (default 64). */
  readonly batchSize?: number;
  /** Which baselines to train (default all): a longer run can then afford the slow ones it keeps. */
  readonly only?: readonly BaselineKind[];
  readonly log?: (line: string) => void;
}

/** Baseline families that {@link BaselineOptions.only} can select. */
export const BASELINE_KINDS = ['gcn', 'gin', 'gru', 'statistics'] as const;
export type BaselineKind = (typeof BASELINE_KINDS)[number];

/** The three splits, as buildSplits returns them. */
export interface BaselineSplit {
  readonly train: readonly TrainingExample[];
  readonly calibration: readonly TrainingExample[];
  readonly test: readonly TrainingExample[];
}

/** Class index of a label, or -1 for classes the bundled model does not know (held-out classes). */
function toClassIndex(label: string): number {
  return (CLASSES as readonly string[]).indexOf(label);
}

function encodeEach(examples: readonly TrainingExample[]): NodeBatch[] {
  return examples.map((e) => encodeBatch([e.metrics], DEFAULT_WINDOW_SPEC));
}

/**
 * Trains the baselines on `split.train` (examples whose label is not in CLASSES are skipped) and
 * predicts every example of `split.test` (predicted[i] = index into CLASSES for test[i]). The
 * calibration split is not used (the baselines need no temperature). Deterministic for a given seed. Order of results: GCN, GIN, GRU, family-statistics
 * nearest centroid, family-statistics random forest.
 * @throws Error when the training split has no example with a known class.
 */
export async function scoreBaselines(
  split: BaselineSplit,
  options: BaselineOptions = {},
): Promise<Array<{ name: string; predicted: Int32Array; trainSeconds: number }>> {
  const batchSize = options.batchSize ?? 64;
  const learningRate = options.learningRate ?? 3e-3;
  await tf.setBackend('cpu');
  const seed = options.seed ?? 7;
  const epochs = options.epochs ?? 3;
  const log = options.log ?? (() => undefined);
  const train = split.train.filter((e) => toClassIndex(e.label) >= 0);
  if (train.length === 0) throw new Error(`expected training examples with a class in ${CLASSES.join(', ')}, got none of ${split.train.length}`);
  const labels = Int32Array.from(train, (e) => toClassIndex(e.label));
  const results: BaselineResult[] = [];

  const encodeStart = performance.now();
  const trainEncoded = encodeEach(train);
  const encodeSeconds = (performance.now() - encodeStart) / 1000;
  const testEncoded = encodeEach(split.test);
  const spec: NodeSetModelSpec = {
    windowLength: getRowLength(DEFAULT_WINDOW_SPEC), sequenceLength: DEFAULT_WINDOW_SPEC.sampleCount,
    classCount: CLASSES.length, hiddenSize: 32,
  };
  const isWanted = (kind: BaselineKind): boolean => options.only === undefined || options.only.includes(kind);
  const builders: ReadonlyArray<(random: () => number) => NodeSetModel> = [
    (random) => createGcnBaseline(spec, random),
    (random) => createGinBaseline(spec, random),
  ];
  for (const [k, build] of builders.entries()) {
    if (!isWanted(k === 0 ? 'gcn' : 'gin')) continue;
    const random = createRandom(seed * 1000 + k);
    const model = build(random);
    const start = performance.now();
    await trainNodeSetModel(model, trainEncoded, labels, CLASSES.length, { epochs, batchSize, learningRate, random, log });
    const trainSeconds = encodeSeconds + (performance.now() - start) / 1000;
    results.push({ name: model.name, predicted: predictNodeSetModel(model, testEncoded), trainSeconds });
    log(`${model.name}: trained in ${trainSeconds.toFixed(1)} s`);
    model.variables.forEach((v) => v.dispose());
  }

  if (isWanted('gru')) {
    const random = createRandom(seed * 1000 + builders.length);
    const gru = initGruParameters({ rowLength: spec.windowLength, sequenceLength: spec.sequenceLength, hiddenSize: 16, classCount: CLASSES.length }, random);
    const start = performance.now();
    await trainGruNetwork(gru, trainEncoded, labels, { epochs, batchSize, learningRate: options.gruLearningRate ?? 3e-2, random, log });
    const trainSeconds = encodeSeconds + (performance.now() - start) / 1000;
    results.push({ name: 'GRU per metric (hidden 16, mean pooling)', predicted: predictGruNetwork(gru, testEncoded), trainSeconds });
    log(`GRU: trained in ${trainSeconds.toFixed(1)} s`);
  }

  if (!isWanted('statistics')) return results;
  const summaryStart = performance.now();
  const trainSummaries = train.map((e) => computeFamilySummary(e.metrics));
  const summarySeconds = (performance.now() - summaryStart) / 1000;
  const testSummaries = split.test.map((e) => computeFamilySummary(e.metrics));
  const centroidStart = performance.now();
  const centroids = fitNearestCentroid(trainSummaries, labels, CLASSES.length);
  results.push({
    name: 'Family statistics + nearest centroid',
    predicted: predictNearestCentroid(centroids, testSummaries),
    trainSeconds: summarySeconds + (performance.now() - centroidStart) / 1000,
  });
  const forestStart = performance.now();
  const forest = fitRandomForest(trainSummaries, labels, CLASSES.length, { treeCount: 60, maxDepth: 12, minLeafSize: 3, random: createRandom(seed * 1000 + 99) });
  results.push({
    name: 'Family statistics + random forest (60 trees)',
    predicted: predictRandomForest(forest, testSummaries, CLASSES.length),
    trainSeconds: summarySeconds + (performance.now() - forestStart) / 1000,
  });
  log(`non-neural baselines trained in ${(summarySeconds + (performance.now() - centroidStart) / 1000).toFixed(1)} s`);
  return results;
}
