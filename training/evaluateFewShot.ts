/**
 * `npm run evaluate:few-shot` (and `npm run evaluate -- --few-shot`): how well the incident library
 * learns fault types the bundled model never saw, and what it costs the built-in classes.
 *
 * Protocol (prototypical networks, Snell et al. 2017, episodic evaluation):
 * - Held-out classes come from the simulator (connection_pool_exhaustion, cpu_steal_noisy_neighbour).
 * - New systems: support and query incidents from disjoint simulated systems, both unseen by
 *   training; built-in effect on the simulator's test split.
 * - Same systems: per simulated system (a team's service) its own support, queries and built-in
 *   incidents; variants where the library also holds k of the team's incidents per built-in class,
 *   and where only systems exporting a key metric of both held-out types count.
 * - Every rule's settings are chosen on a calibration half and reported on the other half.
 * - For each k in {1, 3, 5}: `episodes` random draws of k support incidents per class → blended
 *   verdict on every query; accuracy on the held-out queries, macro-F1 on the built-in queries with
 *   and without the library (mean over episodes and the worst episode).
 * Rules: `prototype` = the earlier distance-gated blend (blendVerdict); `compete` = competeVerdict
 * with the combined signature + embedding similarity (class means; nearest entries; with the
 * override and recurrence tiers), and its signature-only and embedding-only ablations, each
 * calibrated on the table's own calibration half; `compete (product defaults)` =
 * DEFAULT_COMPETITION_OPTIONS as shipped. The run ends with the setting the pooled same-system
 * calibration halves suggest as product defaults. Same systems: 48 services (24 per half).
 */
import { CLASSES, type MetricWindow } from '../extension/core/model/types';
import { computePrototypes, scorePrototypes, type EmbeddingNormalization } from '../extension/core/model/prototypes';
import { blendVerdict, type BlendOptions } from '../extension/core/model/libraryVerdict';
import { createLibraryEntry, formatLibraryModelVersion, toMetricWindows } from '../extension/core/model/libraryEntry';
import { computeCalibratedLogProbabilities } from '../extension/core/model/classifier';
import { encodeBatch } from '../extension/core/model/encode';
import { loadClassifierModel } from '../extension/runtime/onnxRunner';
import { computeAccuracy, computeMacroF1, drawLibrary, drawSupport, mean, predictBase, type EmbeddedExample, type EvaluationGroup, type KResult } from './fewShotScoring';
import { calibrateCompetition, computeEpisodeSimilarities, describeCompetition, scoreCompetition, writeKeyMetricSplit } from './fewShotCompetition';
import { computeMetricSignature } from '../extension/core/model/librarySignature';
import { DEFAULT_COMPETITION_OPTIONS, type CompetitionOptions } from '../extension/core/model/librarySignatureVerdict';
import { writeSideStudies } from './fewShotStudies';
import { parseFewShotArgs, readTrainingSeed, readTrainSystems } from './fewShotArgs';
import { buildFewShotSplits, buildSplits, buildSystemSpec, drawSystemSeeds, HELD_OUT_CLASSES, KEY_ROLES, mixSeeds, sampleExamples, type SimClass, type TrainingExample } from './simulator';

/** The bundled model seen as: calibrated probabilities over CLASSES and an embedding per example. */
interface Embedder {
  readonly modelVersion: string;
  embed(examples: readonly (readonly MetricWindow[])[]): Promise<{ probabilities: Record<string, number>; embedding: Float64Array }[]>;
}

/** The bundled model through the product's own runner and encoder (the path the extension uses). */
async function loadEmbedder(modelDir: string): Promise<Embedder & { release(): Promise<void> }> {
  const model = await loadClassifierModel(modelDir);
  const { spec, runner } = model;
  return {
    modelVersion: formatLibraryModelVersion(spec.version, model.sha256),
    release: () => runner.release(),
    async embed(examples) {
      const out: { probabilities: Record<string, number>; embedding: Float64Array }[] = [];
      for (let start = 0; start < examples.length; start += 128) {
        const chunk = examples.slice(start, start + 128);
        const output = await runner.run(encodeBatch(chunk, spec.windowSpec));
        chunk.forEach((_, i) => {
          const logits = output.logits.subarray(i * output.classCount, (i + 1) * output.classCount);
          const probabilities = computeCalibratedLogProbabilities(logits, spec.temperature);
          out.push({
            probabilities: Object.fromEntries(spec.classes.map((c, j) => [c, Math.exp(probabilities[j])])),
            embedding: Float64Array.from(output.embedding.subarray(i * output.embeddingSize, (i + 1) * output.embeddingSize)),
          });
        });
      }
      return out;
    },
  };
}


