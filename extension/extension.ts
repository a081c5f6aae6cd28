import type * as vscode from 'vscode';

/** Wiring only: one register line per feature (features land in extension/host). */
export function activate(_context: vscode.ExtensionContext): void {
  // registered features are added here
}

export function deactivate(): void {
  // disposables are owned by the context
}
