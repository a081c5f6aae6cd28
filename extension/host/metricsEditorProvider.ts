import * as vscode from 'vscode';
import type { HostDeps } from './analysisTypes';
import type { AnalysisState } from './analysisState';
import { MetricsViewer } from './metricsViewer';

/** Read-only custom editor for metric exports: the document is the file; nothing is ever saved. */
export class MetricsEditorProvider implements vscode.CustomReadonlyEditorProvider {
  static readonly viewType = 'metricTriage.metricsEditor';

  constructor(private readonly deps: HostDeps, private readonly state: AnalysisState) {}

  openCustomDocument(uri: vscode.Uri): vscode.CustomDocument {
    return { uri, dispose: () => undefined };
  }

  resolveCustomEditor(document: vscode.CustomDocument, panel: vscode.WebviewPanel): void {
    // The viewer disposes itself with its panel.
    new MetricsViewer(panel, document.uri, this.deps, this.state);
  }
}

/** Registers the custom editor; one viewer per open panel. */
export function registerMetricsEditor(deps: HostDeps, state: AnalysisState): vscode.Disposable {
  return vscode.window.registerCustomEditorProvider(MetricsEditorProvider.viewType, new MetricsEditorProvider(deps, state), {
    supportsMultipleEditorsPerDocument: true,
  });
}
