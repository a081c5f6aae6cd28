import * as vscode from 'vscode';
import type { AnalysisState } from './analysisState';
import { formatClassTitle, formatPercent } from '../core/view/formatView';
import { Disposable } from './util/dispose';

/** Status bar entry: model version and the last verdict; clicking opens the last viewer. */
class TriageStatusBar extends Disposable {
  readonly #item = this._register(vscode.window.createStatusBarItem('metricTriage.status', vscode.StatusBarAlignment.Left, 20));

  constructor(state: AnalysisState) {
    super();
    this.#item.name = 'Metric Triage';
    this.#item.text = '$(pulse) Metric Triage';
    this.#item.tooltip = 'Metric Triage: no export classified yet';
    this._register(state.onDidChange((record) => {
      const { verdict, provenance } = record.result.finding;
      const title = verdict.isAbstained ? 'not sure' : `${formatClassTitle(verdict.className)} ${formatPercent(verdict.probability)}`;
      this.#item.text = `$(pulse) ${title}`;
      this.#item.tooltip = `Metric Triage model ${provenance.modelVersion} — last verdict on ${provenance.exportFile}: ${title}. Decision aid, not a root cause.`;
      this.#item.command = { command: 'metricTriage.openViewer', title: 'Open metric viewer', arguments: [record.exportUri] };
      this.#item.show();
    }));
  }
}

/** Registers the status bar item; it appears after the first verdict. */
export function registerStatusBar(state: AnalysisState): vscode.Disposable {
  return new TriageStatusBar(state);
}
