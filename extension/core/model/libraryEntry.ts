import type { Family } from '../frame/types';
import { CLASSES, type MetricWindow } from './types';
import { checkLibraryLabel } from './libraryDocument';
import {
  LIBRARY_MAX_POINTS, LIBRARY_SCHEMA_VERSION,
  type LibraryDocument, type LibraryEntry, type LibraryMetric, type LibraryTimeSpan,
} from './libraryTypes';

/** Significant digits kept for stored numbers: float32 embeddings need ~7, and it halves the file. */
const STORED_DIGITS = 7;

/**
 * How to thin a series: `mean` averages equal-width buckets (like re-reading the export at a
 * coarser step; the classifier resamples windows the same way), `pick` keeps the middle sample of
 * each bucket (keeps the spread, so baseline median/MAD — the classifier's normalisation — stay
 * close to the full series', where averaging would shrink the MAD and inflate every deviation).
 */
export type DownsampleMode = 'mean' | 'pick';

/**
 * Downsample a series to at most `maxPoints` points (see DownsampleMode). Gaps (NaN) are skipped
 * inside a `mean` bucket; a bucket of gaps only, or a picked gap, stays a gap (`null`). Series
 * already short enough are copied unchanged (NaN → null). Values are rounded to 7 significant
 * digits. Empty input gives an empty array.
 */
export function downsampleForLibrary(values: ArrayLike<number>, maxPoints: number = LIBRARY_MAX_POINTS, mode: DownsampleMode = 'mean'): (number | null)[] {
  if (!Number.isInteger(maxPoints) || maxPoints < 1) throw new Error(`expected maxPoints ≥ 1, got ${maxPoints}`);
  const n = values.length;
  const count = Math.min(n, maxPoints);
  const out: (number | null)[] = new Array<number | null>(count);
  for (let b = 0; b < count; b++) {
    const from = Math.floor((b * n) / count);
    const to = Math.floor(((b + 1) * n) / count);
    if (mode === 'pick') {
      const v = values[Math.floor((from + to - 1) / 2)];
      out[b] = Number.isFinite(v) ? roundStored(v) : null;
      continue;
    }
    let sum = 0;
    let used = 0;
    for (let i = from; i < to; i++) {
      const v = values[i];
      if (Number.isFinite(v)) { sum += v; used += 1; }
    }
    out[b] = used === 0 ? null : roundStored(sum / used);
  }
  return out;
}

/** One metric as taken from the frame for a new entry. */
export interface LibraryMetricInput {
  readonly id: string;
  readonly name: string;
  readonly family: Family;
  readonly baseline: ArrayLike<number>;
  readonly window: ArrayLike<number>;
}

/** Everything needed to make an entry; `embedding` comes from the classifier for these metrics. */
export interface LibraryEntryInput extends Omit<LibraryEntry, 'isBuiltInClass' | 'embedding' | 'metrics'> {
  readonly embedding: ArrayLike<number>;
  readonly metrics: readonly LibraryMetricInput[];
}

/**
 * A library entry from a labelled window: metrics downsampled to ≤ 64 points per window (window by
 * bucket means, baseline by picking samples), numbers
 * rounded to 7 significant digits, `isBuiltInClass` derived from the label. Metrics whose window
 * is all gaps are dropped (they carry nothing to re-embed). Throws (programmer error) on a bad
 * label, a non-finite embedding value or when no metric has data, naming what was expected.
 */
