import type { FromWebview } from '../extension/protocol';

interface VsCodeApi {
  postMessage(message: FromWebview): void;
  getState(): unknown;
  setState(state: unknown): void;
}

declare function acquireVsCodeApi(): VsCodeApi;

/** The one acquireVsCodeApi() call of the webview (it may be called only once per page). */
const api = acquireVsCodeApi();

/** Sends a typed message to the extension host. */
export function post(message: FromWebview): void {
  api.postMessage(message);
}

/** UI-only state kept across hide/show (zoom, view mode); the host stays the source of truth. */
export interface UiState {
  readonly viewMs?: { readonly startMs: number; readonly endMs: number };
  readonly isTableView?: boolean;
}

export function readUiState(): UiState {
  const state = api.getState();
  return typeof state === 'object' && state !== null ? (state as UiState) : {};
}

export function writeUiState(state: UiState): void {
  api.setState(state);
}
