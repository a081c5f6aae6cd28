import * as vscode from 'vscode';
import type { AnalysisResult } from './analysisTypes';
import { Disposable } from './util/dispose';
import type { ViewerLibrary } from './viewerLibrary';

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
  readonly #onDidChangeLibrary = this._register(new vscode.EventEmitter<void>());
  /** The incident library file changed (a command saved it, or someone else edited it): viewers re-blend. */
  readonly onDidChangeLibrary = this.#onDidChangeLibrary.event;
  #library: ViewerLibrary | undefined;

  /** The incident library as viewers use it; undefined until the library feature is registered. */
  get library(): ViewerLibrary | undefined {
    return this.#library;
  }

  /** Called by the library wiring once; disposing the result detaches it. */
  attachLibrary(library: ViewerLibrary): vscode.Disposable {
    this.#library = library;
    return new vscode.Disposable(() => { if (this.#library === library) this.#library = undefined; });
  }

  notifyLibraryChanged(): void {
    this.#onDidChangeLibrary.fire();
  }

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

  /**
   * Replace the analysis of an export in place after its verdict was re-blended with the library
   * (same window, same finding id). It stays the latest only if it was; listeners are told only
   * then, since the status bar shows the latest verdict.
   */
  replace(record: AnalysisRecord): void {
    const key = record.exportUri.toString();
    const stored = this.#byExport.get(key);
    // A re-blend of an older window must not overwrite a newer analysis of the same export.
    if (!stored || !isSameWindow(stored.result, record.result)) return;
    this.#byExport.set(key, record);
    if (this.#latest === stored) {
      this.#latest = record;
      this.#onDidChange.fire(record);
    }
  }
}

function isSameWindow(a: AnalysisResult, b: AnalysisResult): boolean {
  const { incident: ai, baseline: ab } = a.finding;
  const { incident: bi, baseline: bb } = b.finding;
  return a.frame === b.frame && ai.startIndex === bi.startIndex && ai.endIndex === bi.endIndex && ab.startIndex === bb.startIndex && ab.endIndex === bb.endIndex;
}
