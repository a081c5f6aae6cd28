/**
 * Two side measurements of the few-shot evaluation (training/evaluateFewShot.ts):
 * - how often the first "nearest past incident" bears the query's own label when the list is
 *   ranked by embedding cosine and when it is ranked by the combined similarity the verdict uses;
 * - what the near-repeat and override tiers of the competition rule claim among built-in incidents
 *   the head got right with confidence, and what guards on them would cost in held-out accuracy.
 */
import { computeEntrySimilarity } from '../extension/core/model/libraryMatch';
import { computeEmbeddingCosine } from '../extension/core/model/librarySignature';
import { computeClassSimilarities, isLibraryWinAccepted, rankLibraryClasses, type CompetitionOptions } from '../extension/core/model/librarySignatureVerdict';
import { computeAccuracy, drawLibrary, mean, predictBase, type EmbeddedExample, type EvaluationGroup } from './fewShotScoring';

/** Share of queries whose top-ranked library entry has the query's label, per ranking and query kind. */
export interface RankingAgreement {
  readonly heldOutCount: number;
  readonly builtInCount: number;
  readonly heldOut: { readonly byEmbedding: number; readonly byCombined: number };
  readonly builtIn: { readonly byEmbedding: number; readonly byCombined: number };
}

/** Index of the highest value (first of ties), −1 for none finite. */
function argMax(values: readonly number[]): number {
  let best = -1;
  values.forEach((v, i) => { if (Number.isFinite(v) && (best < 0 || v > values[best])) best = i; });
  return best;
}

/** Share of `queries` whose top entry of `shots` (by `similarity`) bears the query's label. */
function topLabelAgreement(queries: readonly EmbeddedExample[], shots: readonly EmbeddedExample[], similarity: (q: EmbeddedExample, s: EmbeddedExample) => number): number[] {
  return queries.map((q) => (shots[argMax(shots.map((s) => similarity(q, s)))]?.label === q.label ? 1 : 0));
}

/**
 * Top-1 label agreement of the nearest-incident list at k shots per class (same library draws as
 * the tables), separately for held-out queries (the team's own labels) and built-in queries, mean
 * over `episodes`. Built-in queries can agree only when the library holds built-in incidents.
 */
export function measureNearestRanking(groups: readonly EvaluationGroup[], heldOutClasses: readonly string[], k: number, episodes: number, options: CompetitionOptions): RankingAgreement {
  const byEmbedding = (q: EmbeddedExample, s: EmbeddedExample): number => computeEmbeddingCosine(q.embedding, s.embedding);
  const byCombined = (q: EmbeddedExample, s: EmbeddedExample): number => computeEntrySimilarity(q, s, options.scale);
  const sums = { heldOutEmbedding: [] as number[], heldOutCombined: [] as number[], builtInEmbedding: [] as number[], builtInCombined: [] as number[] };
  for (let episode = 0; episode < episodes; episode++) {
    groups.forEach((g, gi) => {
      const shots = drawLibrary(g, heldOutClasses, k, 100_000 * k + 1000 * gi + episode);
      sums.heldOutEmbedding.push(...topLabelAgreement(g.heldOut, shots, byEmbedding));
      sums.heldOutCombined.push(...topLabelAgreement(g.heldOut, shots, byCombined));
      sums.builtInEmbedding.push(...topLabelAgreement(g.builtIn, shots, byEmbedding));
      sums.builtInCombined.push(...topLabelAgreement(g.builtIn, shots, byCombined));
    });
  }
  return {
    heldOutCount: groups.reduce((n, g) => n + g.heldOut.length, 0), builtInCount: groups.reduce((n, g) => n + g.builtIn.length, 0),
    heldOut: { byEmbedding: mean(sums.heldOutEmbedding), byCombined: mean(sums.heldOutCombined) },
    builtIn: { byEmbedding: mean(sums.builtInEmbedding), byCombined: mean(sums.builtInCombined) },
  };
}

/** A guard on the tiers that may overrule a confident head; true = the library may still win. */
export type TierGuard = (c: { readonly headTop: number; readonly score: number; readonly lead: number }) => boolean;

/** What one guard does on calibration data (means over episodes). */
export interface GuardEffect {
  readonly name: string;
  readonly heldOutAccuracy: number;
  /** Built-in incidents with a correct head above headConfidenceCap that the library took, per episode. */
  readonly confidentCorrectClaimed: number;
  readonly confidentCorrectCount: number;
}

/**
 * Held-out accuracy and the claims on confident, correct heads at k shots when `guard` must also
 * hold whenever the head is above options.headConfidenceCap (the only case the near-repeat and
 * override tiers decide). The verdict is the gated label (as the calibration's gate scoring).
 */
