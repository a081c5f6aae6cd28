/**
 * `npm run evaluate:few-shot` (and `npm run evaluate -- --few-shot`): how well the incident library
 * learns fault types the bundled model never saw, and what it costs the built-in classes.
 *
 * Protocol (prototypical networks, Snell et al. 2017, episodic evaluation):
 * - Held-out classes come from the simulator (connection_pool_exhaustion, cpu_steal_noisy_neighbour);
 *   support and query incidents come from disjoint simulated systems, both unseen by training.
 * - Built-in effect: the simulator's calibration and test splits (systems unseen by training).
 * - The blend parameters are chosen on a calibration half (query systems A + the built-in
 *   calibration split) and reported on the other half (query systems B + the built-in test split).
 * - For each k in {1, 3, 5}: `episodes` random draws of k support incidents per held-out class →
 *   prototypes → blended verdict on every query; accuracy on the held-out queries, macro-F1 on the
 *   built-in test set with and without the library (mean over episodes and the worst episode).
 */
import { CLASSES, type MetricWindow } from '../extension/core/model/types';
import { computePrototypes, scorePrototypes, type EmbeddingNormalization } from '../extension/core/model/prototypes';
import { blendVerdict, type BlendOptions } from '../extension/core/model/libraryVerdict';
import { createLibraryEntry, toMetricWindows } from '../extension/core/model/libraryEntry';
import { buildFewShotSplits, buildSplits, createRandom, type TrainingExample } from './simulator';

/** The bundled model seen as: calibrated probabilities over CLASSES and an embedding per example. */
interface Embedder {
  readonly modelVersion: string;
  embed(examples: readonly (readonly MetricWindow[])[]): Promise<{ probabilities: Record<string, number>; embedding: Float64Array }[]>;
}

async function loadEmbedder(modelDir: string): Promise<Embedder> {
  throw new Error(`expected the bundled classifier runtime to load ${modelDir}; it is not part of this build yet`);
}

/** One example after the model: calibrated class probabilities and embedding. */
interface EmbeddedExample {
  readonly label: string;
  readonly systemId: string;
  readonly probabilities: Readonly<Record<string, number>>;
  readonly embedding: Float64Array;
}

/**
 * Macro-averaged F1 over `classes` (one-vs-rest F1 per class, unweighted mean; a class with no
 * true and no predicted example counts 0, as scikit-learn does with zero_division=0). Predictions
 * outside `classes` (library labels) count as misses of the true class.
 */
export function computeMacroF1(trueLabels: readonly string[], predicted: readonly string[], classes: readonly string[]): number {
  if (trueLabels.length !== predicted.length) throw new Error(`expected as many predictions as labels, got ${predicted.length} and ${trueLabels.length}`);
  let total = 0;
  for (const c of classes) {
    let tp = 0; let fp = 0; let fn = 0;
    trueLabels.forEach((t, i) => {
      const p = predicted[i];
      if (t === c && p === c) tp += 1; else if (p === c) fp += 1; else if (t === c) fn += 1;
    });
    total += tp === 0 ? 0 : (2 * tp) / (2 * tp + fp + fn);
  }
  return classes.length === 0 ? 0 : total / classes.length;
}

/** Share of `predicted` equal to `trueLabels` (0 for empty input). */
export function computeAccuracy(trueLabels: readonly string[], predicted: readonly string[]): number {
  if (trueLabels.length === 0) return 0;
  return trueLabels.filter((t, i) => predicted[i] === t).length / trueLabels.length;
}

/** Draw k support examples per class (without replacement), seeded. */
export function drawSupport(support: readonly EmbeddedExample[], classes: readonly string[], k: number, seed: number): EmbeddedExample[] {
  const rng = createRandom(seed);
  const out: EmbeddedExample[] = [];
  for (const c of classes) {
    const pool = support.filter((e) => e.label === c);
    if (pool.length < k) throw new Error(`expected at least ${k} support examples of ${c}, got ${pool.length}`);
    const picked = [...pool];
    for (let i = 0; i < k; i++) {
      const j = i + Math.floor(rng.uniform(0, picked.length - i));
      [picked[i], picked[j]] = [picked[j], picked[i]];
    }
    out.push(...picked.slice(0, k));
  }
  return out;
}

/** Blended predictions of `queries` against a support set. */
function predictWithLibrary(queries: readonly EmbeddedExample[], support: readonly EmbeddedExample[], options: BlendOptions): string[] {
  const prototypes = computePrototypes(support, options.normalization);
  return queries.map((q) => blendVerdict(q.probabilities, scorePrototypes(q.embedding, prototypes, options), options).className);
}

function predictBase(queries: readonly EmbeddedExample[]): string[] {
  return queries.map((q) => Object.entries(q.probabilities).reduce((best, cur) => (cur[1] > best[1] ? cur : best))[0]);
}

