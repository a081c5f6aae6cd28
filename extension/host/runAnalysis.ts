import * as path from 'node:path';
import * as vscode from 'vscode';
import type { AnalysisResult, HostDeps, MsRange } from './analysisTypes';
import type { AnalysisState } from './analysisState';
import { readSettings } from './settings';

/** Thrown inside the facade's callbacks path when the user cancels; callers treat it as "no result". */
export class AnalysisCancelledError extends Error {
  constructor() { super('analysis cancelled'); }
}

/** The incident library file of the export's workspace folder, when one exists. */
async function findLibraryPath(exportUri: vscode.Uri): Promise<string | undefined> {
  const folder = vscode.workspace.getWorkspaceFolder(exportUri);
  if (!folder || folder.uri.scheme !== 'file') return undefined;
  const candidate = vscode.Uri.joinPath(folder.uri, '.metric-triage', 'incident-library.json');
  try {
    await vscode.workspace.fs.stat(candidate);
    return candidate.fsPath;
  } catch {
    return undefined;
  }
}

/**
 * Analyses one export under a cancellable progress notification and records the result.
 * Returns undefined when the user cancelled or `isSuperseded()` turned true (a newer request won);
 * errors of the facade are re-thrown with the file name in front.
 */
export async function runAnalysis(
  deps: HostDeps,
  state: AnalysisState,
  exportUri: vscode.Uri,
  windows: { readonly incident?: MsRange; readonly baseline?: MsRange } = {},
  isSuperseded: () => boolean = () => false,
): Promise<AnalysisResult | undefined> {
  if (exportUri.scheme !== 'file') {
    throw new Error(`${exportUri.toString()}: expected a file on disk, got a ${exportUri.scheme}: resource`);
  }
  const fileName = path.basename(exportUri.fsPath);
  const libraryPath = await findLibraryPath(exportUri);
  const modelDir = vscode.Uri.joinPath(deps.extensionUri, 'media', 'model').fsPath;
  const settings = readSettings(exportUri);
  const result = await vscode.window.withProgress(
    { location: vscode.ProgressLocation.Notification, title: `Metric Triage: ${fileName}`, cancellable: true },
    async (progress, token) => {
      let reported = 0;
      const isCancelled = (): boolean => token.isCancellationRequested || isSuperseded();
      try {
        const analysed = await deps.analyzeExport(exportUri.fsPath, {
          modelDir, libraryPath, ...windows, isCancelled,
          timelineWindowSteps: settings.windowSteps, timelineStrideSteps: settings.strideSteps, abstainThreshold: settings.abstainThreshold,
          onProgress: (fraction, message) => {
            const next = Math.max(reported, Math.min(1, fraction));
            progress.report({ increment: (next - reported) * 100, message });
            reported = next;
          },
        });
        return isCancelled() ? undefined : analysed;
      } catch (error) {
        if (isCancelled()) return undefined;
        const message = error instanceof Error ? error.message : String(error);
        throw new Error(message.includes(fileName) ? message : `${fileName}: ${message}`);
      }
    },
  );
  if (result) state.set({ exportUri, result });
  return result;
}
