import * as path from 'node:path';
import * as vscode from 'vscode';
import { renderFindingMarkdown } from '../core/report/renderFindingMarkdown';
import { upsertFindingBlock, type TextEdit } from '../core/report/findingBlock';
import { buildContributionViews } from '../core/view/buildViewerModel';
import { renderTrendSvg, SVG_OWNER_MARK } from '../core/view/renderTrendSvg';
import type { AnalysisRecord, AnalysisState } from './analysisState';
import { readSettings } from './settings';

/** Arguments of `metricTriage.insertFindings` (all optional; tests and the webview pass them). */
export interface InsertFindingsArgs {
  readonly findingId?: string;
  readonly target?: vscode.Uri;
}

/** What happened, returned to the caller of the command (and to the editor tests). */
export type InsertOutcome =
  | { readonly status: 'inserted' | 'replaced'; readonly target: vscode.Uri; readonly block: string; readonly findingId: string }
  | { readonly status: 'untrusted' | 'noFinding' | 'noTarget' | 'readOnly' | 'refused' | 'failed'; readonly message: string };

const MAX_ATTEMPTS = 3;

function isInsertArgs(value: unknown): value is InsertFindingsArgs {
  return typeof value === 'object' && value !== null;
}

/** Picks the postmortem: explicit target, active markdown editor, the setting, or a quick pick. */
async function chooseTarget(explicit: vscode.Uri | undefined): Promise<vscode.Uri | undefined> {
  if (explicit) return explicit;
  const active = vscode.window.activeTextEditor?.document;
  if (active && active.languageId === 'markdown') return active.uri;
  const configured = readSettings().postmortemTarget;
  const folder = vscode.workspace.workspaceFolders?.[0];
  if (configured && folder) return path.isAbsolute(configured) ? vscode.Uri.file(configured) : vscode.Uri.joinPath(folder.uri, configured);
  const files = await vscode.workspace.findFiles('**/*.md', '**/node_modules/**', 200);
  const picked = await vscode.window.showQuickPick(
    files.map((uri) => ({ label: vscode.workspace.asRelativePath(uri), uri })),
    { title: 'Insert findings into which postmortem?', placeHolder: 'Markdown files in the workspace' },
  );
  return picked?.uri;
}

async function isReadOnly(uri: vscode.Uri): Promise<boolean> {
  if (vscode.workspace.fs.isWritableFileSystem(uri.scheme) === false) return true;
  try {
    const stat = await vscode.workspace.fs.stat(uri);
    return ((stat.permissions ?? 0) & vscode.FilePermission.Readonly) !== 0;
  } catch {
    return false; // an untitled or new file: writable once saved
  }
}

/**
 * Writes an SVG of the top metric beside the document as `<doc>-<finding>.svg` and returns the
 * relative link; an existing file is replaced only when this extension wrote it (owner mark).
 */
async function writeChartBeside(doc: vscode.Uri, record: AnalysisRecord): Promise<string | undefined> {
  const { frame, finding } = record.result;
  const top = buildContributionViews(frame, finding)[0];
  if (!top || doc.scheme !== 'file') return undefined;
  const base = path.basename(doc.fsPath, path.extname(doc.fsPath));
  const fileName = `${base}-${finding.id}.svg`;
  const svgUri = vscode.Uri.joinPath(doc, '..', fileName);
  try {
    const existing = new TextDecoder().decode(await vscode.workspace.fs.readFile(svgUri));
    if (!existing.includes(SVG_OWNER_MARK)) {
      void vscode.window.showWarningMessage(`Metric Triage: ${fileName} exists and was not written by Metric Triage; chart not written.`);
      return undefined;
    }
  } catch { /* absent: fine to create */ }
  const svg = renderTrendSvg({ title: `${top.name} ${top.labelText}`.trim(), timesMs: top.timesMs, valuesY: top.valuesY, incident: finding.incident, baseline: finding.baseline });
  await vscode.workspace.fs.writeFile(svgUri, new TextEncoder().encode(svg));
  return `./${fileName}`;
}

