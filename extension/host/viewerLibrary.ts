/**
 * The incident library as the open viewers see it: re-blends a shown analysis with the library's
 * current entries (no re-analysis: the bundled head's answer for the window is computed once per
 * window and kept), tells the viewers when the library file changes (from a command here or from
 * anyone else editing the file), and opens a nearest incident's postmortem or export.
 */
import { realpath } from 'node:fs/promises';
import * as vscode from 'vscode';
import type { IndexWindow, MetricFrame } from '../core/frame/types';
import { createClassifier } from '../core/model/classifier';
import { formatLibraryModelVersion } from '../core/model/libraryEntry';
import type { LibraryEntry } from '../core/model/libraryTypes';
import type { NearestIncident } from '../core/model/libraryVerdict';
import { DEFAULT_LIBRARY_PATH, readLibraryFile } from '../node/libraryStore';
import type { LoadedClassifier } from '../runtime/onnxRunner';
import type { AnalysisResult } from './analysisTypes';
import type { AnalysisState } from './analysisState';
import { reblendFinding, toBaseVerdict, type BaseVerdict } from './reblendFinding';
import { resolveLibraryLink } from './resolveLibraryLink';
import { Disposable } from './util/dispose';

/** A shown analysis with its verdict re-blended, and the nearest entries behind its links. */
export interface ReblendedAnalysis {
  readonly result: AnalysisResult;
  readonly nearest: readonly NearestIncident[] | undefined;
}

/** Outcome of a request to open a library entry (the editor test and logs read it). */
export type OpenEntryOutcome =
  | { readonly status: 'opened'; readonly kind: 'postmortem' | 'export'; readonly uri: vscode.Uri }
  | { readonly status: 'unknown' | 'refused' | 'missing'; readonly message: string };

/** Pause after a library change before viewers re-blend: a save shows up as command + watcher events. */
const REFRESH_DEBOUNCE_MS = 150;

/** The library file of the export's workspace folder (where runAnalysis looks for it too). */
export function findLibraryUri(exportUri: vscode.Uri): vscode.Uri | undefined {
  const folder = vscode.workspace.getWorkspaceFolder(exportUri);
  return folder?.uri.scheme === 'file' ? vscode.Uri.joinPath(folder.uri, ...DEFAULT_LIBRARY_PATH.split('/')) : undefined;
}

async function exists(uri: vscode.Uri): Promise<boolean> {
  try { await vscode.workspace.fs.stat(uri); return true; } catch { return false; }
}

function windowKey(incident: IndexWindow, baseline: IndexWindow): string {
  return `${incident.startIndex}:${incident.endIndex}|${baseline.startIndex}:${baseline.endIndex}`;
}

export class ViewerLibrary extends Disposable {
  /** Base verdicts per frame and window: a window is classified once, however often the library changes. */
  readonly #bases = new WeakMap<MetricFrame, Map<string, Promise<BaseVerdict>>>();
  #refreshTimer: ReturnType<typeof setTimeout> | undefined;

