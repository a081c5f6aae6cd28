/**
 * The incident library's say in a verdict, by competition: every library class (the team's own
 * labels and their past incidents of built-in classes alike) is scored by its mean similarity to
 * the query (prototypical networks, Snell et al. 2017, with a mean of similarities in place of a
 * distance to the mean embedding). The nearest class takes the verdict only when it is one of the
 * team's own labels, the bundled head is not confident, and the similarity clears a threshold.
 * When the team's past incidents of a built-in class are nearer, the library stays silent: that
 * is the head's own ground, and letting the library overrule it there cost built-in accuracy.
 */
import { summarizeBlend, type BlendedVerdict } from './libraryVerdict';
import { combineSimilarity, computeEmbeddingCosine, computeSignatureCosine, hasSharedMetric, type MetricSignature, type SimilarityScale } from './librarySignature';
import { CLASSES } from './types';

/** One library entry as the competition sees it. */
export interface CompetingEntry {
  readonly label: string;
  /** Undefined when the entry's embedding is of another model version (not comparable). */
  readonly embedding?: ArrayLike<number>;
  readonly signature?: MetricSignature;
}

/** The query window as the competition sees it. */
export interface CompetingQuery {
  readonly embedding?: ArrayLike<number>;
  readonly signature?: MetricSignature;
}

/** Mean raw similarities of a query to one library class. */
export interface ClassSimilarity {
  readonly label: string;
  readonly exampleCount: number;
  /**
   * Mean signature cosine over the class's entries that share a metric id with the query;
   * undefined when none does (other systems, other names: the embedding alone then decides).
   */
  readonly signatureCosine?: number;
  /** Mean embedding cosine over the class's entries that have a comparable embedding; undefined when none. */
  readonly embeddingCosine?: number;
  /** Largest signature cosine over the same entries (the nearest single incident). */
  readonly maxSignatureCosine?: number;
  /** Largest embedding cosine over the same entries. */
  readonly maxEmbeddingCosine?: number;
}

/** How a class's entries make one similarity: their mean (a prototype) or the nearest entry's. */
export type ClassAggregate = 'mean' | 'max';

/** Rule settings (see DEFAULT_COMPETITION_OPTIONS for how they were chosen). */
export interface CompetitionOptions {
  readonly scale: SimilarityScale;
  readonly classAggregate: ClassAggregate;
  /** Combined similarity (sd units) the nearest class must reach to take the verdict. */
  readonly acceptSimilarity: number;
  /**
   * Least lead (sd units) of the nearest team label over the nearest library class that bears a
   * built-in name (the team's own incidents of known types), when the library has any; 0 = none.
   */
  readonly acceptMargin: number;
  /**
   * A lead over the library's built-in-named classes (sd units) at which the team label wins even
   * against a confident head or below acceptSimilarity: the team's own incidents of the head's
   * kind look less like this window than their other label does. Infinity = never.
   */
  readonly overrideMargin: number;
  /**
   * Combined similarity (sd units) at which the nearest team label wins even against a confident
   * head, if it also leads by acceptMargin: a near-repeat of a labelled incident. Infinity = never.
   */
  readonly recurrenceSimilarity: number;
  /** The library may overrule the head only when the head's top calibrated probability is ≤ this. */
  readonly headConfidenceCap: number;
  /** Share of probability mass the library takes when it wins, 0..1. */
  readonly maxWeight: number;
  /** Softmax temperature (sd units) that turns class similarities into library probabilities. */
  readonly temperature: number;
}

/**
 * Defaults chosen by `npm run evaluate:few-shot` (training/evaluateFewShot.ts) for the bundled model
 * 0.3.0 (ONNX sha256 4fe31beecc8e…, embedding size 64) and signatures with the dead band
 * (SIGNATURE_DEAD_BAND), seed 20261202: the setting with the best k = 3 held-out accuracy on the
 * pooled same-system calibration halves (24 services, libraries with and without the team's
 * incidents of built-in kinds) whose built-in macro-F1 drop stayed within 1 point there (held-out
 * accuracy 0.323 on those halves; 0.282 without the dead band). The override margin it picked, 1.0,
 * also recognises a service's repeated pool exhaustions in the recurrence test (the product's own
 * promise: label an incident once, recognise the next one). The scale is the mean ± sd of the
 * query-to-class cosines on the same data. Re-run the evaluation after retraining: the embedding
 * part of the scale and the thresholds depend on the model.
 */
