import * as vscode from 'vscode';
import { encodeMetricWindows } from '../core/model/encode';
import type { MetricWindow } from '../core/model/types';
import { loadClassifierModel, type LoadedClassifier } from '../runtime/onnxRunner';
import type { HostDeps } from './analysisTypes';
import type { AnalysisState } from './analysisState';
import { registerLibraryCommands, type ActiveLibraryWindow } from './libraryCommands';

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
  const loadModel = async (): Promise<{ modelVersion: string; embed: (metrics: readonly MetricWindow[]) => Promise<Float32Array> }> => {
    model ??= loadClassifierModel(vscode.Uri.joinPath(deps.extensionUri, 'media', 'model').fsPath);
    const loaded = await model;
    return {
      modelVersion: loaded.spec.version,
      embed: async (metrics) => {
        const output = await loaded.runner.run(encodeMetricWindows(metrics, loaded.spec.windowSpec));
        return output.embedding.slice(0, output.embeddingSize);
      },
    };
  };
  const commands = registerLibraryCommands(context, { resolveLibraryPath, getActiveWindow: async () => getActiveWindow(state), loadModel });
  return vscode.Disposable.from(commands, { dispose: () => { void model?.then((m) => m.runner.release()); } });
}
