/**
 * Incident-library commands: label the current window, list/rename/delete entries, re-embed after
 * a model change. Thin glue: the maths is in core/model (prototypes, libraryEntry), the file
 * handling in node/libraryStore.
 */
import { randomBytes } from 'node:crypto';
import * as vscode from 'vscode';
import { CLASSES } from '../core/model/types';
import { checkLibraryLabel } from '../core/model/libraryDocument';
import {
  createLibraryEntry, findStaleEntries, formatEntryId, formatLibraryModelVersion, isBuiltInClassLabel, reembedLibrary,
  type EmbedMetricWindows, type LibraryMetricInput,
} from '../core/model/libraryEntry';
import { applyLibraryChange } from '../core/model/librarySerialize';
import { createLibraryEmbedder } from '../core/model/libraryEmbed';
import type { LoadedClassifier } from '../runtime/onnxRunner';
import type { LibraryDocument, LibraryEntry, LibraryTimeSpan } from '../core/model/libraryTypes';
import { LibraryFileError, readLibraryFile, updateLibraryFile } from '../node/libraryStore';
import { countExamples } from '../core/report/libraryWording';

/** The window the user is looking at in the metrics editor, as the editor knows it. */
export interface ActiveLibraryWindow {
  readonly exportFile: string;
  readonly exportSha256: string;
  readonly window: LibraryTimeSpan;
  readonly baseline: LibraryTimeSpan;
  /** Every metric cut to the baseline and window (full resolution; the entry downsamples). */
  readonly metrics: readonly LibraryMetricInput[];
  /** The classifier's embedding of this window, when the editor already has it. */
  readonly embedding?: ArrayLike<number>;
  /** Postmortem document linked to this export, if the user has one open. */
  readonly postmortem?: string;
}

/** What the commands need from the rest of the extension (wired in extension.ts). */
export interface LibraryCommandDeps {
  /** Absolute library path for the current workspace; undefined when no folder is open. */
  readonly resolveLibraryPath: () => string | undefined;
  /** The active metrics editor's window, or undefined when none is open. */
  readonly getActiveWindow: () => Promise<ActiveLibraryWindow | undefined>;
  /** The bundled model's version and its embedding function (loads the model lazily). */
  readonly loadModel: () => Promise<{ readonly modelVersion: string; readonly embed: EmbedMetricWindows }>;
  /** Told after each saved change, so open editors can re-blend their verdicts. */
  readonly onLibraryChanged?: (document: LibraryDocument) => void;
  /**
   * Opens an entry's postmortem (else its export) after checking the path stays in the workspace;
   * the viewer's links use the same. Without it "Open postmortem" opens the recorded path as is.
   */
  readonly openEntry?: (entryId: string) => Promise<unknown>;
}

/**
 * deps.loadModel from the extension's shared, already loaded model: the version recorded in
 * entries (spec version + ONNX sha256) and the embedding path used for re-embedding.
 */
export function toLibraryModel(model: LoadedClassifier): { readonly modelVersion: string; readonly embed: EmbedMetricWindows } {
  return { modelVersion: formatLibraryModelVersion(model.spec.version, model.sha256), embed: createLibraryEmbedder(model.runner, model.spec.windowSpec) };
}

/** Command ids, `<ext>.<verb><Noun>`. */
export const LIBRARY_COMMANDS = {
  labelWindow: 'metricTriage.labelWindow',
  manageLibrary: 'metricTriage.manageLibrary',
  renameLibraryEntry: 'metricTriage.renameLibraryEntry',
  deleteLibraryEntry: 'metricTriage.deleteLibraryEntry',
  reembedLibrary: 'metricTriage.reembedLibrary',
} as const;

const NEW_LABEL = '$(add) New label…';

/** Register the library commands; dispose the result to unregister them all. */
export function registerLibraryCommands(context: vscode.ExtensionContext, deps: LibraryCommandDeps): vscode.Disposable {
  const guarded = (id: string, run: (...args: unknown[]) => Promise<unknown>): vscode.Disposable =>
    vscode.commands.registerCommand(id, async (...args: unknown[]) => {
      try { return await run(...args); } catch (error) { void reportError(error); return undefined; }
    });
  const disposable = vscode.Disposable.from(
    guarded(LIBRARY_COMMANDS.labelWindow, (arg) => labelWindow(deps, readLabelArgument(arg))),
    guarded(LIBRARY_COMMANDS.manageLibrary, () => manageLibrary(deps)),
    guarded(LIBRARY_COMMANDS.renameLibraryEntry, (id) => renameEntry(deps, typeof id === 'string' ? id : undefined)),
    guarded(LIBRARY_COMMANDS.deleteLibraryEntry, (id) => deleteEntry(deps, typeof id === 'string' ? id : undefined)),
    guarded(LIBRARY_COMMANDS.reembedLibrary, () => reembedAll(deps)),
  );
  context.subscriptions.push(disposable);
  return disposable;
}