export const DEFAULT_COMPETITION_OPTIONS: CompetitionOptions = {
  scale: { signatureWeight: 0.5, signatureMean: 0.333, signatureSd: 0.229, embeddingMean: 0.455, embeddingSd: 0.225 },
  classAggregate: 'mean',
  acceptSimilarity: 1,
  acceptMargin: 0,
  overrideMargin: 1.0,
  recurrenceSimilarity: 2.5,
  headConfidenceCap: 0.8,
  maxWeight: 0.9,
  temperature: 0.25,
};

/**
 * Per library label (in order of first appearance), the mean and largest signature cosine and
 * embedding cosine of the query to that label's entries. Entries without an embedding are left out of the
 * embedding mean only; entries without a signature or without a metric id in common with the
 * query are left out of the signature mean only. Empty library → empty array.
 */
export function computeClassSimilarities(query: CompetingQuery, entries: readonly CompetingEntry[]): ClassSimilarity[] {
  const sums = new Map<string, { count: number; sig: number; sigMax: number; sigCount: number; emb: number; embMax: number; embCount: number }>();
  for (const entry of entries) {
    const slot = sums.get(entry.label) ?? { count: 0, sig: 0, sigMax: -Infinity, sigCount: 0, emb: 0, embMax: -Infinity, embCount: 0 };
    slot.count += 1;
    if (query.signature !== undefined && entry.signature !== undefined && hasSharedMetric(query.signature, entry.signature)) {
      const c = computeSignatureCosine(query.signature, entry.signature);
      slot.sig += c; slot.sigMax = Math.max(slot.sigMax, c); slot.sigCount += 1;
    }
    if (query.embedding !== undefined && entry.embedding !== undefined) {
      const c = computeEmbeddingCosine(query.embedding, entry.embedding);
      slot.emb += c; slot.embMax = Math.max(slot.embMax, c); slot.embCount += 1;
    }
    sums.set(entry.label, slot);
  }
  return [...sums].map(([label, s]) => ({
    label, exampleCount: s.count,
    ...(s.sigCount > 0 ? { signatureCosine: s.sig / s.sigCount, maxSignatureCosine: s.sigMax } : {}),
    ...(s.embCount > 0 ? { embeddingCosine: s.emb / s.embCount, maxEmbeddingCosine: s.embMax } : {}),
  }));
}

/**
 * Blend the head's calibrated probabilities with the library by competition. The nearest library
 * class c* (highest combined similarity s*, see combineSimilarity, of the class's mean or nearest-entry
 * cosines as `classAggregate` says; ties keep the first) takes the
 * library weight w = maxWeight when isLibraryWinAccepted says so (c* is not a built-in class; and
 * either the head's top probability ≤ headConfidenceCap, s* ≥ acceptSimilarity and s* leads the
 * nearest built-in-named library class (if any) by ≥ acceptMargin, or that lead ≥ overrideMargin);
 * otherwise w = 0 and the base
 * verdict is returned unchanged. With w > 0: p(c) = (1 − w)·base(c) + w·q(c), q = softmax of the
 * class similarities / temperature (a built-in label adds to its class). `libraryMatch` is set
 * when the winner got more of its probability from the library than from the head. Throws when
 * the base is empty or options are out of range (programmer error).
 */
export function competeVerdict(baseProbabilities: Readonly<Record<string, number>>, classes: readonly ClassSimilarity[], options: CompetitionOptions = DEFAULT_COMPETITION_OPTIONS): BlendedVerdict {
  checkOptions(options);
  const base = Object.entries(baseProbabilities);
  if (base.length === 0) throw new Error('expected base probabilities for at least one class, got none');
  const { scores, nearestIndex, leadOverBuiltIn } = rankLibraryClasses(classes, options);
  const winner = nearestIndex >= 0 ? classes[nearestIndex] : undefined;
  const headTop = Math.max(...base.map(([, p]) => p));
  const isAccepted = winner !== undefined && isLibraryWinAccepted(winner.label, scores[nearestIndex], leadOverBuiltIn, headTop, options);
  const weight = isAccepted ? options.maxWeight : 0;
  const blended = new Map<string, number>(base.map(([name, p]) => [name, (1 - weight) * p]));
  const libraryPart = new Map<string, number>();
  if (weight > 0) {
    const finite = classes.map((c, i) => ({ c, s: scores[i] })).filter((x) => Number.isFinite(x.s));
    const top = Math.max(...finite.map((x) => x.s));
    const exps = finite.map((x) => Math.exp((x.s - top) / options.temperature));
    const total = exps.reduce((a, b) => a + b, 0);
    finite.forEach((x, i) => {
      const part = (weight * exps[i]) / total;
      libraryPart.set(x.c.label, part);
      blended.set(x.c.label, (blended.get(x.c.label) ?? 0) + part);
    });
  }
  return {
    ...summarizeBlend(blended, libraryPart, classes),
    libraryWeight: weight,
    ...(winner !== undefined ? { nearestSimilarity: scores[nearestIndex], nearestLabel: winner.label } : {}),
  };
}