export { computeAccuracy, computeMacroF1, drawSupport };

/** Blended predictions of `queries` against a support set. */
function predictWithLibrary(queries: readonly EmbeddedExample[], support: readonly EmbeddedExample[], options: BlendOptions): string[] {
  const prototypes = computePrototypes(support, options.normalization);
  return queries.map((q) => blendVerdict(q.probabilities, scorePrototypes(q.embedding, prototypes, options), options).className);
}

/** `episodes` draws of k support incidents per class in every group; scores pooled over groups. */
function evaluateK(k: number, episodes: number, groups: readonly EvaluationGroup[], heldOutClasses: readonly string[], options: BlendOptions): KResult {
  const builtInTruth = groups.flatMap((g) => g.builtIn.map((e) => e.label));
  const heldOutTruth = groups.flatMap((g) => g.heldOut.map((e) => e.label));
  const f1Base = computeMacroF1(builtInTruth, groups.flatMap((g) => predictBase(g.builtIn)), CLASSES);
  const accuracies: number[] = [];
  const protoAccuracies: number[] = [];
  const f1s: number[] = [];
  for (let episode = 0; episode < episodes; episode++) {
    const heldOutPredicted: string[] = [];
    const protoPredicted: string[] = [];
    const builtInPredicted: string[] = [];
    groups.forEach((g, gi) => {
      const shots = drawLibrary(g, heldOutClasses, k, 100_000 * k + 1000 * gi + episode);
      const prototypes = computePrototypes(shots, options.normalization);
      heldOutPredicted.push(...predictWithLibrary(g.heldOut, shots, options));
      protoPredicted.push(...g.heldOut.map((q) => scorePrototypes(q.embedding, prototypes, options)[0].label));
      builtInPredicted.push(...predictWithLibrary(g.builtIn, shots, options));
    });
    accuracies.push(computeAccuracy(heldOutTruth, heldOutPredicted));
    protoAccuracies.push(computeAccuracy(heldOutTruth, protoPredicted));
    f1s.push(computeMacroF1(builtInTruth, builtInPredicted, CLASSES));
  }
  return {
    k, accuracyMean: mean(accuracies), accuracySd: Math.sqrt(mean(accuracies.map((x) => (x - mean(accuracies)) ** 2))),
    accuracyPrototypeOnly: mean(protoAccuracies), f1Base, f1WithLibraryMean: mean(f1s), f1DropWorst: f1Base - Math.min(...f1s),
  };
}

/**
 * Pick the gate on calibration groups: acceptDistance is a low quantile of the built-in incidents'
 * distance to the nearest library prototype (so it says "how many known incidents may the library
 * claim"); keep the setting with the best k = 3 held-out accuracy whose mean built-in macro-F1
 * drop stays within the budget.
 */
function calibrateBlend(groups: readonly EvaluationGroup[], heldOutClasses: readonly string[], normalization: EmbeddingNormalization, f1BudgetPoints: number): { options: BlendOptions; result: KResult } {
  const nearest: number[] = [];
  groups.forEach((g, gi) => {
    for (const episode of [0, 1, 2]) {
      const prototypes = computePrototypes(drawSupport(g.support, heldOutClasses, 3, 77 + 10 * gi + episode), normalization);
      // Distances to the held-out prototypes only: they decide how many known incidents the library may claim.
      for (const q of g.builtIn) nearest.push(scorePrototypes(q.embedding, prototypes, { normalization, temperature: 1 })[0].squaredDistance);
    }
  });
  nearest.sort((a, b) => a - b);
  const quantile = (p: number): number => nearest[Math.min(nearest.length - 1, Math.floor(p * nearest.length))];
  const scale = quantile(0.5);
  let best: { options: BlendOptions; result: KResult } | undefined;
  for (const p of [0.002, 0.005, 0.01, 0.02, 0.03, 0.05, 0.08, 0.12]) {
    for (const softnessShare of [0.02, 0.1]) {
      const acceptDistance = quantile(p);
      const options: BlendOptions = { normalization, temperature: 0.05 * scale, acceptDistance, softness: Math.max(1e-9, softnessShare * acceptDistance), maxWeight: 0.95 };
      const result = evaluateK(3, 10, groups, heldOutClasses, options);
      const isWithinBudget = (result.f1Base - result.f1WithLibraryMean) * 100 <= f1BudgetPoints;
      if (isWithinBudget && (best === undefined || result.accuracyMean > best.result.accuracyMean)) best = { options, result };
    }
  }
  if (best === undefined) throw new Error(`no gate setting kept the built-in macro-F1 drop within ${f1BudgetPoints} points on calibration data`);
  return best;
}

