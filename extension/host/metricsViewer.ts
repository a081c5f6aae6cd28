import { randomUUID } from 'node:crypto';
import * as path from 'node:path';
import * as vscode from 'vscode';
import { assertNever, isFromWebview, type FromWebview, type ToWebview } from '../protocol';
import { buildAnalysisUpdate, buildViewerModel } from '../core/view/buildViewerModel';
import { buildLibraryView } from '../core/view/buildLibraryView';
import { renderWebviewHtml } from '../core/view/renderWebviewHtml';
import type { AnalysisResult, HostDeps, MsRange } from './analysisTypes';
import type { AnalysisState } from './analysisState';
import { runAnalysis } from './runAnalysis';
import { Disposable } from './util/dispose';

/** Timings reported by the webview (first paint etc.), for the editor benchmark. */
export const viewerTimings: { name: string; durationMs: number; exportFile: string }[] = [];

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
  #result: AnalysisResult | undefined;

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
      default:
        return assertNever(message);
    }
  }

  async #showInitial(): Promise<void> {
    const generation = ++this.#generation;
    const result = this.state.get(this.exportUri)?.result
      ?? await runAnalysis(this.deps, this.state, this.exportUri, {}, () => this.isDisposed || generation !== this.#generation);
    if (this.isDisposed || !result) return;
    this.#result = result;
    this.#post({
      type: 'init',
      model: {
        ...buildViewerModel({
          fileName: path.basename(this.exportUri.fsPath), isTrusted: vscode.workspace.isTrusted,
          frame: result.frame, finding: result.finding, timeline: result.timeline,
        }),
        library: buildLibraryView(result.finding),
      },
    });
  }

  async #reclassify(incident: MsRange, baseline: MsRange): Promise<void> {
    const generation = ++this.#generation;
    this.#post({ type: 'busy', isBusy: true, message: 'Re-classifying the selected window…' });
    try {
      const result = await runAnalysis(this.deps, this.state, this.exportUri, { incident, baseline }, () => this.isDisposed || generation !== this.#generation);
      if (this.isDisposed || !result || generation !== this.#generation) return;
      this.#result = result;
      this.#post({ type: 'update', update: { ...buildAnalysisUpdate(result.frame, result.finding), library: buildLibraryView(result.finding) } });
    } finally {
      if (generation === this.#generation) this.#post({ type: 'busy', isBusy: false, message: '' });
    }
  }

  /** The latest analysis this viewer shows (undefined until the first one finished). */
  get result(): AnalysisResult | undefined {
    return this.#result;
  }
}
