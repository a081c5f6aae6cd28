/**
 * `npm run evaluate [-- --card] [--few-shot] [--no-baselines] [--baselines gcn,gin,gru,statistics] [--baseline-train N] [--baseline-epochs E]`: rebuilds the splits recorded in
 * media/model/classifier.json, scores the bundled model through the real runtime (onnxruntime) on the
 * held-out simulated systems, trains and scores the baselines on the same data, and prints markdown
 * tables. With `--baseline-train N` the baselines (tfjs, slow on 2 cores) see only the first N training
 * examples, and our architecture is also retrained on those N for a like-for-like row. `--card` also replaces the evaluation section of media/model/MODEL_CARD.md.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { computeCalibratedLogProbabilities } from '../extension/core/model/classifier';
import { encodeMetricWindows } from '../extension/core/model/encode';
import { CLASSES } from '../extension/core/model/types';
import { loadClassifierModel } from '../extension/runtime/onnxRunner';
import { computeArgmaxRows, computeClassScores, computeConfusionMatrix, computeEce, computeMacroF1 } from './metrics';
import { describeSplits, sampleExamples, type TrainingExample } from './simulator';
import { computeFeatureNormalization, encodeExamples } from './buildDataset';
import { DEFAULT_WINDOW_SPEC } from '../extension/core/model/encode';
import { DEFAULT_SHAPE } from './setModel';
import { MODEL_DIR, predictAll } from './train';
import { trainSetModel } from './trainSetModel';
import { BASELINE_KINDS, type BaselineKind } from './baselines';

interface Scored { readonly name: string; readonly predicted: Int32Array; readonly note?: string }

function formatTable(header: readonly string[], rows: readonly (readonly string[])[]): string {
  const line = (cells: readonly string[]): string => `| ${cells.join(' | ')} |`;
  return [line(header), line(header.map(() => '---')), ...rows.map(line)].join('\n');
}

const f3 = (v: number): string => v.toFixed(3);

async function scoreBundledModel(test: readonly TrainingExample[], labels: Int32Array): Promise<{ text: string; predicted: Int32Array; abstainRate: number; macroF1: number }> {
  const model = await loadClassifierModel(MODEL_DIR);
  const c = CLASSES.length;
  const logits = new Float64Array(test.length * c);
  const distances: number[] = [];
  for (let i = 0; i < test.length; i++) {
    const out = await model.runner.run(encodeMetricWindows(test[i].metrics, model.spec.windowSpec));
    logits.set(out.logits.subarray(0, c), i * c);
    let best = Infinity;
    for (const centroid of model.spec.embeddingCentroids) {
      let s = 0;
      for (let j = 0; j < centroid.length; j++) s += (out.embedding[j] - centroid[j]) ** 2;
      best = Math.min(best, Math.sqrt(s));
    }
    distances.push(best);
  }
  await model.runner.release();
  const probabilitiesAt = (temperature: number): Float64Array => {
    const p = new Float64Array(logits.length);
    for (let i = 0; i < test.length; i++) p.set(computeCalibratedLogProbabilities(logits.subarray(i * c, (i + 1) * c), temperature).map(Math.exp), i * c);
    return p;
  };
  const raw = probabilitiesAt(1);
  const calibrated = probabilitiesAt(model.spec.temperature);
  const predicted = computeArgmaxRows(calibrated, c);
  const confidence = (p: Float64Array): number[] => Array.from(predicted, (k, i) => p[i * c + k]);
  const isCorrect = Array.from(predicted, (k, i) => k === labels[i]);
  const eceBefore = computeEce(confidence(raw), isCorrect);
  const eceAfter = computeEce(confidence(calibrated), isCorrect);
  const calibratedConfidence = confidence(calibrated);
  const isAbstained = calibratedConfidence.map((p, i) => p < model.spec.abstainThreshold || distances[i] > model.spec.oodDistance);
  const abstainRate = isAbstained.filter(Boolean).length / test.length;
  const kept = [...predicted.keys()].filter((i) => !isAbstained[i]);
  const confusion = computeConfusionMatrix(labels, predicted, c);
  const keptConfusion = computeConfusionMatrix(kept.map((i) => labels[i]), kept.map((i) => predicted[i]), c);
  const scores = computeClassScores(confusion);
  const macroF1 = computeMacroF1(confusion);
  const text = [
    `### Bundled model (onnxruntime, ${test.length} held-out examples from unseen simulated systems)`,
    '',
    formatTable(['class', 'precision', 'recall', 'F1', 'support'], scores.map((s, k) => [CLASSES[k], f3(s.precision), f3(s.recall), f3(s.f1), String(s.support)])),
    '',
    `- macro-F1 (all examples, top class): **${f3(macroF1)}** (target ≥ 0.95)`,
    `- accuracy: ${f3(isCorrect.filter(Boolean).length / test.length)}`,
    `- ECE (15 equal-width bins, Guo et al. 2017): before temperature scaling ${f3(eceBefore)}, after (T = ${model.spec.temperature.toFixed(3)}) **${f3(eceAfter)}** (target ≤ 0.05)`,
    `- abstain rate (calibrated top probability < ${model.spec.abstainThreshold} or out of distribution): ${f3(abstainRate)}; macro-F1 on the ${kept.length} non-abstained examples: ${f3(computeMacroF1(keptConfusion))}`,
    '',
    'Confusion matrix (rows = true class, columns = predicted):',
    '',
    formatTable(['true \\ predicted', ...CLASSES.map((_, k) => String(k))], confusion.map((row, k) => [`${k} ${CLASSES[k]}`, ...row.map(String)])),
  ].join('\n');
  return { text, predicted, abstainRate, macroF1 };
}

async function scoreBaselineModels(splits: { train: TrainingExample[]; calibration: TrainingExample[]; test: TrainingExample[] }, trainTotal: number, log: (s: string) => void): Promise<Scored[]> {
  // Loaded by path so evaluation still runs (and says so) while the baselines are being built.
  const modulePath = './baselines';
  let mod: { scoreBaselines?: (split: unknown, options?: unknown) => Promise<Array<{ name: string; predicted: Int32Array }>> };
  try {
    mod = (await import(modulePath)) as typeof mod;
  } catch (error) {
    log(`baselines unavailable: ${(error as Error).message}`);
    return [];
  }
  if (!mod.scoreBaselines) return [];
  const train = splits.train;
  const epochsAt = process.argv.indexOf('--baseline-epochs');
  const epochs = epochsAt >= 0 ? Number(process.argv[epochsAt + 1]) : undefined;
  const onlyAt = process.argv.indexOf('--baselines');
  const only = onlyAt >= 0 ? parseBaselineKinds(process.argv[onlyAt + 1]) : undefined;
  const results = await mod.scoreBaselines({ train, calibration: splits.calibration, test: splits.test }, { log, epochs, ...(only ? { only } : {}) });
  const note = `trained on ${train.length === trainTotal ? 'all' : `the first ${train.length} of`} ${trainTotal} training examples${epochs !== undefined ? `, ${epochs} epochs` : ''}`;
  return results.map((r) => ({ name: r.name, predicted: r.predicted, note }));
}

/** `--baselines gcn,gin`: the comma-separated baseline kinds to train; throws naming a kind it does not know. */
function parseBaselineKinds(text: string | undefined): BaselineKind[] {
  const kinds = (text ?? '').split(',').map((k) => k.trim()).filter((k) => k !== '');
  const unknown = kinds.filter((k) => !(BASELINE_KINDS as readonly string[]).includes(k));
  if (kinds.length === 0 || unknown.length > 0) throw new Error(`--baselines: expected a comma-separated list of ${BASELINE_KINDS.join(', ')}, got ${JSON.stringify(text ?? '')}`);
  return kinds as BaselineKind[];
}

