/**
 * `npm run experiment -- --train N --epochs E [--dropout R,R…] [--hidden H] [--systems S]`: train the
 * set model on the first N examples of the recipe's train split (drawn from S systems, default
 * N / 100, at least 300) and score macro-F1 on the recipe's 2,000 held-out test examples, once per
 * node dropout rate. Nothing is written: it is for measuring a setting before it goes into the
 * recipe (training/train.ts), as the model card's "what did not move it" list was.
 */
import { CLASSES } from '../extension/core/model/types';
import { computeFeatureNormalization } from './buildDataset';
import { encodeInWorkers } from './encodeInWorkers';
import { computeArgmaxRows, computeConfusionMatrix, computeMacroF1 } from './metrics';
import { DEFAULT_SHAPE } from './setModel';
import { describeSplits } from './simulator';
import { FULL_RECIPE, predictAll } from './train';
import { trainSetModel } from './trainSetModel';

interface ExperimentArgs {
  readonly trainCount: number;
  readonly epochs: number;
  readonly dropoutRates: readonly number[];
  readonly hiddenSize: number;
  readonly trainSystems: number;
}

/** Parse the flags; throws naming the flag and what was expected. */
export function parseExperimentArgs(argv: readonly string[]): ExperimentArgs {
  const read = (flag: string): string | undefined => { const at = argv.indexOf(flag); return at >= 0 ? argv[at + 1] : undefined; };
  const integer = (flag: string, fallback?: number): number => {
    const text = read(flag);
    const value = text === undefined ? fallback : Number(text);
    if (value === undefined || !Number.isInteger(value) || value <= 0) throw new Error(`${flag}: expected a positive integer, got ${JSON.stringify(text ?? '')}`);
    return value;
  };
  const trainCount = integer('--train');
  const dropoutText = read('--dropout') ?? '0.5';
  const dropoutRates = dropoutText.split(',').map(Number);
  if (dropoutRates.some((r) => !(r >= 0 && r < 1))) throw new Error(`--dropout: expected rates in 0..1 (exclusive), comma-separated, got ${JSON.stringify(dropoutText)}`);
  return { trainCount, epochs: integer('--epochs'), dropoutRates, hiddenSize: integer('--hidden', DEFAULT_SHAPE.hiddenSize), trainSystems: integer('--systems', Math.max(300, Math.round(trainCount / 100))) };
}

async function main(): Promise<void> {
  const args = parseExperimentArgs(process.argv.slice(2));
  const splits = describeSplits(FULL_RECIPE.seed, { trainCount: args.trainCount, calibrationCount: 0, testCount: FULL_RECIPE.testCount, trainSystems: args.trainSystems });
  const train = await encodeInWorkers(splits.train);
  const test = await encodeInWorkers(splits.test);
  const normalization = computeFeatureNormalization(train);
  const shape = { ...DEFAULT_SHAPE, hiddenSize: args.hiddenSize };
  const score = (examples: typeof test, weights: Awaited<ReturnType<typeof trainSetModel>>): number =>
    computeMacroF1(computeConfusionMatrix(examples.map((e) => e.label), computeArgmaxRows(predictAll(weights, examples).logits, CLASSES.length), CLASSES.length));
  for (const nodeDropoutRate of args.dropoutRates) {
    const started = Date.now();
    const weights = await trainSetModel(train, shape, normalization, { epochs: args.epochs, batchSize: 64, learningRate: 3e-3, weightDecay: 1e-5, nodeDropoutRate, seed: FULL_RECIPE.seed, shardCount: 2 });
    process.stdout.write(`${args.trainCount} examples from ${args.trainSystems} systems × ${args.epochs} epochs, hidden ${args.hiddenSize}, node dropout ${nodeDropoutRate}: `
      + `held-out macro-F1 ${score(test, weights).toFixed(4)}, on the first 4,000 training examples ${score(train.slice(0, 4000), weights).toFixed(4)} (${((Date.now() - started) / 1000).toFixed(0)} s)\n`);
  }
}

if (require.main === module) {
  main().catch((error: unknown) => { process.stderr.write(`${(error as Error).message}\n`); process.exitCode = 1; });
}
