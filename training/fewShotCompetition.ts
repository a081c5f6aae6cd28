/**
 * The competition rule's side of the few-shot evaluation (training/evaluateFewShot.ts): class
 * similarities per episode, scoring an episode set under given settings, and calibrating the
 * settings on a calibration half within a macro-F1 budget.
 */
import { CLASSES } from '../extension/core/model/types';
import { competeVerdict, computeClassSimilarities, DEFAULT_COMPETITION_OPTIONS, isLibraryWinAccepted, rankLibraryClasses, type ClassAggregate, type ClassSimilarity, type CompetitionOptions } from '../extension/core/model/librarySignatureVerdict';
import { computeAccuracy, computeMacroF1, computeMeanSd, drawLibrary, mean, predictBase, type EmbeddedExample, type EvaluationGroup, type KResult } from './fewShotScoring';

/** Class similarities of every query of one group against one episode's library. */
export interface GroupSimilarities {
  readonly heldOut: readonly ClassSimilarity[][];
  readonly builtIn: readonly ClassSimilarity[][];
}

/** [episode][group] class similarities for k-shot libraries (the same draws as evaluateK). */
export function computeEpisodeSimilarities(groups: readonly EvaluationGroup[], heldOutClasses: readonly string[], k: number, episodes: number): GroupSimilarities[][] {
  const out: GroupSimilarities[][] = [];
  for (let episode = 0; episode < episodes; episode++) {
    out.push(groups.map((g, gi) => {
      const shots = drawLibrary(g, heldOutClasses, k, 100_000 * k + 1000 * gi + episode);
      const sims = (q: EmbeddedExample): ClassSimilarity[] => computeClassSimilarities(q, shots);
      return { heldOut: g.heldOut.map(sims), builtIn: g.builtIn.map(sims) };
    }));
  }
  return out;
}

/** Scores of the competition rule over precomputed similarities (see KResult). */
export function scoreCompetition(k: number, groups: readonly EvaluationGroup[], sims: readonly GroupSimilarities[][], options: CompetitionOptions): KResult {
  const builtInTruth = groups.flatMap((g) => g.builtIn.map((e) => e.label));
  const heldOutTruth = groups.flatMap((g) => g.heldOut.map((e) => e.label));
  const f1Base = computeMacroF1(builtInTruth, groups.flatMap((g) => predictBase(g.builtIn)), CLASSES);
  const accuracies: number[] = [];
  const nearestAccuracies: number[] = [];
  const f1s: number[] = [];
  for (const episode of sims) {
    const heldOut: string[] = [];
    const nearest: string[] = [];
    const builtIn: string[] = [];
    groups.forEach((g, gi) => {
      g.heldOut.forEach((q, i) => {
        const v = competeVerdict(q.probabilities, episode[gi].heldOut[i], options);
        heldOut.push(v.className);
        nearest.push(v.nearestLabel ?? '');
      });
      g.builtIn.forEach((q, i) => builtIn.push(competeVerdict(q.probabilities, episode[gi].builtIn[i], options).className));
    });
    accuracies.push(computeAccuracy(heldOutTruth, heldOut));
    nearestAccuracies.push(computeAccuracy(heldOutTruth, nearest));
    f1s.push(computeMacroF1(builtInTruth, builtIn, CLASSES));
  }
  const [accuracyMean, accuracySd] = computeMeanSd(accuracies);
  return { k, accuracyMean, accuracySd, accuracyPrototypeOnly: mean(nearestAccuracies), f1Base, f1WithLibraryMean: mean(f1s), f1DropWorst: f1Base - Math.min(...f1s) };
}

/** The z-scaling of the two similarities: their mean and sd over query-to-class similarities. */
function estimateSimilarityScale(sims: readonly GroupSimilarities[][], signatureWeight: number, aggregate: ClassAggregate): CompetitionOptions['scale'] {
  const all = sims.flatMap((e) => e.flatMap((g) => [...g.heldOut, ...g.builtIn].flat()));
  const isMax = aggregate === 'max';
  const [signatureMean, signatureSd] = computeMeanSd(all.map((c) => (isMax ? c.maxSignatureCosine : c.signatureCosine) ?? Number.NaN));
  const [embeddingMean, embeddingSd] = computeMeanSd(all.map((c) => (isMax ? c.maxEmbeddingCosine : c.embeddingCosine) ?? Number.NaN));
  const round = (x: number): number => Number(x.toPrecision(3));
  return { signatureWeight, signatureMean: round(signatureMean), signatureSd: round(Math.max(signatureSd, 1e-6)), embeddingMean: round(embeddingMean), embeddingSd: round(Math.max(embeddingSd, 1e-6)) };
}

