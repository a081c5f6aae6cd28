/**
 * `npx tsx training/baselines/runBaselines.ts [--seed S] [--train N] [--test N] [--epochs E]`:
 * trains and scores only the baselines on buildSplits(seed) and prints macro-F1, accuracy and
 * training seconds per baseline (a quicker loop than `npm run evaluate`, which also scores ours).
 */
import { CLASSES } from '../../extension/core/model/types';
import { computeConfusionMatrix, computeMacroF1 } from '../metrics';
import { buildSplits } from '../simulator';
import { scoreBaselines } from './index';

function readFlag(argv: readonly string[], name: string, fallback: number): number {
  const at = argv.indexOf(name);
  if (at < 0) return fallback;
  const value = Number(argv[at + 1]);
  if (!Number.isFinite(value)) throw new Error(`${name}: expected a number, got ${argv[at + 1]}`);
  return value;
}

async function main(): Promise<void> {
  const argv = process.argv.slice(2);
  const seed = readFlag(argv, '--seed', 20261202);
  const trainCount = readFlag(argv, '--train', 12000);
  const testCount = readFlag(argv, '--test', 2000);
  const epochs = readFlag(argv, '--epochs', 4);
  const log = (line: string): void => { process.stderr.write(`${new Date().toISOString()} ${line}\n`); };
  log(`building splits (seed ${seed}, train ${trainCount}, test ${testCount})`);
  const splits = buildSplits(seed, { trainCount, calibrationCount: 10, testCount });
  const test = splits.test.filter((e) => (CLASSES as readonly string[]).includes(e.label));
  const labels = test.map((e) => (CLASSES as readonly string[]).indexOf(e.label));
  const results = await scoreBaselines({ ...splits, test }, { seed: 7, epochs, log });
  process.stdout.write('| baseline | macro-F1 | accuracy | train s |\n| --- | --- | --- | --- |\n');
  for (const r of results) {
    const confusion = computeConfusionMatrix(labels, r.predicted, CLASSES.length);
    const accuracy = labels.filter((c, i) => r.predicted[i] === c).length / labels.length;
    process.stdout.write(`| ${r.name} | ${computeMacroF1(confusion).toFixed(3)} | ${accuracy.toFixed(3)} | ${r.trainSeconds.toFixed(1)} |\n`);
  }
}

main().catch((error: unknown) => { process.stderr.write(`${(error as Error).stack ?? String(error)}\n`); process.exitCode = 1; });
