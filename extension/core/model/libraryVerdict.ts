import type { LibraryEntry } from './libraryTypes';
import type { SharedMover } from './librarySignature';
import {
  DEFAULT_PROTOTYPE_OPTIONS, prepareEmbedding, squaredDistance,
  type PrototypeOptions, type PrototypeScore,
} from './prototypes';

/**
 * How much the library may move the verdict. The library's weight w is a logistic gate on the
 * nearest prototype's squared distance d: w = maxWeight / (1 + exp((d − acceptDistance) / softness)).
 * Far from every prototype (d ≫ acceptDistance) the bundled head decides alone; close to one the
 * library carries up to maxWeight of the probability mass, so a library class can win.
 */
export interface BlendOptions extends PrototypeOptions {
  /** Squared distance (prepared embeddings) at which the library gets half its maximum weight. */
  readonly acceptDistance: number;
  /** Width of the gate in squared-distance units (> 0). */
  readonly softness: number;
  /** Largest share of probability mass the library may take, 0..1. */
  readonly maxWeight: number;
}

/**
 * Defaults chosen by training/evaluateFewShot.ts on its calibration half for model 0.1.0 (l2
 * geometry): the library may claim roughly the 1–2 % of known incidents nearest to its prototypes.
 * They depend on the model's embedding; re-run `npm run evaluate:few-shot` after retraining.
 */
export const DEFAULT_BLEND_OPTIONS: BlendOptions = {
  ...DEFAULT_PROTOTYPE_OPTIONS, acceptDistance: 0.05, softness: 0.005, maxWeight: 0.95,
};

/** The blended verdict. */
export interface BlendedVerdict {
  /** Probability per class: built-in classes and library labels; sums to 1 when the inputs do. */
  readonly probabilities: Readonly<Record<string, number>>;
  readonly className: string;
  readonly probability: number;
  readonly runnerUp: { readonly className: string; readonly probability: number };
  /** Share of the mass given to the library (0 when it is empty or far away). */
  readonly libraryWeight: number;
  /** Squared distance to the nearest prototype; undefined when the library is empty. */
  readonly nearestSquaredDistance?: number;
  /** Competition rule (competeVerdict): combined similarity (sd units) of the nearest library class. */
  readonly nearestSimilarity?: number;
  /** Competition rule: the nearest library class, whether or not it took the verdict. */
  readonly nearestLabel?: string;
  /**
   * Set when the winning class got more of its probability from the library than from the bundled
   * head: shown as "matches your past incident <label> (n examples)".
   */
  readonly libraryMatch?: {
    readonly label: string;
    readonly exampleCount: number;
    /** Metrics that moved alike in this window and in that label's incidents (findSharedMovers); absent when none or no metric data. */
    readonly movedAlike?: readonly SharedMover[];
  };
}

/**
 * The earlier, distance-gated blend; matchLibrary now uses competeVerdict (librarySignatureVerdict.ts),
 * and training/evaluateFewShot.ts keeps this one as the baseline it is compared with.
 * Blend the bundled head's calibrated probabilities with the library's prototype scores:
 * p(c) = (1 − w)·base(c) + w·library(c), with w from the distance gate (see BlendOptions). A library
 * label equal to a built-in class adds to that class. Ties keep the first class in insertion order
 * (built-in classes first). Empty library → the base verdict unchanged with w = 0. Throws when the
 * base probabilities are empty or the options are out of range (programmer error).
 */
export function blendVerdict(baseProbabilities: Readonly<Record<string, number>>, libraryScores: readonly PrototypeScore[], options: BlendOptions = DEFAULT_BLEND_OPTIONS): BlendedVerdict {
  checkBlendOptions(options);
  const base = Object.entries(baseProbabilities);
  if (base.length === 0) throw new Error('expected base probabilities for at least one class, got none');
  const nearest = libraryScores.length > 0 ? Math.min(...libraryScores.map((s) => s.squaredDistance)) : undefined;
  const weight = nearest === undefined ? 0 : computeLibraryWeight(nearest, options);
  const blended = new Map<string, number>();
  for (const [name, p] of base) blended.set(name, (1 - weight) * p);
  const libraryPart = new Map<string, number>();
  for (const score of libraryScores) {
    const part = weight * score.probability;
    libraryPart.set(score.label, part);
    blended.set(score.label, (blended.get(score.label) ?? 0) + part);
  }
  return {
    ...summarizeBlend(blended, libraryPart, libraryScores),
    libraryWeight: weight, ...(nearest !== undefined ? { nearestSquaredDistance: nearest } : {}),
  };
}

