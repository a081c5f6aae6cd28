/**
 * `npm run train [-- --seed N --quick]`: simulate → encode (same code as inference) → train the set
 * model → fit the temperature on the calibration split → write media/model/classifier.onnx and
 * classifier.json (with the onnx file's sha256). Same seed and sizes → byte-identical files.
 */
import { createHash } from 'node:crypto';
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { FAMILIES } from '../extension/core/frame/types';
import { DEFAULT_WINDOW_SPEC, getRowLength } from '../extension/core/model/encode';
import { CLASSES } from '../extension/core/model/types';
import { computeFeatureNormalization, encodeExamples, type EncodedExample } from './buildDataset';
import { fitTemperature, computeProbabilities } from './calibration';
import { encodeInWorkers } from './encodeInWorkers';
import { writeClassifierOnnx } from './onnx/writeClassifierOnnx';
import { DEFAULT_SHAPE, forwardSetModel, type SetModelWeights } from './setModel';
import { describeSplits, sampleExamples, type SampleOptions } from './simulator';
import { trainSetModel, type TrainOptions } from './trainSetModel';

export const MODEL_DIR = join(__dirname, '..', 'media', 'model');
export const MODEL_VERSION = '0.3.0';

/** Training recipe; evaluate.ts rebuilds the same splits from these numbers. */
export interface TrainRecipe {
  readonly seed: number;
  readonly trainCount: number;
  readonly calibrationCount: number;
  readonly testCount: number;
  readonly epochs: number;
  readonly abstainThreshold: number;
  /** Simulated systems the train split is drawn from (calibration and test: 80 each). */
  readonly trainSystems: number;
}

export const FULL_RECIPE: TrainRecipe = { seed: 20261202, trainCount: 150000, calibrationCount: 2000, testCount: 2000, epochs: 8, abstainThreshold: 0.5, trainSystems: 1500 };
export const QUICK_RECIPE: TrainRecipe = { seed: 20261202, trainCount: 3000, calibrationCount: 800, testCount: 800, epochs: 6, abstainThreshold: 0.5, trainSystems: 300 };

/** Training examples whose embeddings give the class centroids (out-of-distribution check, library). */
const CENTROID_EXAMPLES = 40_000;

/** Draws and encodes a split chunk by chunk, so the raw windows of only one chunk are held at a time. */
export function encodeInChunks(options: SampleOptions, chunkSize = 4000): EncodedExample[] {
  const out: EncodedExample[] = [];
  for (let first = 0; first < options.count; first += chunkSize) {
    const chunk = sampleExamples({ ...options, firstIndex: first, count: Math.min(chunkSize, options.count - first) });
    for (const example of encodeExamples(chunk, DEFAULT_WINDOW_SPEC)) out.push(example);
  }
  return out;
}

/** Logits [n, C] and embeddings [n, D] of encoded examples under `weights` (reference forward pass). */
export function predictAll(weights: SetModelWeights, examples: readonly EncodedExample[]): { logits: Float64Array; embeddings: Float64Array } {
  const c = weights.shape.classCount;
  const d = weights.shape.embeddingSize;
  const logits = new Float64Array(examples.length * c);
  const embeddings = new Float64Array(examples.length * d);
  examples.forEach((ex, i) => {
    const out = forwardSetModel(weights, ex.features, ex.familyIds, ex.mask);
    logits.set(out.logits, i * c);
    embeddings.set(out.embedding, i * d);
  });
  return { logits, embeddings };
}

function computeCentroids(embeddings: Float64Array, labels: readonly number[], d: number): number[][] {
  const sums = CLASSES.map(() => new Float64Array(d));
  const counts = CLASSES.map(() => 0);
  labels.forEach((label, i) => { counts[label]++; for (let j = 0; j < d; j++) sums[label][j] += embeddings[i * d + j]; });
  return sums.map((s, k) => Array.from(s, (v) => Number((v / Math.max(counts[k], 1)).toFixed(6))));
}

function computeNearestDistances(embeddings: Float64Array, centroids: number[][], d: number): number[] {
  const out: number[] = [];
  for (let i = 0; i < embeddings.length / d; i++) {
    let best = Infinity;
    for (const c of centroids) {
      let s = 0;
      for (let j = 0; j < d; j++) s += (embeddings[i * d + j] - c[j]) ** 2;
      best = Math.min(best, Math.sqrt(s));
    }
    out.push(best);
  }
  return out;
}

function readRecipe(argv: readonly string[]): TrainRecipe {
  const base = argv.includes('--quick') ? QUICK_RECIPE : FULL_RECIPE;
  const seedAt = argv.indexOf('--seed');
  const seed = seedAt >= 0 ? Number(argv[seedAt + 1]) : base.seed;
  if (!Number.isInteger(seed)) throw new Error(`--seed: expected an integer, got ${argv[seedAt + 1]}`);
  return { ...base, seed };
}

