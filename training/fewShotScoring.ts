/**
 * Scoring helpers of the few-shot evaluation: macro-F1 over string labels (library labels may fall
 * outside the scored classes), accuracy, and seeded support draws.
 */
import { CLASSES } from '../extension/core/model/types';
import { computeClassScores, computeConfusionMatrix } from './metrics';
import { createRandom } from './simulator';
import type { MetricSignature } from '../extension/core/model/librarySignature';

/** One example after the model: calibrated class probabilities and embedding. */
export interface EmbeddedExample {
  readonly label: string;
  readonly systemId: string;
  readonly probabilities: Readonly<Record<string, number>>;
  readonly embedding: Float64Array;
  /** Name-aware metric signature (librarySignature.ts) of the example's window. */
  readonly signature?: MetricSignature;
  /** Simulator truth: the window exports a metric that carries its class's key signal (KEY_ROLES). */
  readonly exportsKeyMetric?: boolean;
}

/**
 * Macro-averaged F1 over `classes` (one-vs-rest F1 per class, unweighted mean; a class with no
 * true and no predicted example counts 0, as scikit-learn does with zero_division=0). Predictions
 * outside `classes` (library labels) count as misses of the true class.
 */
export function computeMacroF1(trueLabels: readonly string[], predicted: readonly string[], classes: readonly string[]): number {
  if (trueLabels.length !== predicted.length) throw new Error(`expected as many predictions as labels, got ${predicted.length} and ${trueLabels.length}`);
  if (classes.length === 0) return 0;
  // Labels outside `classes` share one extra row/column, so they count as misses without a score of their own.
  const indexOf = (label: string): number => { const i = classes.indexOf(label); return i >= 0 ? i : classes.length; };
  const confusion = computeConfusionMatrix(trueLabels.map(indexOf), predicted.map(indexOf), classes.length + 1);
  const scores = computeClassScores(confusion).slice(0, classes.length);
  return scores.reduce((sum, c) => sum + c.f1, 0) / classes.length;
}

/** Share of `predicted` equal to `trueLabels` (0 for empty input). */
export function computeAccuracy(trueLabels: readonly string[], predicted: readonly string[]): number {
  if (trueLabels.length === 0) return 0;
  return trueLabels.filter((t, i) => predicted[i] === t).length / trueLabels.length;
}

/** Draw k support examples per class (without replacement), seeded. */
export function drawSupport(support: readonly EmbeddedExample[], classes: readonly string[], k: number, seed: number): EmbeddedExample[] {
  const rng = createRandom(seed);
  const out: EmbeddedExample[] = [];
  for (const c of classes) {
    const pool = support.filter((e) => e.label === c);
    if (pool.length < k) throw new Error(`expected at least ${k} support examples of ${c}, got ${pool.length}`);
    const picked = [...pool];
    for (let i = 0; i < k; i++) {
      const j = i + Math.floor(rng.uniform(0, picked.length - i));
      [picked[i], picked[j]] = [picked[j], picked[i]];
    }
    out.push(...picked.slice(0, k));
  }
  return out;
}


/** Mean and standard deviation of the finite values (population sd); [NaN, NaN] when there are none. */
export function computeMeanSd(values: readonly number[]): [number, number] {
  const finite = values.filter(Number.isFinite);
  if (finite.length === 0) return [Number.NaN, Number.NaN];
  const m = finite.reduce((s, x) => s + x, 0) / finite.length;
  return [m, Math.sqrt(finite.reduce((s, x) => s + (x - m) ** 2, 0) / finite.length)];
}

/** The bundled head's top class per query (no library). */
export function predictBase(queries: readonly EmbeddedExample[]): string[] {
  return queries.map((q) => Object.entries(q.probabilities).reduce((best, cur) => (cur[1] > best[1] ? cur : best))[0]);
}

/**
 * One team's view: the library's support incidents, new incidents of the held-out types, and
 * built-in incidents. The cross-system protocol is one group; the same-system protocol has one
 * group per simulated system (a team labels incidents of its own services).
 */
export interface EvaluationGroup {
  readonly support: readonly EmbeddedExample[];
  readonly heldOut: readonly EmbeddedExample[];
  readonly builtIn: readonly EmbeddedExample[];
  /** The team's own labelled incidents of built-in classes, drawn k per class into the library too. */
  readonly builtInSupport?: readonly EmbeddedExample[];
}

/** The library of one episode: k held-out incidents per class, plus k per built-in class when the group has them. */
export function drawLibrary(g: EvaluationGroup, heldOutClasses: readonly string[], k: number, seed: number): EmbeddedExample[] {
  const shots = drawSupport(g.support, heldOutClasses, k, seed);
  if (g.builtInSupport !== undefined) shots.push(...drawSupport(g.builtInSupport, CLASSES, k, seed + 1));
  return shots;
}

/** Episode results for one k. */
export interface KResult {
  readonly k: number;
  readonly accuracyMean: number;
  readonly accuracySd: number;
  readonly accuracyPrototypeOnly: number;
  readonly f1Base: number;
  readonly f1WithLibraryMean: number;
  readonly f1DropWorst: number;
}

/** Arithmetic mean (NaN for an empty list). */
export const mean = (xs: readonly number[]): number => xs.reduce((s, x) => s + x, 0) / xs.length;