async function embedExamples(embedder: Embedder, examples: readonly TrainingExample[]): Promise<EmbeddedExample[]> {
  const out = await embedder.embed(examples.map((e) => e.metrics));
  return examples.map((e, i) => ({
    label: e.label, systemId: e.systemId, probabilities: out[i].probabilities, embedding: out[i].embedding, signature: computeMetricSignature(e.metrics),
    exportsKeyMetric: e.truth?.some((t) => KEY_ROLES[e.label].includes(t.role)) ?? false,
  }));
}

/** Support examples as the library stores them (downsampled), to measure what storage costs. */
function toStoredMetrics(example: TrainingExample): MetricWindow[] {
  const entry = createLibraryEntry({
    id: 'eval', label: example.label, window: { startMs: 0, endMs: 0 }, baseline: { startMs: 0, endMs: 0 },
    exportSha256: '0'.repeat(64), exportFile: example.systemId, createdMs: 0, modelVersion: 'eval', embedding: [0],
    metrics: example.metrics.map((m) => ({ ...m, name: m.name ?? m.id })),
  });
  return toMetricWindows(entry);
}

const format = (x: number): string => x.toFixed(3);

/** Split groups (or, for one group, its held-out queries by system) into calibration and report halves. */
function splitInHalves(groups: readonly EvaluationGroup[]): [EvaluationGroup[], EvaluationGroup[]] {
  if (groups.length > 1) return [groups.filter((_, i) => i % 2 === 0), groups.filter((_, i) => i % 2 === 1)];
  const [g] = groups;
  const systems = [...new Set(g.heldOut.map((q) => q.systemId))].sort();
  const first = new Set(systems.filter((_, i) => i % 2 === 0));
  const builtInSystems = [...new Set(g.builtIn.map((q) => q.systemId))].sort();
  const firstBuiltIn = new Set(builtInSystems.filter((_, i) => i % 2 === 0));
  return [
    [{ support: g.support, heldOut: g.heldOut.filter((q) => first.has(q.systemId)), builtIn: g.builtIn.filter((q) => firstBuiltIn.has(q.systemId)) }],
    [{ support: g.support, heldOut: g.heldOut.filter((q) => !first.has(q.systemId)), builtIn: g.builtIn.filter((q) => !firstBuiltIn.has(q.systemId)) }],
  ];
}

/** Cross-system protocol: support and queries from disjoint systems (buildFewShotSplits). */
async function buildCrossSystemGroups(embedder: Embedder, seed: number, trainSystems: number): Promise<{ groups: EvaluationGroup[]; rawSupport: TrainingExample[] }> {
  const fewShot = buildFewShotSplits(seed, { supportPerClass: 20, queryPerClass: 150, trainSystems });
  const builtIn = buildSplits(seed, { trainCount: 0, calibrationCount: 0, testCount: 1500, trainSystems }).test;
  const [support, heldOut, builtInEmbedded] = [await embedExamples(embedder, fewShot.support), await embedExamples(embedder, fewShot.query), await embedExamples(embedder, builtIn)];
  return { groups: [{ support, heldOut, builtIn: builtInEmbedded }], rawSupport: fewShot.support };
}

/** Role keys of the held-out types' key metrics (as KEY_ROLES in training/simulator/sampleExamples.ts: pool*, cpuSteal). */
function hasKeyMetricsOfBothHeldOutTypes(systemSeed: number): boolean {
  const roles = buildSystemSpec(systemSeed).series.map((x) => x.role.key);
  return roles.some((r) => r.startsWith('pool')) && roles.includes('cpuSteal');
}

