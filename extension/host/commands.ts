import * as vscode from 'vscode';
import type { Finding } from '../core/report/types';
import type { HostDeps } from './analysisTypes';
import type { AnalysisState } from './analysisState';
import { MetricsEditorProvider } from './metricsEditorProvider';
import { insertFindings } from './postmortemWriter';
import { runAnalysis } from './runAnalysis';

/** Command ids, kept beside the code that registers them. */
export const COMMANDS = {
  classifyExport: 'metricTriage.classifyExport',
  openViewer: 'metricTriage.openViewer',
  insertFindings: 'metricTriage.insertFindings',
} as const;

const EXPORT_FILTERS = { 'Metric exports': ['csv', 'json', 'jsonl', 'lp', 'prom', 'om', 'txt', 'gz'] };

/** The export a command acts on: its argument, the active editor's file, or one the user picks. */
async function resolveExportUri(arg: unknown): Promise<vscode.Uri | undefined> {
  if (arg instanceof vscode.Uri) return arg;
  const tabInput = vscode.window.tabGroups.activeTabGroup.activeTab?.input;
  if (tabInput instanceof vscode.TabInputCustom && tabInput.viewType === MetricsEditorProvider.viewType) return tabInput.uri;
  const active = vscode.window.activeTextEditor?.document.uri;
  if (active && active.scheme === 'file' && /\.(csv|json|jsonl|lp|prom|om|txt|gz)$/i.test(active.path)) return active;
  const picked = await vscode.window.showOpenDialog({ canSelectMany: false, filters: EXPORT_FILTERS, title: 'Metric export to classify' });
  return picked?.[0];
}

/**
 * Classifies an export under a cancellable progress notification, then opens it in the metric
 * viewer. Resolves to the Finding (undefined when cancelled, no file chosen, or it failed — the
 * failure is shown to the user with the file name).
 */
async function classifyExport(deps: HostDeps, state: AnalysisState, arg: unknown): Promise<Finding | undefined> {
  const uri = await resolveExportUri(arg);
  if (!uri) return undefined;
  try {
    const result = await runAnalysis(deps, state, uri);
    if (!result) return undefined;
    await vscode.commands.executeCommand('vscode.openWith', uri, MetricsEditorProvider.viewType, { preview: false });
    return result.finding;
  } catch (error) {
    void vscode.window.showErrorMessage(`Metric Triage: ${error instanceof Error ? error.message : String(error)}`);
    return undefined;
  }
}

async function openViewer(arg: unknown): Promise<void> {
  const uri = await resolveExportUri(arg);
  if (uri) await vscode.commands.executeCommand('vscode.openWith', uri, MetricsEditorProvider.viewType, { preview: false });
}

/** Registers the user-facing commands; returns one disposable for all of them. */
export function registerCommands(deps: HostDeps, state: AnalysisState): vscode.Disposable {
  return vscode.Disposable.from(
    vscode.commands.registerCommand(COMMANDS.classifyExport, (arg: unknown) => classifyExport(deps, state, arg)),
    vscode.commands.registerCommand(COMMANDS.openViewer, (arg: unknown) => openViewer(arg)),
    vscode.commands.registerCommand(COMMANDS.insertFindings, (arg: unknown) => insertFindings(state, arg)),
  );
}
