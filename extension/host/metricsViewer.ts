import { randomUUID } from 'node:crypto';
import * as path from 'node:path';
import * as vscode from 'vscode';
import { assertNever, isFromWebview, type FromWebview, type ToWebview } from '../protocol';
import { buildAnalysisUpdate, buildViewerModel } from '../core/view/buildViewerModel';
import { buildLibraryView } from '../core/view/buildLibraryView';
import type { LibraryView } from '../core/view/types';
import { renderWebviewHtml } from '../core/view/renderWebviewHtml';
import type { AnalysisResult, HostDeps, MsRange } from './analysisTypes';
import type { AnalysisState } from './analysisState';
import { runAnalysis } from './runAnalysis';
import { Disposable } from './util/dispose';

/** Timings reported by the webview (first paint etc.), for the editor benchmark. */
export const viewerTimings: { name: string; durationMs: number; exportFile: string }[] = [];

/** Command the webview's library links go through (internal: `_` keeps it out of the palette). */
export const OPEN_LIBRARY_ENTRY_COMMAND = '_metricTriage.openLibraryEntry';

/** What one open viewer last sent for its verdict header (for the editor tests' internal command). */
export interface ViewerLibrarySnapshot {
  readonly exportUri: string;
  readonly findingId: string;
  readonly verdictClassName: string;
  readonly library: LibraryView | undefined;
  /** Library-only refreshes posted so far. */
  readonly libraryUpdateCount: number;
}

const openViewers = new Set<MetricsViewer>();

/** Snapshots of every open viewer that has shown an analysis. */
export function describeOpenViewers(): ViewerLibrarySnapshot[] {
  return [...openViewers].flatMap((v) => (v.snapshot ? [v.snapshot] : []));
}

/** Options every viewer panel gets: scripts on, forms off, resources only from dist and media. */
export function createWebviewOptions(extensionUri: vscode.Uri): vscode.WebviewOptions {
  return {
    enableScripts: true,
    enableForms: false,
    localResourceRoots: [vscode.Uri.joinPath(extensionUri, 'dist'), vscode.Uri.joinPath(extensionUri, 'media')],
  };
}

/**
 * One open metric viewer: owns its panel's listeners, answers the webview's `ready` with the
 * full model, and re-classifies when the user moves a window (only the newest request counts).
 */
export class MetricsViewer extends Disposable {
  #generation = 0;
  #libraryGeneration = 0;
  #libraryUpdateCount = 0;
  #result: AnalysisResult | undefined;
  #library: LibraryView | undefined;
  /** A library change arrived before the first analysis was shown: refresh right after it. */
  #isLibraryRefreshPending = false;

  constructor(
    private readonly panel: vscode.WebviewPanel,
    private readonly exportUri: vscode.Uri,
    private readonly deps: HostDeps,
    private readonly state: AnalysisState,
  ) {
    super();
    panel.webview.options = createWebviewOptions(deps.extensionUri);
    this._register(panel.onDidDispose(() => this.dispose()));
    this._register(panel.webview.onDidReceiveMessage((message: unknown) => this.#onMessage(message)));
    this._register(state.onDidChangeLibrary(() => { void this.#refreshLibrary(); }));
    openViewers.add(this);
    this._register({ dispose: () => openViewers.delete(this) });
    panel.webview.html = this.#renderHtml();
  }

  #renderHtml(): string {
    const webview = this.panel.webview;
    const asUri = (...segments: string[]): string => webview.asWebviewUri(vscode.Uri.joinPath(this.deps.extensionUri, ...segments)).toString();
    return renderWebviewHtml({
      cspSource: webview.cspSource, nonce: randomUUID(), title: `Metrics — ${path.basename(this.exportUri.fsPath)}`,
      scriptUri: asUri('dist', 'webview.js'), styleUris: [asUri('media', 'viewer.css')],
    });
  }

  #post(message: ToWebview): void {
    if (!this.isDisposed) void this.panel.webview.postMessage(message);
  }

  #onMessage(message: unknown): void {
    if (!isFromWebview(message)) {
      console.warn('metric-triage: ignored malformed webview message', message);
      return;
    }
    void this.#handle(message).catch((error: unknown) => this.#post({ type: 'showError', message: error instanceof Error ? error.message : String(error) }));
  }

  async #handle(message: FromWebview): Promise<void> {
    switch (message.type) {
      case 'ready':
        return this.#showInitial();
      case 'selectWindow':
        return this.#reclassify(message.incident, message.baseline);
      case 'requestInsert':
        await vscode.commands.executeCommand('metricTriage.insertFindings', { findingId: message.findingId });
        return;
      case 'reportTiming':
        viewerTimings.push({ name: message.name, durationMs: message.durationMs, exportFile: this.exportUri.fsPath });
        return;
      case 'openLibraryEntry':
        await vscode.commands.executeCommand(OPEN_LIBRARY_ENTRY_COMMAND, { entryId: message.entryId, exportUri: this.exportUri });
        return;
      default:
        return assertNever(message);
    }
  }

  async #showInitial(): Promise<void> {
    const generation = ++this.#generation;
    const analysed = this.state.get(this.exportUri)?.result
      ?? await runAnalysis(this.deps, this.state, this.exportUri, {}, () => this.isDisposed || generation !== this.#generation);
    if (this.isDisposed || !analysed) return;
    const { result, library } = await this.#linkLibrary(analysed);
    if (this.isDisposed || generation !== this.#generation) return;
    this.#result = result;
    this.#library = library;
    this.#post({
      type: 'init',
      model: {
        ...buildViewerModel({
          fileName: path.basename(this.exportUri.fsPath), isTrusted: vscode.workspace.isTrusted,
          frame: result.frame, finding: result.finding, timeline: result.timeline,
        }),
        library,
      },
    });
    if (this.#isLibraryRefreshPending) {
      this.#isLibraryRefreshPending = false;
      void this.#refreshLibrary();
    }
  }

