import * as vscode from 'vscode';
import { loadClassifierModel, type LoadedClassifier } from '../runtime/onnxRunner';
import type { HostDeps } from './analysisTypes';
import type { AnalysisState } from './analysisState';
import { registerLibraryCommands, toLibraryModel, type ActiveLibraryWindow } from './libraryCommands';

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
  // The version recorded in entries must be the one analyzeExport matches against (spec version +
  // ONNX sha256), else every entry labelled here would count as stale and never match.
  const loadModel = async (): Promise<LibraryModel> => {
    model ??= loadClassifierModel(vscode.Uri.joinPath(deps.extensionUri, 'media', 'model').fsPath);
    return toLibraryModel(await model);
  };
  const commands = registerLibraryCommands(context, { resolveLibraryPath, getActiveWindow: async () => getActiveWindow(state), loadModel });
  return vscode.Disposable.from(commands, { dispose: () => { void model?.then((m) => m.runner.release()); } });
}
