import type { Family } from '../frame/types';

/**
 * Schema version of the incident-library file. Bump it when a field changes meaning; a file with
 * a higher version is refused (never rewritten) so an older extension cannot drop what it does not
 * understand.
 */
export const LIBRARY_SCHEMA_VERSION = 1;

/** Most points kept per metric and per window in a library entry (keeps the shared file small). */
export const LIBRARY_MAX_POINTS = 64;

/** A time span in epoch milliseconds UTC, both ends inclusive. */
export interface LibraryTimeSpan {
  readonly startMs: number;
  readonly endMs: number;
}

/**
 * One metric's stored data: its baseline and incident window, each downsampled to at most
 * LIBRARY_MAX_POINTS points. `null` is a gap (JSON has no NaN).
 */
export interface LibraryMetric {
  readonly id: string;
  readonly name: string;
  readonly family: Family;
  readonly baseline: readonly (number | null)[];
  readonly window: readonly (number | null)[];
}

/** One labelled past incident. */
export interface LibraryEntry {
  /** Sortable, unique id (creation time then a random suffix), e.g. `20261202T014000Z-3f9a1c`. */
  readonly id: string;
  /** Built-in class name or the team's own label (e.g. `connection_pool_exhaustion`). */
  readonly label: string;
  /** True when `label` is one of the bundled model's CLASSES. */
  readonly isBuiltInClass: boolean;
  readonly window: LibraryTimeSpan;
  readonly baseline: LibraryTimeSpan;
  /** sha256 (hex) of the export file the window was taken from. */
  readonly exportSha256: string;
  /** Export file name as the user saw it (workspace-relative when possible). */
  readonly exportFile: string;
  /** Link or workspace-relative path of the postmortem that discusses this incident. */
  readonly postmortem?: string;
  readonly createdMs: number;
  /** Version of the model that produced `embedding`; entries of another version are re-embedded. */
  readonly modelVersion: string;
  readonly embedding: readonly number[];
  readonly metrics: readonly LibraryMetric[];
}

/** The whole library file. */
export interface LibraryDocument {
  readonly schemaVersion: number;
  /** Entries sorted by id (merge-friendly: concurrent additions land on different lines). */
  readonly entries: readonly LibraryEntry[];
}

/** A problem found in a library file: where (JSON path like `$.entries[3].label`) and what. */
export interface LibraryIssue {
  readonly file: string;
  readonly path: string;
  readonly message: string;
}

/** Result of reading a library file's text; `document` is set only when `issues` is empty. */
export type LibraryParseResult =
  | { readonly document: LibraryDocument; readonly issues: readonly [] }
  | { readonly document?: undefined; readonly issues: readonly LibraryIssue[] };
