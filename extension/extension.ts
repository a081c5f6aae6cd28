import * as vscode from 'vscode';
import { analyzeExport } from './node/analyze';
import { AnalysisState } from './host/analysisState';
import type { HostDeps } from './host/analysisTypes';
import { registerCommands } from './host/commands';
import { registerIncidentLibrary } from './host/libraryWiring';
import { registerMetricsEditor } from './host/metricsEditorProvider';
import { registerStatusBar } from './host/statusBar';

/** Wiring only: one register line per feature. */
export function activate(context: vscode.ExtensionContext): void {
  const deps: HostDeps = { analyzeExport, extensionUri: context.extensionUri };
  const state = new AnalysisState();
  context.subscriptions.push(state);
  context.subscriptions.push(registerMetricsEditor(deps, state));
  context.subscriptions.push(registerCommands(deps, state));
  context.subscriptions.push(registerStatusBar(state));
  context.subscriptions.push(registerIncidentLibrary(context, deps, state));
}

export function deactivate(): void {
  // disposables are owned by the context
}
