/**
 * `npm run evaluate:few-shot-ceiling -- [--train N] [--epochs E]`: the many-shot upper bound of the
 * incident library's task. A set model of the bundled architecture is trained on N examples of all
 * ten simulated kinds — the eight built-in classes and the two the library must learn from a few
 * labelled incidents (HELD_OUT_CLASSES) — and scored on new examples from the recipe's held-out test
 * systems: recall of each held-out kind (split by whether the window exports a key metric of its
 * kind), what it is mistaken for, the built-in macro-F1 beside the bundled model's on the same
 * examples, and how many built-in incidents it calls a held-out kind. The library, given k = 1–5
 * incidents per kind, has less to go on than this model, which saw thousands; so this recall is what
 * the representation allows on these kinds, not what the library reaches. Nothing is written.
 */
import { DEFAULT_WINDOW_SPEC, encodeBatch } from '../extension/core/model/encode';
import { CLASSES } from '../extension/core/model/types';
import { loadClassifierModel } from '../extension/runtime/onnxRunner';
import { computeFeatureNormalization, encodeExamples } from './buildDataset';
import { readPositiveInteger } from './cliFlags';
import { encodeInWorkers } from './encodeInWorkers';
import { computeArgmaxRows, computeClassScores, computeConfusionMatrix } from './metrics';
import { DEFAULT_SHAPE } from './setModel';
import { describeSplits, HELD_OUT_CLASSES, KEY_ROLES, sampleExamples, type SimClass, type TrainingExample } from './simulator';
import { FULL_RECIPE, MODEL_DIR, predictAll } from './train';
import { trainSetModel } from './trainSetModel';

/** The eight built-in classes first (their indices unchanged), then the library's held-out kinds. */
export const ALL_KINDS: readonly SimClass[] = [...CLASSES, ...HELD_OUT_CLASSES];

/** `--train N` (default 40,000, over all ten kinds) and `--epochs E` (default 8). */
export function parseCeilingArgs(argv: readonly string[]): { trainCount: number; epochs: number } {
  return { trainCount: readPositiveInteger(argv, '--train', 40_000), epochs: readPositiveInteger(argv, '--epochs', 8) };
}

/** Mean F1 over the built-in classes of a confusion matrix over ALL_KINDS (a built-in incident called a held-out kind is a miss). */
export function computeBuiltInMacroF1(confusion: readonly (readonly number[])[]): number {
  const scores = computeClassScores(confusion).slice(0, CLASSES.length);
  return scores.reduce((sum, s) => sum + s.f1, 0) / scores.length;
}

/** Whether the example's window exports a key metric of its own kind (KEY_ROLES). */
function exportsKeyMetric(example: TrainingExample): boolean {
  return example.truth?.some((t) => KEY_ROLES[example.label].includes(t.role)) ?? false;
}

/** The bundled model's top class for each example, through the product's runner. */
async function predictBundled(examples: readonly TrainingExample[]): Promise<number[]> {
  const model = await loadClassifierModel(MODEL_DIR);
  const out: number[] = [];
  try {
    for (let start = 0; start < examples.length; start += 128) {
      const chunk = examples.slice(start, start + 128);
      const output = await model.runner.run(encodeBatch(chunk.map((e) => e.metrics), model.spec.windowSpec));
      out.push(...computeArgmaxRows(output.logits, output.classCount));
    }
  } finally {
    await model.runner.release();
  }
  return out;
}

