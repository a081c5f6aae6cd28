import * as vscode from 'vscode';
import type { AnalysisResult } from './analysisTypes';
import { Disposable } from './util/dispose';

/** The latest analysis of one export, as the user last saw it. */
export interface AnalysisRecord {
  readonly exportUri: vscode.Uri;
  readonly result: AnalysisResult;
}

/**
 * Last analyses by export (the viewer reuses a fresh one instead of re-reading the file) and the
 * most recent one overall (what "insert findings" writes, what the status bar shows).
 */
export class AnalysisState extends Disposable {
  readonly #byExport = new Map<string, AnalysisRecord>();
  #latest: AnalysisRecord | undefined;
  readonly #onDidChange = this._register(new vscode.EventEmitter<AnalysisRecord>());
  readonly onDidChange = this.#onDidChange.event;

  get latest(): AnalysisRecord | undefined {
    return this.#latest;
  }

  get(exportUri: vscode.Uri): AnalysisRecord | undefined {
    return this.#byExport.get(exportUri.toString());
  }

  findByFindingId(findingId: string): AnalysisRecord | undefined {
    if (this.#latest?.result.finding.id === findingId) return this.#latest;
    return Array.from(this.#byExport.values()).find((r) => r.result.finding.id === findingId);
  }

  set(record: AnalysisRecord): void {
    this.#byExport.set(record.exportUri.toString(), record);
    this.#latest = record;
    this.#onDidChange.fire(record);
  }
}
