import type { LibraryEntry } from './libraryTypes';
import { computePrototypes, scorePrototypes } from './prototypes';
import { blendVerdict, DEFAULT_BLEND_OPTIONS, findNearestIncidents, type BlendedVerdict, type BlendOptions, type NearestIncident } from './libraryVerdict';

/** The library applied to one classified window. */
export interface LibraryMatch {
  readonly verdict: BlendedVerdict;
  /** Nearest past incidents (current model version only), nearest first. */
  readonly nearest: readonly NearestIncident[];
  /** Entries used (embedded by the current model version). */
  readonly usedEntryCount: number;
  /** Entries skipped because another model version embedded them: run "re-embed". */
  readonly staleEntryCount: number;
}

/**
 * Blend a classified window with the incident library: prototypes from the entries embedded by
 * `modelVersion` (others are skipped and counted, since embeddings of two models are not
 * comparable), the blended verdict (see blendVerdict) and the `nearestCount` nearest entries.
 * An empty or fully stale library gives the base verdict unchanged (libraryWeight 0).
 * `baseProbabilities` are the bundled head's calibrated probabilities by class name.
 */
export function matchLibrary(
  baseProbabilities: Readonly<Record<string, number>>,
  embedding: ArrayLike<number>,
  entries: readonly LibraryEntry[],
  modelVersion: string,
  options: BlendOptions = DEFAULT_BLEND_OPTIONS,
  nearestCount = 3,
): LibraryMatch {
  const current = entries.filter((e) => e.modelVersion === modelVersion && e.embedding.length === embedding.length);
  const prototypes = computePrototypes(current, options.normalization);
  const verdict = blendVerdict(baseProbabilities, scorePrototypes(embedding, prototypes, options), options);
  return {
    verdict,
    nearest: findNearestIncidents(embedding, current, nearestCount, options),
    usedEntryCount: current.length,
    staleEntryCount: entries.length - current.length,
  };
}