export function createLibraryEntry(input: LibraryEntryInput): LibraryEntry {
  const labelError = checkLibraryLabel(input.label);
  if (labelError !== undefined) throw new Error(`label: ${labelError}`);
  const embedding = Array.from(input.embedding, (v, i) => {
    if (!Number.isFinite(v)) throw new Error(`expected a finite embedding, got ${v} at index ${i}`);
    return roundStored(v);
  });
  const metrics: LibraryMetric[] = [];
  for (const m of input.metrics) {
    const window = downsampleForLibrary(m.window);
    if (window.every((v) => v === null)) continue;
    const baseline = downsampleForLibrary(m.baseline, LIBRARY_MAX_POINTS, 'pick');
    metrics.push({ id: m.id, name: m.name, family: m.family, baseline: baseline.length > 0 ? baseline : [null], window });
  }
  if (metrics.length === 0) throw new Error(`expected at least one metric with data in the window, got ${input.metrics.length} metrics all empty`);
  return {
    id: input.id, label: input.label, isBuiltInClass: isBuiltInClassLabel(input.label),
    window: input.window, baseline: input.baseline, exportSha256: input.exportSha256, exportFile: input.exportFile,
    ...(input.postmortem !== undefined ? { postmortem: input.postmortem } : {}),
    createdMs: input.createdMs, modelVersion: input.modelVersion, embedding, metrics,
  };
}

/**
 * Entry id from the UTC creation time (so ids sort by age, and the file by id reads like a log)
 * and a random hex suffix supplied by the caller (core has no randomness of its own), e.g.
 * `20261104T140300Z-3f9a1c`.
 */
export function formatEntryId(nowMs: number, suffixHex: string): string {
  const stamp = new Date(nowMs).toISOString().replace(/[-:]/g, '').replace(/\.\d+Z$/, 'Z');
  return `${stamp}-${suffixHex}`;
}

/**
 * The model version recorded in entries: the spec's version plus the first 12 hex digits of the
 * ONNX file's sha256, so a retrained model that forgot to bump its version still counts as new
 * (embeddings of two different weight sets are not comparable).
 */
export function formatLibraryModelVersion(specVersion: string, modelSha256: string): string {
  return `${specVersion}+${modelSha256.slice(0, 12)}`;
}

/** True when `label` is one of the bundled model's classes. */
export function isBuiltInClassLabel(label: string): boolean {
  return (CLASSES as readonly string[]).includes(label);
}

/** The stored metrics as classifier input (null → NaN gap), in stored order. */
export function toMetricWindows(entry: LibraryEntry): MetricWindow[] {
  const toArray = (values: readonly (number | null)[]): Float64Array => Float64Array.from(values, (v) => (v === null ? Number.NaN : v));
  return entry.metrics.map((m) => ({ id: m.id, name: m.name, family: m.family, baseline: toArray(m.baseline), window: toArray(m.window) }));
}

/** Embeds stored metrics with the current model (the classifier's embedding output for one window). */
export type EmbedMetricWindows = (metrics: readonly MetricWindow[]) => Promise<ArrayLike<number>>;

/** Result of re-embedding: the new document and the ids whose embedding was recomputed. */
export interface ReembedResult {
  readonly document: LibraryDocument;
  readonly reembeddedIds: readonly string[];
}

/**
 * Recompute the embedding of every entry whose modelVersion differs from `modelVersion`, from its
 * stored metric data through `embed` (the current classifier). Entries already at that version are
 * kept as they are. Pure apart from `embed`; the input document is not modified.
 */
export async function reembedLibrary(document: LibraryDocument, modelVersion: string, embed: EmbedMetricWindows): Promise<ReembedResult> {
  const entries: LibraryEntry[] = [];
  const reembeddedIds: string[] = [];
  for (const entry of document.entries) {
    if (entry.modelVersion === modelVersion) { entries.push(entry); continue; }
    const raw = await embed(toMetricWindows(entry));
    const embedding = Array.from(raw, (v, i) => {
      if (!Number.isFinite(v)) throw new Error(`expected a finite embedding for entry ${entry.id}, got ${v} at index ${i}`);
      return roundStored(v);
    });
    entries.push({ ...entry, modelVersion, embedding });
    reembeddedIds.push(entry.id);
  }
  return { document: { schemaVersion: LIBRARY_SCHEMA_VERSION, entries }, reembeddedIds };
}

/** Entries whose embedding belongs to another model version (need re-embedding before use). */
export function findStaleEntries(document: LibraryDocument, modelVersion: string): LibraryEntry[] {
  return document.entries.filter((e) => e.modelVersion !== modelVersion);
}

function roundStored(value: number): number {
  return value === 0 ? 0 : Number(value.toPrecision(STORED_DIGITS));
}
