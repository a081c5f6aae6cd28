import * as vscode from 'vscode';

/** Files of the copied fixture workspace (test/editor/fixtures/workspace). */
export function getFixtureUris(): { folder: vscode.Uri; exportUri: vscode.Uri; postmortemUri: vscode.Uri } {
  const folder = vscode.workspace.workspaceFolders?.[0]?.uri;
  if (!folder) throw new Error('expected the editor to open the fixture workspace folder, got no folder');
  return {
    folder,
    exportUri: vscode.Uri.joinPath(folder, 'exports', 'basket-api-cpu-incident.csv'),
    postmortemUri: vscode.Uri.joinPath(folder, 'postmortems', '2026-01-14-basket-checkout-slow.md'),
  };
}

export const EXTENSION_ID = 'metric-triage.metric-triage';
export const FINDING_START_MARK = '<!-- metric-triage:finding id=';

export function countOccurrences(text: string, needle: string): number {
  return text.split(needle).length - 1;
}