/** Library classes ranked for a query (see rankLibraryClasses). */
export interface LibraryRanking {
  /** Combined similarity per class (input order); −Infinity when the class has nothing comparable. */
  readonly scores: readonly number[];
  /** Index of the nearest class (first of ties), −1 when no score is finite. */
  readonly nearestIndex: number;
  /** Nearest score minus the best built-in-named class's score; +Infinity when there is none. */
  readonly leadOverBuiltIn: number;
}

/**
 * Combined similarity of every library class (mean or nearest-entry cosines, per
 * `options.classAggregate`), the nearest class and its lead over the library's built-in-named classes.
 */
export function rankLibraryClasses(classes: readonly ClassSimilarity[], options: CompetitionOptions): LibraryRanking {
  const scores = classes.map((c) => (options.classAggregate === 'max'
    ? combineSimilarity(c.maxSignatureCosine, c.maxEmbeddingCosine, options.scale)
    : combineSimilarity(c.signatureCosine, c.embeddingCosine, options.scale)));
  let nearestIndex = -1;
  let nearestBuiltIn = Number.NEGATIVE_INFINITY;
  scores.forEach((s, i) => {
    if (Number.isFinite(s) && (nearestIndex < 0 || s > scores[nearestIndex])) nearestIndex = i;
    if (isBuiltInLabel(classes[i].label) && s > nearestBuiltIn) nearestBuiltIn = s;
  });
  const leadOverBuiltIn = nearestIndex < 0 ? Number.NEGATIVE_INFINITY : scores[nearestIndex] - nearestBuiltIn;
  return { scores, nearestIndex, leadOverBuiltIn };
}

/**
 * The competition's gate: may the nearest library class `label` (combined similarity `score`,
 * `leadOverBuiltIn` ahead of the built-in-named classes) overrule a head whose top calibrated
 * probability is `headTop`? Only a team label; then a lead ≥ overrideMargin over the team's
 * incidents of built-in kinds, or a lead ≥ acceptMargin with either a near-repeat (score ≥
 * recurrenceSimilarity) or an unsure head and a near enough match (score ≥ acceptSimilarity).
 */
export function isLibraryWinAccepted(label: string, score: number, leadOverBuiltIn: number, headTop: number, options: CompetitionOptions): boolean {
  if (isBuiltInLabel(label) || !(score > Number.NEGATIVE_INFINITY)) return false;
  // The override needs built-in-named classes to lead over (a finite lead); without them only the plain gate applies.
  if (Number.isFinite(leadOverBuiltIn) && leadOverBuiltIn >= options.overrideMargin) return true;
  if (leadOverBuiltIn < options.acceptMargin) return false;
  return score >= options.recurrenceSimilarity || (headTop <= options.headConfidenceCap && score >= options.acceptSimilarity);
}

function isBuiltInLabel(label: string): boolean {
  return (CLASSES as readonly string[]).includes(label);
}

function checkOptions(options: CompetitionOptions): void {
  if (!(options.maxWeight >= 0 && options.maxWeight <= 1)) throw new Error(`expected maxWeight in 0..1, got ${options.maxWeight}`);
  if (!(options.temperature > 0)) throw new Error(`expected temperature > 0, got ${options.temperature}`);
  if ([options.acceptSimilarity, options.acceptMargin, options.overrideMargin, options.recurrenceSimilarity, options.headConfidenceCap].some(Number.isNaN)) throw new Error('expected numeric similarity thresholds, margins and head-confidence cap, got NaN');
}