/** Episode results for one k. */
interface KResult {
  readonly k: number;
  readonly accuracyMean: number;
  readonly accuracySd: number;
  readonly accuracyPrototypeOnly: number;
  readonly f1Base: number;
  readonly f1WithLibraryMean: number;
  readonly f1DropWorst: number;
}

function evaluateK(k: number, episodes: number, support: readonly EmbeddedExample[], heldOut: readonly EmbeddedExample[], builtIn: readonly EmbeddedExample[], heldOutClasses: readonly string[], options: BlendOptions): KResult {
  const builtInTruth = builtIn.map((e) => e.label);
  const f1Base = computeMacroF1(builtInTruth, predictBase(builtIn), CLASSES);
  const accuracies: number[] = [];
  const protoAccuracies: number[] = [];
  const f1s: number[] = [];
  for (let episode = 0; episode < episodes; episode++) {
    const shots = drawSupport(support, heldOutClasses, k, 1000 * k + episode);
    accuracies.push(computeAccuracy(heldOut.map((e) => e.label), predictWithLibrary(heldOut, shots, options)));
    const prototypes = computePrototypes(shots, options.normalization);
    protoAccuracies.push(computeAccuracy(heldOut.map((e) => e.label), heldOut.map((q) => scorePrototypes(q.embedding, prototypes, options)[0].label)));
    f1s.push(computeMacroF1(builtInTruth, predictWithLibrary(builtIn, shots, options), CLASSES));
  }
  const mean = (xs: number[]): number => xs.reduce((s, x) => s + x, 0) / xs.length;
  const sd = (xs: number[]): number => Math.sqrt(mean(xs.map((x) => (x - mean(xs)) ** 2)));
  return {
    k, accuracyMean: mean(accuracies), accuracySd: sd(accuracies), accuracyPrototypeOnly: mean(protoAccuracies),
    f1Base, f1WithLibraryMean: mean(f1s), f1DropWorst: f1Base - Math.min(...f1s),
  };
}

/** Pick gate parameters on calibration data: best k=3 accuracy with a mean built-in F1 drop ≤ budget. */
function calibrateBlend(support: readonly EmbeddedExample[], heldOut: readonly EmbeddedExample[], builtIn: readonly EmbeddedExample[], heldOutClasses: readonly string[], normalization: EmbeddingNormalization, f1BudgetPoints: number): { options: BlendOptions; result: KResult } {
  const nearest: number[] = [];
  for (const episode of [0, 1, 2]) {
    const prototypes = computePrototypes(drawSupport(support, heldOutClasses, 3, 77 + episode), normalization);
    for (const q of [...heldOut, ...builtIn]) nearest.push(scorePrototypes(q.embedding, prototypes, { normalization, temperature: 1 })[0].squaredDistance);
  }
  nearest.sort((a, b) => a - b);
  const quantile = (p: number): number => nearest[Math.min(nearest.length - 1, Math.floor(p * nearest.length))];
  const scale = quantile(0.5);
  let best: { options: BlendOptions; result: KResult } | undefined;
  for (const p of [0.02, 0.05, 0.1, 0.15, 0.2, 0.25, 0.3, 0.4]) {
    for (const softnessShare of [0.05, 0.15]) {
      for (const temperatureShare of [0.02, 0.1]) {
        const acceptDistance = quantile(p);
        const options: BlendOptions = { normalization, temperature: temperatureShare * scale, acceptDistance, softness: Math.max(1e-9, softnessShare * acceptDistance), maxWeight: 0.95 };
        const result = evaluateK(3, 10, support, heldOut, builtIn, heldOutClasses, options);
        const isWithinBudget = (result.f1Base - result.f1WithLibraryMean) * 100 <= f1BudgetPoints;
        if (isWithinBudget && (best === undefined || result.accuracyMean > best.result.accuracyMean)) best = { options, result };
      }
    }
  }
  if (best === undefined) throw new Error(`no gate setting kept the built-in macro-F1 drop within ${f1BudgetPoints} points on calibration data`);
  return best;
}

async function embedExamples(embedder: Embedder, examples: readonly TrainingExample[]): Promise<EmbeddedExample[]> {
  const out = await embedder.embed(examples.map((e) => e.metrics));
  return examples.map((e, i) => ({ label: e.label, systemId: e.systemId, probabilities: out[i].probabilities, embedding: out[i].embedding }));
}

/** Support examples as the library stores them (downsampled), to measure what storage costs. */
function toStoredMetrics(example: TrainingExample): MetricWindow[] {
  const entry = createLibraryEntry({
    id: 'eval', label: example.label, window: { startMs: 0, endMs: 0 }, baseline: { startMs: 0, endMs: 0 },
    exportSha256: '0'.repeat(64), exportFile: example.systemId, createdMs: 0, modelVersion: 'eval', embedding: [0],
    metrics: example.metrics.map((m) => ({ ...m, name: m.id })),
  });
  return toMetricWindows(entry);
}