  /**
   * The analysis with its nearest incidents tied to library entries (so the header can link them):
   * re-blended with the library file as it is now. If that fails (model or file unreadable) the
   * analysis is shown as the facade made it, with plain-text nearest incidents, and the reason logged.
   */
  async #linkLibrary(analysed: AnalysisResult): Promise<{ result: AnalysisResult; library: LibraryView | undefined }> {
    try {
      const linked = await this.state.library?.reblend(this.exportUri, analysed);
      if (linked) {
        this.state.replace({ exportUri: this.exportUri, result: linked.result });
        return { result: linked.result, library: buildLibraryView(linked.result.finding, linked.nearest) };
      }
    } catch (error) {
      console.warn(`metric-triage: ${path.basename(this.exportUri.fsPath)}: nearest incidents shown without links:`, error);
    }
    return { result: analysed, library: buildLibraryView(analysed.finding) };
  }

  /**
   * The library file changed: re-blend only the library part of the verdict shown (no re-analysis)
   * and post it. A re-classification or a newer refresh that started meanwhile wins.
   */
  async #refreshLibrary(): Promise<void> {
    const shown = this.#result;
    const library = this.state.library;
    if (!shown) this.#isLibraryRefreshPending = true;
    if (!shown || !library || this.isDisposed) return;
    const generation = ++this.#libraryGeneration;
    let linked: Awaited<ReturnType<typeof library.reblend>>;
    try {
      linked = await library.reblend(this.exportUri, shown);
    } catch (error) {
      if (!this.isDisposed && generation === this.#libraryGeneration) this.#post({ type: 'showError', message: error instanceof Error ? error.message : String(error) });
      return;
    }
    if (!linked || this.isDisposed || generation !== this.#libraryGeneration || this.#result !== shown) return;
    this.#result = linked.result;
    this.#library = buildLibraryView(linked.result.finding, linked.nearest);
    this.#libraryUpdateCount++;
    this.state.replace({ exportUri: this.exportUri, result: linked.result });
    const { verdict, notes, findingId } = buildAnalysisUpdate(linked.result.frame, linked.result.finding);
    this.#post({ type: 'libraryUpdate', update: { findingId, verdict, notes, library: this.#library } });
  }

  async #reclassify(incident: MsRange, baseline: MsRange): Promise<void> {
    const generation = ++this.#generation;
    this.#post({ type: 'busy', isBusy: true, message: 'Re-classifying the selected window…' });
    try {
      const analysed = await runAnalysis(this.deps, this.state, this.exportUri, { incident, baseline }, () => this.isDisposed || generation !== this.#generation);
      if (this.isDisposed || !analysed || generation !== this.#generation) return;
      const { result, library } = await this.#linkLibrary(analysed);
      if (this.isDisposed || generation !== this.#generation) return;
      this.#result = result;
      this.#library = library;
      this.#post({ type: 'update', update: { ...buildAnalysisUpdate(result.frame, result.finding), library } });
    } finally {
      if (generation === this.#generation) this.#post({ type: 'busy', isBusy: false, message: '' });
    }
  }

  /** What this viewer last sent for its verdict header; undefined before its first analysis. */
  get snapshot(): ViewerLibrarySnapshot | undefined {
    const result = this.#result;
    if (!result) return undefined;
    return {
      exportUri: this.exportUri.toString(), findingId: result.finding.id, verdictClassName: result.finding.verdict.className,
      library: this.#library, libraryUpdateCount: this.#libraryUpdateCount,
    };
  }

  /** The latest analysis this viewer shows (undefined until the first one finished). */
  get result(): AnalysisResult | undefined {
    return this.#result;
  }
}