/** Our architecture retrained on the same subset the baselines saw, scored with the reference forward pass. */
async function scoreOursOnSubset(train: readonly TrainingExample[], test: readonly TrainingExample[], epochs: number, seed: number): Promise<Int32Array> {
  const encodedTrain = encodeExamples(train, DEFAULT_WINDOW_SPEC);
  const weights = await trainSetModel(encodedTrain, DEFAULT_SHAPE, computeFeatureNormalization(encodedTrain), {
    epochs, batchSize: 64, learningRate: 3e-3, weightDecay: 1e-5, nodeDropoutRate: 0.5, seed,
  });
  const encodedTest = encodeExamples(test, DEFAULT_WINDOW_SPEC);
  return computeArgmaxRows(predictAll(weights, encodedTest).logits, CLASSES.length);
}

async function main(): Promise<void> {
  const argv = process.argv.slice(2);
  if (argv.includes('--few-shot')) {
    await (await import('./evaluateFewShot')).runFewShotEvaluation(argv.filter((a) => a !== '--few-shot'));
    return;
  }
  const log = (s: string): void => { process.stderr.write(`${s}\n`); };
  const spec = JSON.parse(readFileSync(join(MODEL_DIR, 'classifier.json'), 'utf8')) as { training: { seed: number; trainCount: number; calibrationCount: number; testCount: number; epochs: number; trainSystems?: number } };
  const t = spec.training;
  const limitAt = argv.indexOf('--baseline-train');
  const limit = limitAt >= 0 ? Number(argv[limitAt + 1]) : undefined;
  if (limit !== undefined && !(Number.isInteger(limit) && limit > 0)) throw new Error(`--baseline-train: expected a positive integer, got ${argv[limitAt + 1]}`);
  const isBaselineRun = !argv.includes('--no-baselines');
  log(`rebuilding splits (seed ${t.seed})`);
  const described = describeSplits(t.seed, { trainCount: t.trainCount, calibrationCount: t.calibrationCount, testCount: t.testCount, ...(t.trainSystems ? { trainSystems: t.trainSystems } : {}) });
  // Only the training examples the baselines see are drawn (the first ones of the recipe's split).
  const splits = {
    train: isBaselineRun ? sampleExamples({ ...described.train, count: Math.min(limit ?? t.trainCount, t.trainCount) }) : [],
    calibration: isBaselineRun ? sampleExamples(described.calibration) : [],
    test: sampleExamples(described.test),
  };
  const test = splits.test.filter((e) => (CLASSES as readonly string[]).includes(e.label));
  const labels = Int32Array.from(test, (e) => CLASSES.indexOf(e.label as (typeof CLASSES)[number]));
  const ours = await scoreBundledModel(test, labels);
  const baselines = isBaselineRun ? await scoreBaselineModels({ ...splits, test }, t.trainCount, log) : [];
  const sameData: Scored[] = [];
  if (limit !== undefined && baselines.length > 0) {
    log(`retraining our architecture on the same ${limit} examples`);
    sameData.push({ name: 'ours, same training subset as the baselines', predicted: await scoreOursOnSubset(splits.train.slice(0, limit), test, spec.training.epochs, spec.training.seed), note: `trained on the first ${limit} training examples, ${spec.training.epochs} epochs` });
    // Like for like: also the baselines' epoch budget, so neither data nor training length differs.
    const epochsAt = argv.indexOf('--baseline-epochs');
    const baselineEpochs = epochsAt >= 0 ? Number(argv[epochsAt + 1]) : undefined;
    if (baselineEpochs !== undefined && baselineEpochs !== spec.training.epochs) {
      sameData.push({ name: 'ours, same training subset and epochs as the baselines', predicted: await scoreOursOnSubset(splits.train.slice(0, limit), test, baselineEpochs, spec.training.seed), note: `trained on the first ${limit} training examples, ${baselineEpochs} epochs` });
    }
  }
  const rows = [{ name: 'ours: family-pooled set model (bundled ONNX)', predicted: ours.predicted, note: `trained on all ${t.trainCount} training examples from ${t.trainSystems ?? 300} systems, ${spec.training.epochs} epochs` as string | undefined }, ...sameData, ...baselines].map((r) => {
    const confusion = computeConfusionMatrix(labels, r.predicted, CLASSES.length);
    const correct = Array.from(r.predicted).filter((p, i) => p === labels[i]).length;
    return [r.name, f3(computeMacroF1(confusion)), f3(correct / labels.length), r.note ?? ''];
  });
  const comparison = [
    '### Comparison on the same held-out systems',
    '',
    formatTable(['model', 'macro-F1', 'accuracy', 'note'], rows),
    baselines.length === 0 ? '\n(baselines not run)' : '',
  ].join('\n');
  const report = `${ours.text}\n\n${comparison}\n`;
  process.stdout.write(`${report}\n`);
  if (argv.includes('--card')) {
    const cardPath = join(MODEL_DIR, 'MODEL_CARD.md');
    const card = readFileSync(cardPath, 'utf8');
    const start = '<!-- evaluation:start -->';
    const end = '<!-- evaluation:end -->';
    const a = card.indexOf(start);
    const b = card.indexOf(end);
    if (a < 0 || b < a) throw new Error(`${cardPath}: expected the markers ${start} … ${end}, found none`);
    writeFileSync(cardPath, `${card.slice(0, a + start.length)}\n${report}\n${card.slice(b)}`);
    log(`updated ${cardPath}`);
  }
}

main().catch((error: unknown) => { process.stderr.write(`${(error as Error).stack ?? String(error)}\n`); process.exitCode = 1; });