async function main(): Promise<void> {
  const args = parseCeilingArgs(process.argv.slice(2));
  const started = Date.now();
  const log = (message: string): void => { process.stdout.write(`[${((Date.now() - started) / 1000).toFixed(0)} s] ${message}\n`); };
  const trainSystems = Math.max(300, Math.round(args.trainCount / 100));
  const splits = describeSplits(FULL_RECIPE.seed, { trainCount: args.trainCount, calibrationCount: 0, testCount: 0, trainSystems });
  const train = await encodeInWorkers({ ...splits.train, classes: ALL_KINDS }, 2, 2000, ALL_KINDS);
  const testRaw = sampleExamples({ ...describeSplits(FULL_RECIPE.seed, { trainSystems }).test, classes: ALL_KINDS, count: 300 * ALL_KINDS.length });
  const test = encodeExamples(testRaw, DEFAULT_WINDOW_SPEC, ALL_KINDS);
  log(`encoded ${train.length} training examples of ${ALL_KINDS.length} kinds from ${trainSystems} systems, ${test.length} test examples from unseen systems`);
  const weights = await trainSetModel(train, { ...DEFAULT_SHAPE, classCount: ALL_KINDS.length }, computeFeatureNormalization(train), {
    epochs: args.epochs, batchSize: 64, learningRate: 3e-3, weightDecay: 1e-5, nodeDropoutRate: 0.5, seed: FULL_RECIPE.seed, shardCount: 2,
  });
  log(`trained the ${ALL_KINDS.length}-kind set model (${args.epochs} epochs)`);
  const predicted = computeArgmaxRows(predictAll(weights, test).logits, ALL_KINDS.length);
  const labels = test.map((e) => e.label);
  process.stdout.write(`\n## Many-shot upper bound: ${train.length} training examples of all ten kinds × ${args.epochs} epochs, ${test.length} test examples from unseen systems\n\n`);
  process.stdout.write('| held-out kind | recall | window exports a key metric of its kind | does not | mistaken most often for |\n|---|---|---|---|---|\n');
  let heldOutCorrect = 0;
  let heldOutCount = 0;
  for (const kind of HELD_OUT_CLASSES) {
    const index = ALL_KINDS.indexOf(kind);
    const rows = test.map((_, i) => i).filter((i) => labels[i] === index);
    const recall = (subset: readonly number[]): string => (subset.length === 0 ? 'n/a' : `${(subset.filter((i) => predicted[i] === index).length / subset.length).toFixed(3)} (${subset.length})`);
    const mistaken = new Map<string, number>();
    for (const i of rows) if (predicted[i] !== index) mistaken.set(ALL_KINDS[predicted[i]], (mistaken.get(ALL_KINDS[predicted[i]]) ?? 0) + 1);
    const top = [...mistaken].sort((a, b) => b[1] - a[1]).slice(0, 3).map(([name, n]) => `${name} ${n}`).join(', ') || 'none';
    process.stdout.write(`| ${kind} | ${recall(rows)} | ${recall(rows.filter((i) => exportsKeyMetric(testRaw[i])))} | ${recall(rows.filter((i) => !exportsKeyMetric(testRaw[i])))} | ${top} |\n`);
    heldOutCorrect += rows.filter((i) => predicted[i] === index).length;
    heldOutCount += rows.length;
  }
  const builtIn = test.map((_, i) => i).filter((i) => labels[i] < CLASSES.length);
  const bundled = await predictBundled(builtIn.map((i) => testRaw[i]));
  const tenKindF1 = computeBuiltInMacroF1(computeConfusionMatrix(builtIn.map((i) => labels[i]), builtIn.map((i) => predicted[i]), ALL_KINDS.length));
  const bundledF1 = computeBuiltInMacroF1(computeConfusionMatrix(builtIn.map((i) => labels[i]), bundled, ALL_KINDS.length));
  const claimed = builtIn.filter((i) => predicted[i] >= CLASSES.length).length;
  process.stdout.write(`\n- held-out kinds, both together: accuracy ${(heldOutCorrect / heldOutCount).toFixed(3)} (${heldOutCount})\n`);
  process.stdout.write(`- built-in macro-F1 on the ${builtIn.length} built-in test examples: this ten-kind model ${tenKindF1.toFixed(3)}; the bundled model ${bundledF1.toFixed(3)}\n`);
  process.stdout.write(`- built-in test examples this model calls a held-out kind: ${claimed} (${((100 * claimed) / builtIn.length).toFixed(1)} %)\n`);
  log('done');
}

if (require.main === module) {
  main().catch((error: unknown) => { process.stderr.write(`${(error as Error).message}\n`); process.exitCode = 1; });
}