  constructor(private readonly state: AnalysisState, private readonly loadModel: () => Promise<LoadedClassifier>) {
    super();
    for (const folder of vscode.workspace.workspaceFolders ?? []) this.#watch(folder);
    this._register(vscode.workspace.onDidChangeWorkspaceFolders((e) => e.added.forEach((f) => this.#watch(f))));
    this._register({ dispose: () => clearTimeout(this.#refreshTimer) });
  }

  #watch(folder: vscode.WorkspaceFolder): void {
    const watcher = this._register(vscode.workspace.createFileSystemWatcher(new vscode.RelativePattern(folder, DEFAULT_LIBRARY_PATH)));
    const changed = (): void => this.scheduleRefresh();
    this._register(watcher.onDidChange(changed));
    this._register(watcher.onDidCreate(changed));
    this._register(watcher.onDidDelete(changed));
  }

  /** Tell the viewers, once, shortly after the library changed (several events in a row count once). */
  scheduleRefresh(): void {
    if (this.isDisposed) return;
    clearTimeout(this.#refreshTimer);
    this.#refreshTimer = setTimeout(() => {
      this.#refreshTimer = undefined;
      this.state.notifyLibraryChanged();
      void this.#refreshLatest();
    }, REFRESH_DEBOUNCE_MS);
  }

  /**
   * Re-blend the latest analysis too, whether or not a viewer shows it: "insert findings" writes
   * that one, and its nearest incidents should be the library's current ones. Failures are logged;
   * the open viewers report them to the user.
   */
  async #refreshLatest(): Promise<void> {
    const latest = this.state.latest;
    if (!latest) return;
    try {
      const linked = await this.reblend(latest.exportUri, latest.result);
      if (linked && !this.isDisposed) this.state.replace({ exportUri: latest.exportUri, result: linked.result });
    } catch (error) {
      console.warn('metric-triage: the latest finding keeps its earlier library blend:', error);
    }
  }

  async #computeBase(result: AnalysisResult): Promise<BaseVerdict> {
    const model = await this.loadModel();
    const { finding, frame } = result;
    const configured = finding.provenance.settings.abstainThreshold;
    const abstainThreshold = typeof configured === 'number' ? configured : model.spec.abstainThreshold;
    const verdict = await createClassifier(model.runner, model.spec).classifyWindow(frame, finding.incident, finding.baseline, { abstainThreshold });
    return toBaseVerdict(verdict, model.spec.classes, formatLibraryModelVersion(model.spec.version, model.sha256), abstainThreshold);
  }

  #getBase(result: AnalysisResult): Promise<BaseVerdict> {
    const byWindow = this.#bases.get(result.frame) ?? new Map<string, Promise<BaseVerdict>>();
    this.#bases.set(result.frame, byWindow);
    const key = windowKey(result.finding.incident, result.finding.baseline);
    let base = byWindow.get(key);
    if (!base) {
      base = this.#computeBase(result);
      byWindow.set(key, base);
      base.catch(() => byWindow.delete(key)); // a failed load may succeed next time
    }
    return base;
  }

  /**
   * `result` re-blended with the library file as it is now. Undefined when the export lies outside
   * a workspace folder on disk (no library applies). Throws the library store's error, naming the
   * file and what is wrong, when the library file does not validate.
   */
  async reblend(exportUri: vscode.Uri, result: AnalysisResult): Promise<ReblendedAnalysis | undefined> {
    const libraryUri = findLibraryUri(exportUri);
    if (!libraryUri) return undefined;
    const entries: readonly LibraryEntry[] | undefined = (await exists(libraryUri)) ? (await readLibraryFile(libraryUri.fsPath)).entries : undefined;
    const base = await this.#getBase(result);
    const reblended = reblendFinding(result.frame, result.finding, base, entries);
    return { result: { ...result, finding: reblended.finding }, nearest: entries === undefined ? undefined : reblended.nearest };
  }

  /**
   * Open library entry `entryId` of the library beside `exportUri` (or of the first workspace
   * folder): its postmortem in a text editor, else its export in the metric viewer. Unknown ids
   * are logged and ignored (the list may be older than the file); paths outside the workspace are
   * refused with a warning naming the path. Never throws for bad entries.
   */
  async openEntry(entryId: string, exportUri?: vscode.Uri): Promise<OpenEntryOutcome> {
    const folder = (exportUri ? vscode.workspace.getWorkspaceFolder(exportUri) : undefined) ?? vscode.workspace.workspaceFolders?.[0];
    const libraryUri = folder?.uri.scheme === 'file' ? vscode.Uri.joinPath(folder.uri, ...DEFAULT_LIBRARY_PATH.split('/')) : undefined;
    if (!folder || !libraryUri) return this.#warn('refused', 'Incident library: open a workspace folder to follow library links.');
    const entry = (await readLibraryFile(libraryUri.fsPath)).entries.find((e) => e.id === entryId);
    if (!entry) {
      console.warn(`metric-triage: ignored a request to open library entry ${JSON.stringify(entryId)}: no such entry in ${libraryUri.fsPath}`);
      return { status: 'unknown', message: `no entry ${entryId}` };
    }
    const kind = entry.postmortem ? 'postmortem' : 'export';
    const link = entry.postmortem || entry.exportFile;
    const target = resolveLibraryLink(link, folder.uri.fsPath);
    if (target.kind === 'outside') return this.#warn('refused', `Incident library entry ${entry.id} (${entry.label}): not opening its ${kind}: ${target.reason}.`);
    let uri = vscode.Uri.file(target.absolutePath);
    if (!(await exists(uri)) && kind === 'export') uri = await this.#findExportByName(folder, link) ?? uri;
    if (!(await exists(uri))) return this.#warn('missing', `Incident library entry ${entry.id} (${entry.label}): its ${kind} ${link} is not in the workspace (looked for ${uri.fsPath}).`);
    // A symbolic link inside the folder may point out of it: check where it really leads.
    const real = resolveLibraryLink(await realpath(uri.fsPath), await realpath(folder.uri.fsPath));
    if (real.kind === 'outside') return this.#warn('refused', `Incident library entry ${entry.id} (${entry.label}): not opening its ${kind}: ${link} is a link that ${real.reason.replace(/^\S+ /, '')}.`);
    if (kind === 'postmortem') await vscode.commands.executeCommand('vscode.open', uri, { preview: false, viewColumn: vscode.ViewColumn.Beside });
    else await vscode.commands.executeCommand('vscode.openWith', uri, 'metricTriage.metricsEditor', { preview: false, viewColumn: vscode.ViewColumn.Beside });
    return { status: 'opened', kind, uri };
  }

  /** Entries record the export by file name; look for it anywhere in the folder (first match by path). */
  async #findExportByName(folder: vscode.WorkspaceFolder, link: string): Promise<vscode.Uri | undefined> {
    const name = link.split(/[\\/]/).pop() ?? '';
    if (name === '' || /[*?[\]{}]/.test(name)) return undefined;
    const found = await vscode.workspace.findFiles(new vscode.RelativePattern(folder, `**/${name}`), '**/node_modules/**', 10);
    return found.sort((a, b) => a.fsPath.localeCompare(b.fsPath))[0];
  }

  #warn(status: 'refused' | 'missing', message: string): OpenEntryOutcome {
    void vscode.window.showWarningMessage(message);
    return { status, message };
  }
}