/** One query as the competition's gate sees it (for fast calibration over many settings). */
interface GateCase {
  readonly truth: string;
  readonly head: string;
  readonly headTop: number;
  readonly nearestLabel: string;
  readonly score: number;
  readonly lead: number;
}

function toGateCase(q: EmbeddedExample, classes: readonly ClassSimilarity[], options: CompetitionOptions): GateCase {
  const { scores, nearestIndex, leadOverBuiltIn } = rankLibraryClasses(classes, options);
  const [head, headTop] = Object.entries(q.probabilities).reduce((best, cur) => (cur[1] > best[1] ? cur : best));
  return { truth: q.label, head, headTop, nearestLabel: nearestIndex >= 0 ? classes[nearestIndex].label : '', score: nearestIndex >= 0 ? scores[nearestIndex] : Number.NEGATIVE_INFINITY, lead: leadOverBuiltIn };
}

/** Gate cases of one calibration episode. */
interface GateEpisode {
  readonly heldOut: readonly GateCase[];
  readonly builtIn: readonly GateCase[];
}

/** Held-out accuracy and built-in macro-F1 drop (points) of one gate setting, means over episodes. */
function scoreGate(episodes: readonly GateEpisode[], builtInTruth: readonly string[], f1Base: number, options: CompetitionOptions): { options: CompetitionOptions; accuracy: number; drop: number } {
  const decide = (c: GateCase): string => (isLibraryWinAccepted(c.nearestLabel, c.score, c.lead, c.headTop, options) ? c.nearestLabel : c.head);
  const accuracy = mean(episodes.map((e) => computeAccuracy(e.heldOut.map((c) => c.truth), e.heldOut.map(decide))));
  const f1 = mean(episodes.map((e) => computeMacroF1(builtInTruth, e.builtIn.map(decide), CLASSES)));
  return { options, accuracy, drop: (f1Base - f1) * 100 };
}

/**
 * Pick the competition rule's acceptance threshold, margin and head-confidence cap (and the
 * signature weight and class aggregate among those given) on calibration groups at k = 3: best
 * held-out accuracy whose mean built-in macro-F1 drop stays within the budget. The search runs the
 * product's gate (rankLibraryClasses + isLibraryWinAccepted) and takes the gated label as the
 * verdict; the reported rows then run the full competeVerdict. Undefined when no setting keeps the budget.
 */
