import type { LibraryEntry } from './libraryTypes';
import { toMetricWindows } from './libraryEntry';
import { combineSimilarity, computeEmbeddingCosine, computeMetricSignature, computeSignatureCosine, findSharedMovers, hasSharedMetric, type MetricSignature, type SignatureMetric, type SimilarityScale } from './librarySignature';
import { competeVerdict, computeClassSimilarities, DEFAULT_COMPETITION_OPTIONS, type CompetingEntry, type CompetingQuery, type CompetitionOptions } from './librarySignatureVerdict';
import { findNearestIncidents, type BlendedVerdict, type NearestIncident } from './libraryVerdict';
import type { WindowSpec } from './encode';
import type { IndexWindow, MetricFrame } from '../frame/types';
import { extractLibraryMetrics } from './libraryFrame';

/** The library applied to one classified window. */
export interface LibraryMatch {
  readonly verdict: BlendedVerdict;
  /** Nearest past incidents (current model version only, by embedding cosine), nearest first. */
  readonly nearest: readonly NearestIncident[];
  /** Entries used (embedded by the current model version). */
  readonly usedEntryCount: number;
  /** Entries skipped because another model version embedded them: run "re-embed". */
  readonly staleEntryCount: number;
}

/**
 * The query window's metric data, for the name-aware signature similarity (librarySignature.ts):
 * either the metrics already cut to the incident and baseline windows, or the frame and the two
 * windows (inclusive grid indices) to cut them from. `windowSpec` is the encoding used for
 * signatures; it defaults to DEFAULT_WINDOW_SPEC (a product setting, not the model's).
 */
export type LibraryQuery =
  | { readonly metrics: readonly SignatureMetric[]; readonly windowSpec?: WindowSpec }
  | { readonly frame: MetricFrame; readonly incident: IndexWindow; readonly baseline: IndexWindow; readonly windowSpec?: WindowSpec };

// Entries are immutable and live as long as the loaded library; their signatures are recomputed only when it reloads.
const entrySignatures = new WeakMap<LibraryEntry, { spec: WindowSpec | undefined; signature: MetricSignature }>();

function getEntrySignature(entry: LibraryEntry, spec: WindowSpec | undefined): MetricSignature {
  const cached = entrySignatures.get(entry);
  if (cached !== undefined && cached.spec === spec) return cached.signature;
  const signature = computeMetricSignature(toMetricWindows(entry), spec);
  entrySignatures.set(entry, { spec, signature });
  return signature;
}

function toQueryMetrics(query: LibraryQuery): readonly SignatureMetric[] {
  return 'metrics' in query ? query.metrics : extractLibraryMetrics(query.frame, query.incident, query.baseline);
}

/**
 * Blend a classified window with the incident library by competition (competeVerdict): every
 * label of the entries embedded by `modelVersion` (others are skipped and counted, since
 * embeddings of two models are not comparable) competes by its mean combined similarity — the
 * signature cosine (when `query` gives the window's metric data) mixed with the embedding cosine;
 * a team label wins only when it is nearest, the head is unsure and the similarity is high enough.
 * Without `query` the embedding alone decides (weaker: see DEFAULT_COMPETITION_OPTIONS). Also
 * returns the `nearestCount` nearest entries by embedding cosine. An empty or fully stale library gives
 * the base verdict unchanged (libraryWeight 0). `baseProbabilities` are the head's calibrated
 * probabilities by class name.
 */
export function matchLibrary(
  baseProbabilities: Readonly<Record<string, number>>,
  embedding: ArrayLike<number>,
  entries: readonly LibraryEntry[],
  modelVersion: string,
  query?: LibraryQuery,
  options: CompetitionOptions = DEFAULT_COMPETITION_OPTIONS,
  nearestCount = 3,
): LibraryMatch {
  const current = entries.filter((e) => e.modelVersion === modelVersion && e.embedding.length === embedding.length);
  const queryMetrics = query === undefined ? undefined : toQueryMetrics(query);
  const querySide = { embedding, signature: queryMetrics === undefined ? undefined : computeMetricSignature(queryMetrics, query?.windowSpec) };
  const competing = current.map((e) => ({ label: e.label, embedding: e.embedding, signature: query === undefined ? undefined : getEntrySignature(e, query.windowSpec) }));
  const blended = competeVerdict(baseProbabilities, computeClassSimilarities(querySide, competing), options);
  return {
    verdict: explainMatch(blended, querySide.signature, competing, queryMetrics ?? []),
    // By embedding cosine, the number shown beside each: ranking by the combined similarity was
    // measured too (fewShotStudies.ts) and was no better (held-out kinds on new systems 0.815
    // against 0.852 by embedding; same services 0.593 both, model 0.3.0, k = 3).
    nearest: findNearestIncidents(embedding, current, nearestCount),
    usedEntryCount: current.length,
    staleEntryCount: entries.length - current.length,
  };
}

/** The verdict with the metrics that moved alike in the window and in the matched label's incidents, when it has a library match and there are some. */
function explainMatch(verdict: BlendedVerdict, query: MetricSignature | undefined, entries: readonly { readonly label: string; readonly signature?: MetricSignature }[], metrics: readonly SignatureMetric[]): BlendedVerdict {
  const match = verdict.libraryMatch;
  if (match === undefined || query === undefined) return verdict;
  const families = new Map<string, string>(metrics.map((m) => [m.id, m.family]));
  const signatures = entries.filter((e) => e.label === match.label && e.signature !== undefined).map((e) => e.signature as MetricSignature);
  const movedAlike = findSharedMovers(query, signatures, 3, (id) => families.get(id) ?? 'other');
  return movedAlike.length === 0 ? verdict : { ...verdict, libraryMatch: { ...match, movedAlike } };
}

/**
 * Combined similarity (sd units, combineSimilarity) of one library entry to the query: the
 * signature cosine counts only when both have a signature sharing a metric id, the embedding
 * cosine only when both have an embedding of the same length; −Infinity when neither counts.
 * The per-entry form of what competeVerdict compares per class (the evaluation measures rankings by it).
 */
export function computeEntrySimilarity(query: CompetingQuery, entry: CompetingEntry, scale: SimilarityScale): number {
  const signatureCosine = query.signature !== undefined && entry.signature !== undefined && hasSharedMetric(query.signature, entry.signature)
    ? computeSignatureCosine(query.signature, entry.signature) : undefined;
  const embeddingCosine = query.embedding !== undefined && entry.embedding !== undefined && query.embedding.length === entry.embedding.length
    ? computeEmbeddingCosine(query.embedding, entry.embedding) : undefined;
  return combineSimilarity(signatureCosine, embeddingCosine, scale);
}
