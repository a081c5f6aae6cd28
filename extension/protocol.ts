/**
 * Typed messages between the extension host and the metric viewer webview. Both sides switch on
 * `type` exhaustively; the host runs `isFromWebview` on everything it receives first, because a
 * webview is untrusted input as far as the host is concerned.
 */
import type { AnalysisUpdateView, LibraryView, VerdictView, ViewerModel, WindowRangeView } from './core/view/types';

export type {
  AnalysisUpdateView, ContributionView, LibraryView, NearestIncidentView, SeriesGroupView, SeriesView, TimelineView, VerdictView, ViewerModel, WindowRangeView,
} from './core/view/types';

/**
 * The verdict header after the incident library changed: the verdict re-blended with the library
 * (windows, charts and contributions are unchanged, so they are not sent again).
 */
export interface LibraryUpdateView {
  readonly findingId: string;
  readonly verdict: VerdictView;
  readonly notes: readonly string[];
  /** Absent when the export's workspace has no incident library (any more). */
  readonly library?: LibraryView;
}

/** Longest entry id the host accepts from the webview (ids look like `20261202T014000Z-3f9a1c`). */
export const MAX_ENTRY_ID_LENGTH = 200;

/** Host → webview: what to show. */
export type ToWebview =
  | { readonly type: 'init'; readonly model: ViewerModel }
  | { readonly type: 'update'; readonly update: AnalysisUpdateView }
  | { readonly type: 'libraryUpdate'; readonly update: LibraryUpdateView }
  | { readonly type: 'busy'; readonly isBusy: boolean; readonly message: string }
  | { readonly type: 'showError'; readonly message: string };

/** Webview → host: what the user wants. */
export type FromWebview =
  | { readonly type: 'ready' }
  | { readonly type: 'selectWindow'; readonly incident: WindowRangeView; readonly baseline: WindowRangeView }
  | { readonly type: 'requestInsert'; readonly findingId: string }
  | { readonly type: 'reportTiming'; readonly name: string; readonly durationMs: number }
  /** Open a nearest past incident: its postmortem, else its export (the host decides from the entry). */
  | { readonly type: 'openLibraryEntry'; readonly entryId: string };

/** For exhaustive switches: a compile error when a message type is not handled. */
export function assertNever(value: never): never {
  throw new Error(`unexpected message ${JSON.stringify(value)}`);
}

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

function isFiniteNumber(value: unknown): value is number {
  return typeof value === 'number' && Number.isFinite(value);
}

/** A window is valid when both ends are finite epoch ms and start ≤ end. */
export function isWindowRange(value: unknown): value is WindowRangeView {
  return isRecord(value) && isFiniteNumber(value.startMs) && isFiniteNumber(value.endMs) && value.startMs <= value.endMs;
}

/**
 * True when `value` is a well-formed webview → host message. Unknown types, missing fields,
 * non-finite numbers and reversed windows are rejected (the host ignores them and logs why).
 */
export function isFromWebview(value: unknown): value is FromWebview {
  if (!isRecord(value) || typeof value.type !== 'string') return false;
  switch (value.type) {
    case 'ready':
      return true;
    case 'selectWindow':
      return isWindowRange(value.incident) && isWindowRange(value.baseline);
    case 'requestInsert':
      return typeof value.findingId === 'string' && value.findingId.length > 0 && value.findingId.length <= 200;
    case 'reportTiming':
      return typeof value.name === 'string' && value.name.length <= 100 && isFiniteNumber(value.durationMs) && value.durationMs >= 0;
    case 'openLibraryEntry':
      // Only the shape is checked here; whether the id exists is the host's question (the library may have changed).
      return typeof value.entryId === 'string' && value.entryId.length > 0 && value.entryId.length <= MAX_ENTRY_ID_LENGTH;
    default:
      return false;
  }
}
