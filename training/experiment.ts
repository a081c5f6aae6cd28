/**
 * `npm run experiment -- --train N --epochs E [--dropout R,R…] [--hidden H] [--systems S]`: train the
 * set model on the first N examples of the recipe's train split (drawn from S systems, default
 * N / 100, at least 300) and score macro-F1 on the recipe's 2,000 held-out test examples, on 2,000
 * new examples from the training systems (the gap between the two is what unseen systems cost)
 * and on training examples it saw, once per node dropout rate. Nothing is written: it is for
 * measuring a setting before it goes into the recipe (training/train.ts), as the model card's
 * "what did not move it" list was.
 */
import { CLASSES } from '../extension/core/model/types';
import { computeFeatureNormalization } from './buildDataset';
import { readFlag, readPositiveInteger } from './cliFlags';
import { encodeInWorkers } from './encodeInWorkers';
import { computeArgmaxRows, computeConfusionMatrix, computeMacroF1 } from './metrics';
import { DEFAULT_SHAPE } from './setModel';
import { describeSplits, mixSeeds } from './simulator';
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
  const trainCount = readPositiveInteger(argv, '--train');
  const dropoutText = readFlag(argv, '--dropout') ?? '0.5';
  const dropoutRates = dropoutText.split(',').map(Number);
  if (dropoutRates.some((r) => !(r >= 0 && r < 1))) throw new Error(`--dropout: expected rates in 0..1 (exclusive), comma-separated, got ${JSON.stringify(dropoutText)}`);
  return { trainCount, epochs: readPositiveInteger(argv, '--epochs'), dropoutRates, hiddenSize: readPositiveInteger(argv, '--hidden', DEFAULT_SHAPE.hiddenSize), trainSystems: readPositiveInteger(argv, '--systems', Math.max(300, Math.round(trainCount / 100))) };
}

async function main(): Promise<void> {
  const args = parseExperimentArgs(process.argv.slice(2));
  const splits = describeSplits(FULL_RECIPE.seed, { trainCount: args.trainCount, calibrationCount: 0, testCount: FULL_RECIPE.testCount, trainSystems: args.trainSystems });
  const train = await encodeInWorkers(splits.train);
  const test = await encodeInWorkers(splits.test);
  // New examples from the training systems: the gap to `test` is what unseen systems cost.
  const seen = await encodeInWorkers({ ...splits.train, seed: mixSeeds(FULL_RECIPE.seed, 99), count: 2000 });
  const normalization = computeFeatureNormalization(train);
  const shape = { ...DEFAULT_SHAPE, hiddenSize: args.hiddenSize };
  const score = (examples: typeof test, weights: Awaited<ReturnType<typeof trainSetModel>>): number =>
    computeMacroF1(computeConfusionMatrix(examples.map((e) => e.label), computeArgmaxRows(predictAll(weights, examples).logits, CLASSES.length), CLASSES.length));
  for (const nodeDropoutRate of args.dropoutRates) {
    const started = Date.now();
    const weights = await trainSetModel(train, shape, normalization, { epochs: args.epochs, batchSize: 64, learningRate: 3e-3, weightDecay: 1e-5, nodeDropoutRate, seed: FULL_RECIPE.seed, shardCount: 2 });
    process.stdout.write(`${args.trainCount} examples from ${args.trainSystems} systems × ${args.epochs} epochs, hidden ${args.hiddenSize}, node dropout ${nodeDropoutRate}: `
      + `held-out macro-F1 ${score(test, weights).toFixed(4)}, on 2,000 new examples from the training systems ${score(seen, weights).toFixed(4)}, on the first 4,000 training examples ${score(train.slice(0, 4000), weights).toFixed(4)} (${((Date.now() - started) / 1000).toFixed(0)} s)\n`);
  }
}

if (require.main === module) {
  main().catch((error: unknown) => { process.stderr.write(`${(error as Error).message}\n`); process.exitCode = 1; });
}