export function measureTierGuard(name: string, groups: readonly EvaluationGroup[], heldOutClasses: readonly string[], k: number, episodes: number, options: CompetitionOptions, guard: TierGuard): GuardEffect {
  const accuracies: number[] = [];
  const claims: number[] = [];
  let confidentCorrectCount = 0;
  for (let episode = 0; episode < episodes; episode++) {
    const truth: string[] = [];
    const predicted: string[] = [];
    let claimed = 0;
    confidentCorrectCount = 0;
    groups.forEach((g, gi) => {
      const shots = drawLibrary(g, heldOutClasses, k, 100_000 * k + 1000 * gi + episode);
      const decide = (q: EmbeddedExample): { label: string; head: string; headTop: number } => {
        const classes = computeClassSimilarities(q, shots);
        const { scores, nearestIndex, leadOverBuiltIn } = rankLibraryClasses(classes, options);
        const [head] = predictBase([q]);
        const headTop = q.probabilities[head];
        if (nearestIndex < 0) return { label: head, head, headTop };
        const score = scores[nearestIndex];
        const isAccepted = isLibraryWinAccepted(classes[nearestIndex].label, score, leadOverBuiltIn, headTop, options)
          && (headTop <= options.headConfidenceCap || guard({ headTop, score, lead: leadOverBuiltIn }));
        return { label: isAccepted ? classes[nearestIndex].label : head, head, headTop };
      };
      for (const q of g.heldOut) { truth.push(q.label); predicted.push(decide(q).label); }
      for (const q of g.builtIn) {
        const d = decide(q);
        if (d.head !== q.label || d.headTop <= options.headConfidenceCap) continue;
        confidentCorrectCount += 1;
        if (d.label !== d.head) claimed += 1;
      }
    });
    accuracies.push(computeAccuracy(truth, predicted));
    claims.push(claimed);
  }
  return { name, heldOutAccuracy: mean(accuracies), confidentCorrectClaimed: mean(claims), confidentCorrectCount };
}

/** Guards tried on the tiers that may overrule a confident head (the first is none). */
export const TIER_GUARDS: readonly { readonly name: string; readonly guard: TierGuard }[] = [
  { name: 'none (shipped)', guard: () => true },
  ...[0.9, 0.95, 0.99, 0.999, 0.9999].map((cap) => ({ name: `head top ≤ ${cap}`, guard: ((c) => c.headTop <= cap) as TierGuard })),
  ...[0.5, 1, 1.5].map((margin) => ({ name: `lead over built-in-named ≥ ${margin}`, guard: ((c) => c.lead >= margin) as TierGuard })),
  { name: 'library holds built-in-named classes', guard: (c) => Number.isFinite(c.lead) },
];

/**
 * Print both side measurements (markdown): the ranking agreement on each report half given, and
 * the guards on the pooled calibration halves at k = 3 (the guard is chosen there, as the settings are).
 */
export function writeSideStudies(reports: readonly { readonly title: string; readonly groups: readonly EvaluationGroup[] }[], calibration: readonly EvaluationGroup[], heldOutClasses: readonly string[], episodes: number, options: CompetitionOptions): void {
  const f = (x: number): string => x.toFixed(3);
  process.stdout.write('\n## Nearest past incidents: top entry bears the query\'s label (report halves)\n\n| protocol | k | held-out queries | by embedding cosine | by combined similarity | built-in queries | by embedding cosine | by combined similarity |\n|---|---|---|---|---|---|---|---|\n');
  for (const { title, groups } of reports) {
    for (const k of [1, 3, 5]) {
      const r = measureNearestRanking(groups, heldOutClasses, k, episodes, options);
      process.stdout.write(`| ${title} | ${k} | ${r.heldOutCount} | ${f(r.heldOut.byEmbedding)} | ${f(r.heldOut.byCombined)} | ${r.builtInCount} | ${f(r.builtIn.byEmbedding)} | ${f(r.builtIn.byCombined)} |\n`);
    }
  }
  process.stdout.write('\n## Guards on the tiers that overrule a confident head (pooled same-system calibration halves, k = 3, shipped defaults)\n\n| guard | held-out accuracy | confident correct built-in incidents claimed (mean per episode) |\n|---|---|---|\n');
  for (const { name, guard } of TIER_GUARDS) {
    const r = measureTierGuard(name, calibration, heldOutClasses, 3, episodes, options, guard);
    process.stdout.write(`| ${r.name} | ${f(r.heldOutAccuracy)} | ${r.confidentCorrectClaimed.toFixed(1)} of ${r.confidentCorrectCount} |\n`);
  }
}