/**
 * The winner, runner-up and library match of blended probabilities (shared by the blend rules):
 * ties keep the first class in insertion order; the winner is a library match when more of its
 * probability came from the library (`libraryPart`) than from the head and `libraryClasses` has it.
 */
export function summarizeBlend(
  blended: ReadonlyMap<string, number>,
  libraryPart: ReadonlyMap<string, number>,
  libraryClasses: readonly { readonly label: string; readonly exampleCount: number }[],
): Pick<BlendedVerdict, 'probabilities' | 'className' | 'probability' | 'runnerUp' | 'libraryMatch'> {
  const ranked = [...blended].sort((a, b) => b[1] - a[1]);
  const [className, probability] = ranked[0];
  const runnerUp = ranked[1] ?? ['', 0];
  const fromLibrary = libraryPart.get(className) ?? 0;
  const winner = libraryClasses.find((c) => c.label === className);
  const isLibraryMatch = winner !== undefined && fromLibrary > probability - fromLibrary;
  return {
    probabilities: Object.fromEntries(blended), className, probability,
    runnerUp: { className: runnerUp[0], probability: runnerUp[1] },
    ...(isLibraryMatch ? { libraryMatch: { label: className, exampleCount: winner.exampleCount } } : {}),
  };
}

/** The library's weight for a nearest squared distance (the logistic gate of BlendOptions), 0..maxWeight. */
export function computeLibraryWeight(nearestSquaredDistance: number, options: BlendOptions): number {
  const z = (nearestSquaredDistance - options.acceptDistance) / options.softness;
  // exp overflows to Infinity for z > ~709, which correctly gives weight 0.
  return options.maxWeight / (1 + Math.exp(z));
}

function checkBlendOptions(options: BlendOptions): void {
  if (!(options.softness > 0)) throw new Error(`expected softness > 0, got ${options.softness}`);
  if (!(options.acceptDistance >= 0)) throw new Error(`expected acceptDistance ≥ 0, got ${options.acceptDistance}`);
  if (!(options.maxWeight >= 0 && options.maxWeight <= 1)) throw new Error(`expected maxWeight in 0..1, got ${options.maxWeight}`);
}

/** A past incident near the query, for the "nearest past incidents" list. */
export interface NearestIncident {
  readonly id: string;
  readonly label: string;
  readonly squaredDistance: number;
  /** Cosine similarity of the raw embeddings, −1..1 (1 = same direction); 0 when either is zero. */
  readonly cosineSimilarity: number;
  readonly exportFile: string;
  readonly window: LibraryEntry['window'];
  readonly postmortem?: string;
}

/**
 * The `count` library entries nearest to the query (prepared as in `options`), nearest first;
 * ties by id. Entries whose embedding length differs (another model version, not re-embedded yet)
 * are skipped rather than compared meaninglessly. Empty library or count ≤ 0 → empty array.
 */
export function findNearestIncidents(embedding: ArrayLike<number>, entries: readonly LibraryEntry[], count: number, options: PrototypeOptions = DEFAULT_PROTOTYPE_OPTIONS): NearestIncident[] {
  if (count <= 0) return [];
  const query = prepareEmbedding(embedding, options.normalization);
  const unit = prepareEmbedding(embedding, 'l2');
  return entries
    .filter((e) => e.embedding.length === query.length)
    .map((e) => {
      const unitEntry = prepareEmbedding(e.embedding, 'l2');
      let dot = 0;
      for (let i = 0; i < unit.length; i++) dot += unit[i] * unitEntry[i];
      const prepared = options.normalization === 'l2' ? unitEntry : prepareEmbedding(e.embedding, options.normalization);
      return {
        id: e.id, label: e.label, squaredDistance: squaredDistance(query, prepared),
        cosineSimilarity: dot, exportFile: e.exportFile, window: e.window,
        ...(e.postmortem !== undefined ? { postmortem: e.postmortem } : {}),
      };
    })
    .sort((a, b) => a.squaredDistance - b.squaredDistance || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0))
    .slice(0, count);
}