/**
 * The label of a programmatic call: `executeCommand(id, 'label')` or `executeCommand(id, { label })`.
 * People get the quick pick instead (menus pass the resource URI, which is not a label).
 */
function readLabelArgument(arg: unknown): string | undefined {
  if (typeof arg === 'string') return arg;
  if (typeof arg === 'object' && arg !== null && 'label' in arg && typeof arg.label === 'string') return arg.label;
  return undefined;
}

/**
 * False (after telling the user) in an untrusted workspace: the library is a shared file in the
 * repository, and restricted mode reads and shows but writes nothing.
 */
function checkWriteAllowed(): boolean {
  if (vscode.workspace.isTrusted) return true;
  void vscode.window.showWarningMessage('Incident library: this workspace is in restricted mode, so the library is not changed. Trust the workspace to label windows.');
  return false;
}

function requireLibraryPath(deps: LibraryCommandDeps): string {
  const file = deps.resolveLibraryPath();
  if (file === undefined) throw new Error('The incident library lives in the workspace: open a folder first.');
  return file;
}

/** Ask for a label: built-in classes, the team's labels so far, or a new name. */
async function pickLabel(document: LibraryDocument, placeHolder: string): Promise<string | undefined> {
  const own = [...new Set(document.entries.filter((e) => !e.isBuiltInClass).map((e) => e.label))].sort();
  const items: vscode.QuickPickItem[] = [
    { label: NEW_LABEL, alwaysShow: true },
    ...own.map((label) => ({ label, description: 'your label' })),
    ...CLASSES.map((label) => ({ label, description: 'built-in class' })),
  ];
  const picked = await vscode.window.showQuickPick(items, { placeHolder, ignoreFocusOut: true });
  if (picked === undefined) return undefined;
  if (picked.label !== NEW_LABEL) return picked.label;
  return vscode.window.showInputBox({
    prompt: 'Name of this kind of incident (lowercase, e.g. connection_pool_exhaustion)',
    ignoreFocusOut: true,
    validateInput: (value) => checkLibraryLabel(value.trim()),
  }).then((value) => value?.trim());
}

async function labelWindow(deps: LibraryCommandDeps, givenLabel: string | undefined): Promise<LibraryEntry | undefined> {
  if (!checkWriteAllowed()) return undefined;
  const file = requireLibraryPath(deps);
  const active = await deps.getActiveWindow();
  if (active === undefined) { void vscode.window.showWarningMessage('Open a metric export in Metric Triage and select the incident window first.'); return undefined; }
  const current = await readLibraryFile(file);
  const label = givenLabel ?? await pickLabel(current, 'What kind of incident was this window?');
  if (label === undefined) return undefined;
  const labelError = checkLibraryLabel(label);
  if (labelError !== undefined) throw new Error(`label: ${labelError}`);
  const model = await deps.loadModel();
  const nowMs = Date.now();
  // Prefer the editor's embedding: it is what the verdict was computed from (full resolution).
  const embedding = active.embedding ?? await model.embed(active.metrics.map((m) => ({
    id: m.id, name: m.name, family: m.family, baseline: Float64Array.from(m.baseline), window: Float64Array.from(m.window),
  })));
  const entry = createLibraryEntry({
    ...active, id: formatEntryId(nowMs, randomBytes(3).toString('hex')), label, createdMs: nowMs, modelVersion: model.modelVersion, embedding,
  });
  const saved = await updateLibraryFile(file, (doc) => applyLibraryChange(doc, { upsert: [entry] }));
  deps.onLibraryChanged?.(saved);
  const count = saved.entries.filter((e) => e.label === label).length;
  void vscode.window.showInformationMessage(`Saved this window as "${label}" (${countExamples(count)} in the incident library).`);
  return entry;
}