function toWorkspaceEdit(doc: vscode.TextDocument, edits: readonly TextEdit[]): vscode.WorkspaceEdit {
  const edit = new vscode.WorkspaceEdit();
  for (const e of edits) edit.replace(doc.uri, new vscode.Range(doc.positionAt(e.start), doc.positionAt(e.end)), e.newText);
  return edit;
}

function cursorOffset(doc: vscode.TextDocument): number | undefined {
  const editor = vscode.window.visibleTextEditors.find((e) => e.document === doc);
  return editor ? doc.offsetAt(editor.selection.active) : undefined;
}

/**
 * Inserts (or replaces, by finding id) the finding block in the chosen postmortem through one
 * WorkspaceEdit, i.e. one undo step. The edit is prepared against a document version and
 * re-prepared when the document changed meanwhile; nothing is written in an untrusted workspace.
 */
export async function insertFindings(state: AnalysisState, rawArgs: unknown): Promise<InsertOutcome> {
  const args: InsertFindingsArgs = isInsertArgs(rawArgs) ? rawArgs : {};
  if (!vscode.workspace.isTrusted) {
    return report({ status: 'untrusted', message: 'This workspace is not trusted: Metric Triage reads and shows exports here but writes nothing. Trust the workspace to insert findings.' });
  }
  const record = args.findingId ? state.findByFindingId(args.findingId) : state.latest;
  if (!record) return report({ status: 'noFinding', message: 'No finding to insert yet: classify an export first (Metric Triage: Classify Export).' });
  const target = await chooseTarget(args.target);
  if (!target) return report({ status: 'noTarget', message: 'No postmortem chosen; nothing was inserted.' });
  if (await isReadOnly(target)) return report({ status: 'readOnly', message: `${vscode.workspace.asRelativePath(target)} is read-only; nothing was inserted.` });
  const doc = await vscode.workspace.openTextDocument(target);
  const wasDirty = doc.isDirty;
  const chartPath = readSettings(target).chartStyle === 'svg' ? await writeChartBeside(target, record) : undefined;
  const block = renderFindingMarkdown(record.result.finding, { chartImagePath: chartPath, includeMermaidChart: readSettings(target).chartStyle === 'mermaid' });
  for (let attempt = 0; attempt < MAX_ATTEMPTS; attempt++) {
    const version = doc.version;
    const planned = upsertFindingBlock(doc.getText(), block, cursorOffset(doc));
    if ('error' in planned) return report({ status: 'refused', message: `${vscode.workspace.asRelativePath(target)}: ${planned.error}` });
    if (doc.version !== version) continue; // changed while planning: plan again on the new text
    const isReplace = planned.edits.some((e) => e.start < e.end);
    const applied = await vscode.workspace.applyEdit(toWorkspaceEdit(doc, planned.edits));
    if (!applied) return report({ status: 'failed', message: `${vscode.workspace.asRelativePath(target)}: the editor refused the edit; nothing was changed.` });
    if (wasDirty) void vscode.window.showInformationMessage(`Findings added to the unsaved changes of ${vscode.workspace.asRelativePath(target)}; save it to keep them.`);
    return { status: isReplace ? 'replaced' : 'inserted', target, block, findingId: record.result.finding.id };
  }
  return report({ status: 'failed', message: `${vscode.workspace.asRelativePath(target)} kept changing while the findings were prepared; try again.` });
}

type FailedOutcome = Extract<InsertOutcome, { readonly message: string }>;

function report(outcome: FailedOutcome): FailedOutcome {
  const show = outcome.status === 'untrusted' || outcome.status === 'noTarget' ? vscode.window.showInformationMessage : vscode.window.showWarningMessage;
  void show(`Metric Triage: ${outcome.message}`);
  return outcome;
}