function parseArgs(argv: readonly string[]): { seed: number; episodes: number; modelDir: string; budget: number } {
  const get = (name: string, fallback: string): string => {
    const i = argv.indexOf(`--${name}`);
    return i >= 0 && argv[i + 1] !== undefined ? argv[i + 1] : fallback;
  };
  return { seed: Number(get('seed', '1')), episodes: Number(get('episodes', '50')), modelDir: get('model', 'media/model'), budget: Number(get('f1-budget', '1')) };
}

const format = (x: number): string => x.toFixed(3);

/** Run the evaluation and print the table; returns the per-k results. */
export async function runFewShotEvaluation(argv: readonly string[]): Promise<void> {
  const args = parseArgs(argv);
  const startedMs = Date.now();
  const embedder = await loadEmbedder(args.modelDir);
  const fewShot = buildFewShotSplits(args.seed, { supportPerClass: 20, queryPerClass: 150 });
  const builtInSplits = buildSplits(args.seed, { trainCount: 0, calibrationCount: 800, testCount: 1500 });
  const [support, query, builtInCalibration, builtInTest] = await Promise.all([
    embedExamples(embedder, fewShot.support), embedExamples(embedder, fewShot.query),
    embedExamples(embedder, builtInSplits.calibration), embedExamples(embedder, builtInSplits.test),
  ]);
  // Query systems split in two: calibrate the gate on one half, report on the other.
  const querySystems = [...new Set(query.map((q) => q.systemId))].sort();
  const calibrationSystems = new Set(querySystems.filter((_, i) => i % 2 === 0));
  const queryCalibration = query.filter((q) => calibrationSystems.has(q.systemId));
  const queryTest = query.filter((q) => !calibrationSystems.has(q.systemId));
  const classes = fewShot.classes;
  process.stdout.write(`model ${embedder.modelVersion}; seed ${args.seed}; support ${support.length} (${new Set(support.map((s) => s.systemId)).size} systems), held-out queries ${queryCalibration.length} calibration / ${queryTest.length} test, built-in ${builtInCalibration.length} calibration / ${builtInTest.length} test\n`);
  for (const normalization of ['l2', 'none'] as const) {
    const { options } = calibrateBlend(support, queryCalibration, builtInCalibration, classes, normalization, args.budget);
    process.stdout.write(`\nnormalization ${normalization}: temperature ${options.temperature.toPrecision(3)}, acceptDistance ${options.acceptDistance.toPrecision(3)}, softness ${options.softness.toPrecision(3)}, maxWeight ${options.maxWeight}\n`);
    process.stdout.write('k | held-out accuracy (mean ± sd) | prototype-only accuracy | built-in macro-F1 without → with library | worst drop (points)\n');
    for (const k of [1, 3, 5]) {
      const r = evaluateK(k, args.episodes, support, queryTest, builtInTest, classes, options);
      process.stdout.write(`${k} | ${format(r.accuracyMean)} ± ${format(r.accuracySd)} | ${format(r.accuracyPrototypeOnly)} | ${format(r.f1Base)} → ${format(r.f1WithLibraryMean)} | ${(100 * r.f1DropWorst).toFixed(2)}\n`);
    }
  }
  await reportStorageEffect(embedder, fewShot.support, support);
  process.stdout.write(`\n(${((Date.now() - startedMs) / 1000).toFixed(1)} s)\n`);
}

/** How far the embedding of the stored (downsampled) data lies from the full-resolution one. */
async function reportStorageEffect(embedder: Embedder, raw: readonly TrainingExample[], full: readonly EmbeddedExample[]): Promise<void> {
  const stored = await embedder.embed(raw.map(toStoredMetrics));
  const cosines = stored.map((s, i) => {
    const a = full[i].embedding; const b = s.embedding;
    let dot = 0; let na = 0; let nb = 0;
    for (let j = 0; j < a.length; j++) { dot += a[j] * b[j]; na += a[j] * a[j]; nb += b[j] * b[j]; }
    return na === 0 || nb === 0 ? 1 : dot / Math.sqrt(na * nb);
  }).sort((x, y) => x - y);
  process.stdout.write(`\nre-embedding from stored (≤64-point) data vs full resolution, ${cosines.length} support incidents: cosine median ${format(cosines[Math.floor(cosines.length / 2)])}, min ${format(cosines[0])}\n`);
}

if (require.main === module) {
  runFewShotEvaluation(process.argv.slice(2)).catch((error: unknown) => {
    process.stderr.write(`${error instanceof Error ? error.stack ?? error.message : String(error)}\n`);
    process.exit(1);
  });
}