async function pickEntry(deps: LibraryCommandDeps, placeHolder: string): Promise<LibraryEntry | undefined> {
  const { entries } = await readLibraryFile(requireLibraryPath(deps));
  if (entries.length === 0) { void vscode.window.showInformationMessage('The incident library is empty: label a window first.'); return undefined; }
  const picked = await vscode.window.showQuickPick(entries.map((e) => ({
    label: e.label, description: `${new Date(e.window.startMs).toISOString()} · ${e.exportFile}`,
    detail: `${e.id} · ${e.metrics.length} metrics · model ${e.modelVersion}${e.postmortem ? ` · ${e.postmortem}` : ''}`, entry: e,
  })), { placeHolder, matchOnDescription: true, matchOnDetail: true });
  return picked?.entry;
}

async function manageLibrary(deps: LibraryCommandDeps): Promise<void> {
  const entry = await pickEntry(deps, 'Incident library: pick an entry');
  if (entry === undefined) return;
  const openAction = entry.postmortem ? `Open postmortem ${entry.postmortem}` : `Open export ${entry.exportFile} (no postmortem recorded)`;
  const action = await vscode.window.showQuickPick(['Rename label', 'Delete entry', openAction], { placeHolder: `${entry.label} (${entry.id})` });
  if (action === 'Rename label') await renameEntry(deps, entry.id);
  else if (action === 'Delete entry') await deleteEntry(deps, entry.id);
  else if (action === openAction) {
    if (deps.openEntry) await deps.openEntry(entry.id);
    else if (entry.postmortem) await vscode.commands.executeCommand('vscode.open', toUri(entry.postmortem));
  }
}

async function renameEntry(deps: LibraryCommandDeps, id: string | undefined): Promise<void> {
  if (!checkWriteAllowed()) return;
  const file = requireLibraryPath(deps);
  const entry = id === undefined ? await pickEntry(deps, 'Rename which entry?') : (await readLibraryFile(file)).entries.find((e) => e.id === id);
  if (entry === undefined) return;
  const label = await pickLabel(await readLibraryFile(file), `New label for ${entry.id} (now ${entry.label})`);
  if (label === undefined || label === entry.label) return;
  const saved = await updateLibraryFile(file, (doc) => applyLibraryChange(doc, { relabel: [{ id: entry.id, label, isBuiltInClass: isBuiltInClassLabel(label) }] }));
  deps.onLibraryChanged?.(saved);
}

async function deleteEntry(deps: LibraryCommandDeps, id: string | undefined): Promise<void> {
  if (!checkWriteAllowed()) return;
  const file = requireLibraryPath(deps);
  const entry = id === undefined ? await pickEntry(deps, 'Delete which entry?') : (await readLibraryFile(file)).entries.find((e) => e.id === id);
  if (entry === undefined) return;
  const answer = await vscode.window.showWarningMessage(`Delete the "${entry.label}" example ${entry.id} from the shared incident library?`, { modal: true }, 'Delete');
  if (answer !== 'Delete') return;
  const saved = await updateLibraryFile(file, (doc) => applyLibraryChange(doc, { removeIds: [entry.id] }));
  deps.onLibraryChanged?.(saved);
}

async function reembedAll(deps: LibraryCommandDeps): Promise<number> {
  if (!checkWriteAllowed()) return 0;
  const file = requireLibraryPath(deps);
  const model = await deps.loadModel();
  const stale = findStaleEntries(await readLibraryFile(file), model.modelVersion);
  if (stale.length === 0) { void vscode.window.showInformationMessage(`All library entries already use model ${model.modelVersion}.`); return 0; }
  let count = 0;
  const saved = await vscode.window.withProgress({ location: vscode.ProgressLocation.Notification, title: `Re-embedding ${stale.length} library entries` }, () =>
    // Re-read and re-embed under the lock so entries added meanwhile are kept and embedded too.
    updateLibraryFile(file, async (doc) => {
      const result = await reembedLibrary(doc, model.modelVersion, model.embed);
      count = result.reembeddedIds.length;
      return result.document;
    }));
  deps.onLibraryChanged?.(saved);
  void vscode.window.showInformationMessage(`Re-embedded ${count} library entries with model ${model.modelVersion}.`);
  return count;
}

function toUri(link: string): vscode.Uri {
  if (/^[a-z][a-z0-9+.-]*:/i.test(link)) return vscode.Uri.parse(link);
  const folder = vscode.workspace.workspaceFolders?.[0]?.uri;
  return folder ? vscode.Uri.joinPath(folder, link) : vscode.Uri.file(link);
}

async function reportError(error: unknown): Promise<void> {
  const message = error instanceof LibraryFileError ? error.message : error instanceof Error ? error.message : String(error);
  await vscode.window.showErrorMessage(`Incident library: ${message}`);
}