/**
 * Same-system protocol: per simulated system (a team's service), its own support, queries and
 * built-in incidents, plus 40 of its own built-in incidents the library may hold. With
 * `isKeyMetricsOnly`, the first `systemCount` systems that export a key metric of both held-out types.
 */
async function buildSameSystemGroups(embedder: Embedder, seed: number, trainSystems: number, systemCount: number, isKeyMetricsOnly: boolean): Promise<EvaluationGroup[]> {
  const taken = new Set<number>();
  for (const [split, count] of [[1, trainSystems], [2, 80], [3, 80], [4, 20], [5, 60]] as const) drawSystemSeeds(seed, split, count, taken);
  const systems = isKeyMetricsOnly
    ? drawSystemSeeds(seed, 6, 600, taken).filter(hasKeyMetricsOfBothHeldOutTypes).slice(0, systemCount)
    : drawSystemSeeds(seed, 6, systemCount, taken);
  const groups: EvaluationGroup[] = [];
  for (const system of systems) {
    const draw = (part: number, count: number, classes: readonly SimClass[]): Promise<EmbeddedExample[]> =>
      embedExamples(embedder, sampleExamples({ seed: mixSeeds(seed, 60 + part, system), count, systemSeeds: [system], classes }));
    groups.push({ support: await draw(1, 10, HELD_OUT_CLASSES), heldOut: await draw(2, 24, HELD_OUT_CLASSES), builtIn: await draw(3, 80, CLASSES), builtInSupport: await draw(4, 40, CLASSES) });
  }
  return groups;
}

const withoutBuiltInSupport = (groups: readonly EvaluationGroup[]): EvaluationGroup[] => groups.map(({ support, heldOut, builtIn }) => ({ support, heldOut, builtIn }));

const formatRow = (rule: string, r: KResult): string =>
  `| ${rule} | ${r.k} | ${format(r.accuracyMean)} ± ${format(r.accuracySd)} | ${format(r.accuracyPrototypeOnly)} | ${format(r.f1Base)} → ${format(r.f1WithLibraryMean)} | ${(100 * (r.f1Base - r.f1WithLibraryMean)).toFixed(2)} | ${(100 * r.f1DropWorst).toFixed(2)} |\n`;

/** Calibrated competition settings of one table, by variant name. */
type CalibratedRules = Map<string, CompetitionOptions | undefined>;

function writeTable(title: string, calibration: readonly EvaluationGroup[], report: readonly EvaluationGroup[], classes: readonly string[], args: { episodes: number; budget: number }): CalibratedRules {
  const startedMs = Date.now();
  const count = (gs: readonly EvaluationGroup[], key: 'heldOut' | 'builtIn'): number => gs.reduce((s, g) => s + g[key].length, 0);
  process.stdout.write(`\n## ${title}\ncalibration: ${count(calibration, 'heldOut')} held-out / ${count(calibration, 'builtIn')} built-in incidents; report: ${count(report, 'heldOut')} held-out / ${count(report, 'builtIn')} built-in\n\n`);
  const prototype = calibrateBlend(calibration, classes, 'l2', args.budget).options;
  const rules: CalibratedRules = new Map([
    ['compete, combined', calibrateCompetition(calibration, classes, [0.25, 0.5, 0.75], args.budget)?.options],
    ['compete, combined, nearest entry', calibrateCompetition(calibration, classes, [0.25, 0.5, 0.75], args.budget, ['max'])?.options],
    ['compete, combined, with overrides', calibrateCompetition(calibration, classes, [0.25, 0.5, 0.75], args.budget, ['mean', 'max'], [Number.POSITIVE_INFINITY, 0.5, 1, 1.5, 2, 3], true)?.options],
    ['compete, signature only', calibrateCompetition(calibration, classes, [1], args.budget)?.options],
    ['compete, embedding only', calibrateCompetition(calibration, classes, [0], args.budget)?.options],
  ]);
  process.stdout.write(`- prototype (l2): temperature ${prototype.temperature.toPrecision(3)}, acceptDistance ${prototype.acceptDistance.toPrecision(3)}, softness ${prototype.softness.toPrecision(3)}, maxWeight ${prototype.maxWeight}\n`);
  for (const [name, o] of rules) process.stdout.write(`- ${name}: ${o === undefined ? `no setting kept the drop within ${args.budget} points` : describeCompetition(o)}\n`);
  process.stdout.write(`- compete (product defaults): ${describeCompetition(DEFAULT_COMPETITION_OPTIONS)}\n\n`);
  process.stdout.write('| rule | k | held-out accuracy (mean ± sd) | nearest library class accuracy (closed set) | built-in macro-F1 without → with | mean drop (points) | worst-episode drop |\n|---|---|---|---|---|---|---|\n');
  for (const k of [1, 3, 5]) {
    process.stdout.write(formatRow('prototype', evaluateK(k, args.episodes, report, classes, prototype)));
    const sims = computeEpisodeSimilarities(report, classes, k, args.episodes);
    for (const [name, o] of rules) if (o !== undefined) process.stdout.write(formatRow(name, scoreCompetition(k, report, sims, o)));
    process.stdout.write(formatRow('compete (product defaults)', scoreCompetition(k, report, sims, DEFAULT_COMPETITION_OPTIONS)));
  }
  writeKeyMetricSplit(report, classes, args.episodes);
  process.stdout.write(`\n(table: ${((Date.now() - startedMs) / 1000).toFixed(1)} s)\n`);
  return rules;
}