async function main(): Promise<void> {
  const recipe = readRecipe(process.argv.slice(2));
  const started = Date.now();
  const log = (msg: string): void => { process.stdout.write(`[${((Date.now() - started) / 1000).toFixed(0)} s] ${msg}\n`); };
  log(`simulating (seed ${recipe.seed}, ${recipe.trainCount}/${recipe.calibrationCount}/${recipe.testCount} examples)`);
  const described = describeSplits(recipe.seed, { trainCount: recipe.trainCount, calibrationCount: recipe.calibrationCount, testCount: recipe.testCount, trainSystems: recipe.trainSystems });
  // Drawn and encoded on two worker threads; the same examples as encodeInChunks, in the same order.
  const train = await encodeInWorkers(described.train);
  const calibration = await encodeInWorkers(described.calibration);
  log(`encoded ${train.length} train, ${calibration.length} calibration examples`);
  const normalization = computeFeatureNormalization(train);
  const options: TrainOptions = {
    epochs: recipe.epochs, batchSize: 64, learningRate: 3e-3, weightDecay: 1e-5, nodeDropoutRate: 0.5, seed: recipe.seed, shardCount: 2,
    onEpoch: (epoch, loss, seconds) => log(`epoch ${epoch + 1}/${recipe.epochs}: loss ${loss.toFixed(4)} (${seconds.toFixed(1)} s)`),
  };
  const weights = await trainSetModel(train, DEFAULT_SHAPE, normalization, options);
  const c = DEFAULT_SHAPE.classCount;
  const d = DEFAULT_SHAPE.embeddingSize;
  const cal = predictAll(weights, calibration);
  const calLabels = calibration.map((e) => e.label);
  const temperature = fitTemperature(cal.logits, calLabels, c);
  const probs = computeProbabilities(cal.logits, c, temperature);
  let correct = 0;
  calLabels.forEach((label, i) => { let best = 0; for (let j = 1; j < c; j++) if (probs[i * c + j] > probs[i * c + best]) best = j; if (best === label) correct++; });
  log(`temperature ${temperature.toFixed(4)}; calibration accuracy ${(correct / calLabels.length).toFixed(4)}`);
  // Class centroids of the embedding from a balanced prefix of the train split (classes are drawn round-robin).
  const centroidSet = train.slice(0, CENTROID_EXAMPLES);
  const trainPred = predictAll(weights, centroidSet);
  const centroids = computeCentroids(trainPred.embeddings, centroidSet.map((e) => e.label), d);
  const distances = computeNearestDistances(cal.embeddings, centroids, d).sort((a, b) => a - b);
  // Out of distribution = farther from every class centroid than 1.5 × the 99th percentile of held-out in-distribution data.
  const oodDistance = 1.5 * distances[Math.min(distances.length - 1, Math.floor(0.99 * distances.length))];
  const priors = CLASSES.map((_, k) => train.filter((e) => e.label === k).length / train.length);
  const bytes = writeClassifierOnnx(weights, DEFAULT_WINDOW_SPEC, MODEL_VERSION);
  const sha256 = createHash('sha256').update(bytes).digest('hex');
  const spec = {
    version: MODEL_VERSION,
    caution: 'Decision aid only: probabilities of fault types learned from SIMULATED data; never a root cause.',
    classes: CLASSES, families: FAMILIES, windowSpec: DEFAULT_WINDOW_SPEC,
    temperature: Number(temperature.toFixed(6)), abstainThreshold: recipe.abstainThreshold,
    classPriors: priors.map((p) => Number(p.toFixed(6))), embeddingSize: d, embeddingCentroids: centroids,
    oodDistance: Number(oodDistance.toFixed(6)), sha256,
    onnx: { file: 'classifier.onnx', opset: 17, inputs: { values: `float32 [B,N,${getRowLength(DEFAULT_WINDOW_SPEC)}]`, families: 'int64 [B,N]', mask: 'float32 [B,N]' }, outputs: { logits: `float32 [B,${c}]`, embedding: `float32 [B,${d}]` } },
    normalization: { featureMean: Array.from(normalization.mean, (v) => Number(v.toFixed(6))), featureStd: Array.from(normalization.std, (v) => Number(v.toFixed(6))) },
    training: {
      data: 'simulated (training/simulator, invented scenario); whole systems disjoint between splits',
      seed: recipe.seed, trainCount: train.length, calibrationCount: calibration.length, testCount: recipe.testCount, trainSystems: recipe.trainSystems,
      epochs: recipe.epochs, batchSize: options.batchSize, learningRate: options.learningRate, weightDecay: options.weightDecay,
      nodeDropoutRate: options.nodeDropoutRate, shardCount: options.shardCount, shape: DEFAULT_SHAPE,
    },
  };
  mkdirSync(MODEL_DIR, { recursive: true });
  writeFileSync(join(MODEL_DIR, 'classifier.onnx'), bytes);
  writeFileSync(join(MODEL_DIR, 'classifier.json'), `${JSON.stringify(spec, null, 2)}\n`);
  log(`wrote ${join(MODEL_DIR, 'classifier.onnx')} (${bytes.length} bytes, sha256 ${sha256})`);
}

if (require.main === module) {
  main().catch((error: unknown) => { process.stderr.write(`${(error as Error).stack ?? String(error)}\n`); process.exitCode = 1; });
}
