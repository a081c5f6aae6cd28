import * as vscode from 'vscode';
import { loadClassifierModel, type LoadedClassifier } from '../runtime/onnxRunner';
import type { HostDeps } from './analysisTypes';
import type { AnalysisState } from './analysisState';
import { registerLibraryCommands, toLibraryModel, type ActiveLibraryWindow } from './libraryCommands';
import { describeOpenViewers, OPEN_LIBRARY_ENTRY_COMMAND } from './metricsViewer';
import { ViewerLibrary } from './viewerLibrary';

/** Internal command (hidden from the palette) the editor tests read the viewers' headers through. */
export const DESCRIBE_VIEWERS_COMMAND = '_metricTriage.describeViewerLibraries';

/** `{ entryId, exportUri? }` of the open-entry command; undefined when the argument is not that shape. */
function readOpenEntryArgument(arg: unknown): { entryId: string; exportUri?: vscode.Uri } | undefined {
  if (typeof arg !== 'object' || arg === null || !('entryId' in arg) || typeof arg.entryId !== 'string') return undefined;
  const exportUri = 'exportUri' in arg && arg.exportUri instanceof vscode.Uri ? arg.exportUri : undefined;
  return { entryId: arg.entryId, ...(exportUri ? { exportUri } : {}) };
}

type LibraryModel = ReturnType<typeof toLibraryModel>;

/** The library file of the first workspace folder (committed with the postmortems). */
function resolveLibraryPath(): string | undefined {
  const folder = vscode.workspace.workspaceFolders?.[0];
  return folder?.uri.scheme === 'file' ? vscode.Uri.joinPath(folder.uri, '.metric-triage', 'incident-library.json').fsPath : undefined;
}

/** The window of the latest analysis the user saw, cut per metric; undefined before the first one. */
function getActiveWindow(state: AnalysisState): ActiveLibraryWindow | undefined {
  const record = state.latest;
  if (!record) return undefined;
  const { frame, finding } = record.result;
  const cut = (values: Float64Array, span: { startIndex: number; endIndex: number }): Float64Array => values.subarray(span.startIndex, span.endIndex + 1);
  const postmortem = vscode.window.visibleTextEditors.find((e) => e.document.languageId === 'markdown')?.document.uri;
  return {
    exportFile: finding.provenance.exportFile,
    exportSha256: finding.provenance.exportSha256,
    window: { startMs: finding.incident.startMs, endMs: finding.incident.endMs },
    baseline: { startMs: finding.baseline.startMs, endMs: finding.baseline.endMs },
    metrics: frame.series.map((s) => ({ id: s.id, name: s.name, family: s.family, baseline: cut(s.values, finding.baseline), window: cut(s.values, finding.incident) })),
    postmortem: postmortem ? vscode.workspace.asRelativePath(postmortem) : undefined,
  };
}

/**
 * Registers the incident-library commands (label the window, manage entries, re-embed) with the
 * viewer's latest window and an embedding function on the bundled model, loaded once on first use.
 */
export function registerIncidentLibrary(context: vscode.ExtensionContext, deps: HostDeps, state: AnalysisState): vscode.Disposable {
  let model: Promise<LoadedClassifier> | undefined;
  const loadClassifier = (): Promise<LoadedClassifier> => {
    model ??= loadClassifierModel(vscode.Uri.joinPath(deps.extensionUri, 'media', 'model').fsPath);
    // A failed load is not cached: the next use tries again.
    model.catch(() => { model = undefined; });
    return model;
  };
  // The version recorded in entries must be the one analyzeExport matches against (spec version +
  // ONNX sha256), else every entry labelled here would count as stale and never match.
  const loadModel = async (): Promise<LibraryModel> => toLibraryModel(await loadClassifier());
  const viewerLibrary = new ViewerLibrary(state, loadClassifier);
  const commands = registerLibraryCommands(context, {
    resolveLibraryPath, getActiveWindow: async () => getActiveWindow(state), loadModel,
    onLibraryChanged: () => viewerLibrary.scheduleRefresh(),
    openEntry: (entryId) => viewerLibrary.openEntry(entryId),
  });
  const openEntry = vscode.commands.registerCommand(OPEN_LIBRARY_ENTRY_COMMAND, async (arg: unknown) => {
    const parsed = readOpenEntryArgument(arg);
    if (!parsed) {
      console.warn('metric-triage: ignored an open-library-entry request without an entry id', arg);
      return undefined;
    }
    try {
      return await viewerLibrary.openEntry(parsed.entryId, parsed.exportUri);
    } catch (error) {
      void vscode.window.showErrorMessage(`Incident library: ${error instanceof Error ? error.message : String(error)}`);
      return undefined;
    }
  });
  const describe = vscode.commands.registerCommand(DESCRIBE_VIEWERS_COMMAND, () => describeOpenViewers());
  return vscode.Disposable.from(commands, openEntry, describe, state.attachLibrary(viewerLibrary), viewerLibrary,
    { dispose: () => { void model?.then((m) => m.runner.release(), () => undefined); } });
}