export function calibrateCompetition(groups: readonly EvaluationGroup[], heldOutClasses: readonly string[], weights: readonly number[], f1BudgetPoints: number, aggregates: readonly ClassAggregate[] = ['mean'], overrides: readonly number[] = [Number.POSITIVE_INFINITY], withRecurrence = false): { options: CompetitionOptions; accuracy: number } | undefined {
  const sims = computeEpisodeSimilarities(groups, heldOutClasses, 3, 6);
  const builtInTruth = groups.flatMap((g) => g.builtIn.map((e) => e.label));
  const f1Base = computeMacroF1(builtInTruth, groups.flatMap((g) => predictBase(g.builtIn)), CLASSES);
  const hasBuiltInSupport = groups.some((g) => g.builtInSupport !== undefined);
  const margins = hasBuiltInSupport ? [0, 0.25, 0.5, 1] : [0];
  if (!hasBuiltInSupport) overrides = [Number.POSITIVE_INFINITY];
  let best: { options: CompetitionOptions; accuracy: number; episodes: GateEpisode[] } | undefined;
  for (const classAggregate of aggregates) for (const signatureWeight of weights) {
    const scale = estimateSimilarityScale(sims, signatureWeight, classAggregate);
    // Tiers start off (not inherited from the shipped defaults); the search turns on only those it is given.
    const ranked: CompetitionOptions = { ...DEFAULT_COMPETITION_OPTIONS, scale, classAggregate, overrideMargin: Number.POSITIVE_INFINITY, recurrenceSimilarity: Number.POSITIVE_INFINITY };
    const episodes: GateEpisode[] = sims.map((episode) => ({
      heldOut: groups.flatMap((g, gi) => g.heldOut.map((q, i) => toGateCase(q, episode[gi].heldOut[i], ranked))),
      builtIn: groups.flatMap((g, gi) => g.builtIn.map((q, i) => toGateCase(q, episode[gi].builtIn[i], ranked))),
    }));
    for (const acceptSimilarity of [-0.5, 0, 0.25, 0.5, 0.75, 1, 1.25, 1.5, 1.75, 2, 2.5, 3]) {
      for (const headConfidenceCap of [0.5, 0.6, 0.7, 0.8, 0.9, 0.95, 0.99, 1]) {
        for (const [acceptMargin, overrideMargin] of margins.flatMap((m) => overrides.map((o) => [m, o] as const))) {
          const candidate = scoreGate(episodes, builtInTruth, f1Base, { ...ranked, acceptSimilarity, acceptMargin, overrideMargin, headConfidenceCap });
          if (candidate.drop <= f1BudgetPoints && (best === undefined || candidate.accuracy > best.accuracy)) best = { options: candidate.options, accuracy: candidate.accuracy, episodes };
        }
      }
    }
  }
  if (best === undefined || !withRecurrence) return best;
  // Second stage: may a near-repeat of a team incident outvote a confident head? Scanned on the best setting only.
  for (const recurrenceSimilarity of [4, 3.5, 3, 2.5, 2]) {
    const candidate = scoreGate(best.episodes, builtInTruth, f1Base, { ...best.options, recurrenceSimilarity });
    if (candidate.drop <= f1BudgetPoints && candidate.accuracy >= best.accuracy) best = { ...best, options: candidate.options, accuracy: candidate.accuracy };
  }
  return best;
}

/** One line naming every setting of a competition rule. */
export const describeCompetition = (o: CompetitionOptions): string =>
  `${o.classAggregate} of each class, signatureWeight ${o.scale.signatureWeight}, scale sig ${o.scale.signatureMean}±${o.scale.signatureSd} emb ${o.scale.embeddingMean}±${o.scale.embeddingSd}, acceptSimilarity ${o.acceptSimilarity}, acceptMargin ${o.acceptMargin}, overrideMargin ${o.overrideMargin}, recurrenceSimilarity ${o.recurrenceSimilarity}, headConfidenceCap ${o.headConfidenceCap}, maxWeight ${o.maxWeight}, temperature ${o.temperature}`;

/**
 * The product defaults' k = 3 held-out accuracy on the queries whose window exports a metric that
 * carries their type's key signal (pool usage or pending requests; CPU steal) and on the rest.
 * Without one, a pool exhaustion reaches the metrics only as dependency latency and a CPU steal
 * only as CPU pressure (built-in look-alikes); with one, the head is often surer of its own
 * look-alike class, which closes the gate.
 */
export function writeKeyMetricSplit(report: readonly EvaluationGroup[], classes: readonly string[], episodes: number): void {
  const sims = computeEpisodeSimilarities(report, classes, 3, episodes);
  const tally = { with: [0, 0], without: [0, 0] };
  for (const episode of sims) report.forEach((g, gi) => g.heldOut.forEach((q, i) => {
    const slot = q.exportsKeyMetric === true ? tally.with : tally.without;
    slot[1] += 1;
    if (competeVerdict(q.probabilities, episode[gi].heldOut[i]).className === q.label) slot[0] += 1;
  }));
  const share = tally.with[1] / Math.max(1, tally.with[1] + tally.without[1]);
  const rate = ([right, all]: number[]): string => (all === 0 ? 'n/a' : (right / all).toFixed(3));
  process.stdout.write(`\nproduct defaults, k = 3, held-out queries that export a key metric of their type (${(100 * share).toFixed(1)} %): accuracy ${rate(tally.with)}; the rest: ${rate(tally.without)}\n`);
}