/** Run the evaluation and print the tables (markdown). */
export async function runFewShotEvaluation(argv: readonly string[]): Promise<void> {
  const args = parseFewShotArgs(argv);
  const startedMs = Date.now();
  const seed = args.seed ?? readTrainingSeed(args.modelDir);
  const embedder = await loadEmbedder(args.modelDir);
  process.stdout.write(`# Few-shot evaluation: model ${embedder.modelVersion}, seed ${seed}, ${args.episodes} episodes per k, calibration budget ${args.budget} macro-F1 points\n`);
  const trainSystems = readTrainSystems(args.modelDir);
  const cross = await buildCrossSystemGroups(embedder, seed, trainSystems);
  const [crossCalibration, crossReport] = splitInHalves(cross.groups);
  writeTable('New systems (support and queries from disjoint simulated systems)', crossCalibration, crossReport, HELD_OUT_CLASSES, args);
  const same = await buildSameSystemGroups(embedder, seed, trainSystems, 48, false);
  const [sameCalibration, sameReport] = splitInHalves(same);
  writeTable('Same systems (each team labels and meets incidents of its own service)', withoutBuiltInSupport(sameCalibration), withoutBuiltInSupport(sameReport), HELD_OUT_CLASSES, args);
  writeTable('Same systems, library also holds k of the team\'s incidents per built-in class', sameCalibration, sameReport, HELD_OUT_CLASSES, args);
  const [keyCalibration, keyReport] = splitInHalves(await buildSameSystemGroups(embedder, seed, trainSystems, 48, true));
  writeTable('Same systems exporting a key metric of both held-out types, library also holds k built-in incidents per class', keyCalibration, keyReport, HELD_OUT_CLASSES, args);
  // Product defaults: one setting for teams whose library holds only their own labels and teams whose
  // library also holds their incidents of built-in kinds — calibrated on both calibration halves pooled.
  const joint = calibrateCompetition([...withoutBuiltInSupport(sameCalibration), ...sameCalibration], HELD_OUT_CLASSES, [0.25, 0.5, 0.75], args.budget, ['mean', 'max'], [Number.POSITIVE_INFINITY, 0.5, 1, 1.5, 2, 3], true);
  process.stdout.write(`\nproduct defaults suggested by the pooled same-system calibration halves (with and without built-in incidents in the library): ${joint === undefined ? 'none within budget' : `${describeCompetition(joint.options)} (calibration held-out accuracy ${format(joint.accuracy)})`}\n`);
  writeSideStudies([{ title: 'new systems', groups: crossReport }, { title: 'same systems, library also holds built-in incidents', groups: sameReport }], [...withoutBuiltInSupport(sameCalibration), ...sameCalibration], HELD_OUT_CLASSES, args.episodes, DEFAULT_COMPETITION_OPTIONS);
  await reportStorageEffect(embedder, cross.rawSupport, cross.groups[0].support);
  await embedder.release();
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
