import assert from 'node:assert/strict';
import { createHash } from 'node:crypto';
import * as vscode from 'vscode';
import { parseLibraryText } from '../../../extension/core/model/libraryDocument';
import { applyLibraryChange, serializeLibrary } from '../../../extension/core/model/librarySerialize';
import type { ViewerLibrarySnapshot } from '../../../extension/host/metricsViewer';
import type { OpenEntryOutcome } from '../../../extension/host/viewerLibrary';
import type { LibraryEntry } from '../../../extension/core/model/libraryTypes';
import type { Finding } from '../../../extension/core/report/types';
import type { InsertOutcome } from '../../../extension/host/postmortemWriter';
import { renderIncidentExport } from '../fixtures/writeExport';
import { getFixtureUris } from './fixturePaths';

/** The team's own name for the fixture's fault (not a built-in class), as a person would type it. */
const LABEL = 'basket_cpu_starvation';
const SIMILAR_EXPORT = 'basket-api-cpu-incident-2026-02-03.csv';
/** A second label, given while the viewer of the similar export stays open. */
const SECOND_LABEL = 'basket_cpu_starvation_recurring';
const SECOND_POSTMORTEM = 'postmortems/2026-02-03-basket-cpu-again.md';
/** Internal commands (hidden from the palette): the viewers' last header, and the header's link action. */
const DESCRIBE_VIEWERS = '_metricTriage.describeViewerLibraries';
const OPEN_ENTRY = '_metricTriage.openLibraryEntry';

/**
 * Wait until `read` gives a value `isDone` accepts; polls, since the viewer refresh is an event in
 * the extension, not something a test can await. Fails with the last value seen.
 */
async function waitFor<T>(read: () => Thenable<T> | Promise<T>, isDone: (value: T) => boolean, what: string, timeoutMs = 60_000): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  let last: T = await read();
  while (!isDone(last)) {
    if (Date.now() > deadline) throw new Error(`timed out after ${timeoutMs} ms waiting for ${what}; last seen ${JSON.stringify(last)}`);
    await new Promise((resolve) => setTimeout(resolve, 100));
    last = await read();
  }
  return last;
}

async function readViewer(exportUri: vscode.Uri): Promise<ViewerLibrarySnapshot | undefined> {
  const all = await vscode.commands.executeCommand<ViewerLibrarySnapshot[]>(DESCRIBE_VIEWERS);
  return all.find((v) => v.exportUri === exportUri.toString());
}

async function readDisk(uri: vscode.Uri): Promise<Uint8Array> {
  return vscode.workspace.fs.readFile(uri);
}

async function exists(uri: vscode.Uri): Promise<boolean> {
  try { await vscode.workspace.fs.stat(uri); return true; } catch { return false; }
}

describe('Incident library in a real editor (trusted workspace)', () => {
  const { folder, exportUri, postmortemUri } = getFixtureUris();
  const libraryDir = vscode.Uri.joinPath(folder, '.metric-triage');
  const libraryUri = vscode.Uri.joinPath(libraryDir, 'incident-library.json');
  const similarUri = vscode.Uri.joinPath(folder, 'exports', SIMILAR_EXPORT);
  let labelled: Finding | undefined;

  before(async () => {
    assert.equal(await exists(libraryUri), false, 'the fixture workspace starts without a library');
  });

  after(async () => {
    // Leave the workspace as the other suites expect it: no library, no extra export.
    await vscode.workspace.fs.delete(libraryDir, { recursive: true, useTrash: false }).then(undefined, () => undefined);
    await vscode.workspace.fs.delete(similarUri, { useTrash: false }).then(undefined, () => undefined);
    await vscode.workspace.fs.delete(vscode.Uri.joinPath(folder, SECOND_POSTMORTEM), { useTrash: false }).then(undefined, () => undefined);
    await vscode.commands.executeCommand('workbench.action.closeAllEditors');
  });

  it('labels the classified window and writes one valid entry to the workspace library file', async () => {
    labelled = await vscode.commands.executeCommand<Finding | undefined>('metricTriage.classifyExport', exportUri);
    assert.ok(labelled, 'expected a finding for the fixture export');
    // The postmortem open beside the viewer is the one the entry links to.
    await vscode.window.showTextDocument(postmortemUri, { viewColumn: vscode.ViewColumn.Beside, preserveFocus: true, preview: false });
    const entry = await vscode.commands.executeCommand<LibraryEntry | undefined>('metricTriage.labelWindow', { label: LABEL });
    assert.ok(entry, 'expected the label command to return the saved entry (an error would have been shown instead)');

    const text = new TextDecoder().decode(await readDisk(libraryUri));
    const parsed = parseLibraryText(text, libraryUri.fsPath);
    assert.deepEqual(parsed.issues, [], 'the written file validates');
    assert.ok(parsed.document);
    const raw = JSON.parse(text) as { schemaVersion: unknown; entries: unknown[] }; // RFC 8259 JSON
    assert.equal(raw.schemaVersion, 1);
    assert.equal(raw.entries.length, 1);
    const [stored] = parsed.document.entries;
    assert.equal(stored.label, LABEL);
    assert.equal(stored.isBuiltInClass, false);
    assert.equal(stored.id, entry.id);
    assert.deepEqual(stored.window, { startMs: labelled.incident.startMs, endMs: labelled.incident.endMs }, 'the window the viewer showed');
    // sha256 of the export bytes, computed here with OpenSSL's SHA-256 (FIPS 180-4) through node:crypto.
    assert.equal(stored.exportSha256, createHash('sha256').update(await readDisk(exportUri)).digest('hex'));
    assert.equal(stored.postmortem, 'postmortems/2026-01-14-basket-checkout-slow.md');
    assert.ok(stored.modelVersion.startsWith(`${labelled.provenance.modelVersion}+${labelled.provenance.modelSha256.slice(0, 12)}`),
      `entry model version ${stored.modelVersion} is the one classifications match against`);
    assert.ok(stored.metrics.length >= 1 && stored.embedding.every(Number.isFinite));
  });

  it('finds the labelled incident when a similar export is classified', async () => {
    assert.ok(labelled, 'needs the labelled window of the previous test');
    // Same kind of fault (basket-api CPU saturation) three weeks later, at another hour, other noise.
    const csv = renderIncidentExport({ seed: 20260203, startMs: Date.UTC(2026, 1, 3, 6, 0, 0), faultStartMinute: 150 });
    await vscode.workspace.fs.writeFile(similarUri, new TextEncoder().encode(csv));
    const finding = await vscode.commands.executeCommand<Finding | undefined>('metricTriage.classifyExport', similarUri);
    assert.ok(finding, 'expected a finding for the similar export');
    assert.equal(finding.provenance.exportFile, SIMILAR_EXPORT);
    const faultStart = Date.UTC(2026, 1, 3, 8, 30);
    const faultEnd = Date.UTC(2026, 1, 3, 9, 15);
    assert.ok(finding.incident.startMs <= faultEnd && finding.incident.endMs >= faultStart, 'the suggested window overlaps the injected fault');
    const nearest = finding.nearestIncidents ?? [];
    assert.ok(nearest.length >= 1, `expected the library's entry among the nearest incidents, got ${JSON.stringify(finding.nearestIncidents)}`);
    const match = nearest.find((n) => n.label === LABEL);
    assert.ok(match, `expected ${LABEL} among ${nearest.map((n) => n.label).join(', ')}`);
    assert.equal(match.postmortem, 'postmortems/2026-01-14-basket-checkout-slow.md');
    // Cosine similarity lies in [-1, 1] (Cauchy–Schwarz); the same fault shape should sit close.
    assert.ok(match.similarity <= 1 + 1e-9 && match.similarity >= 0.8, `cosine similarity ${match.similarity}`);
    console.log(`[editor-suite]     nearest ${match.label} similarity ${match.similarity.toFixed(3)}; verdict ${finding.verdict.className} ${finding.verdict.probability.toFixed(2)}${finding.verdict.libraryMatch ? ' (library match)' : ''}`);
    if (finding.verdict.libraryMatch) {
      const { movedAlike, ...match } = finding.verdict.libraryMatch;
      assert.deepEqual(match, { label: LABEL, exampleCount: 1 });
      assert.equal(finding.verdict.className, LABEL);
      // A CPU saturation of basket-api both times: the CPU is among the metrics that moved alike.
      assert.ok(movedAlike?.some((m) => /cpu/i.test(m.id) && m.direction === 'up'), `expected a CPU metric moved up alike, got ${JSON.stringify(movedAlike)}`);
    }
    // The findings block lists the past incident with its postmortem link, under the caution line.
    const doc = await vscode.workspace.openTextDocument(postmortemUri);
    await vscode.window.showTextDocument(doc);
    const outcome = await vscode.commands.executeCommand<InsertOutcome>('metricTriage.insertFindings', { target: postmortemUri });
    try {
      assert.ok(outcome.status === 'inserted' || outcome.status === 'replaced', JSON.stringify(outcome));
      assert.ok(outcome.block.includes('#### Similar past incidents (incident library)'), 'nearest incidents section');
      assert.ok(outcome.block.includes(`- ${LABEL} — similarity `) && outcome.block.includes('[postmortem](postmortems/2026-01-14-basket-checkout-slow.md)'));
      assert.match(outcome.block, /not a root cause/i);
      if (finding.verdict.libraryMatch) {
        assert.ok(outcome.block.includes(`matches your past incident **${LABEL}** (1 example)`));
        assert.match(outcome.block, /Moved alike here and in those incidents \(check them\):.*`[^`]*cpu[^`]*` ↑/i);
      }
    } finally {
      await vscode.window.showTextDocument(doc);
      await vscode.commands.executeCommand('workbench.action.revertAndCloseActiveEditor');
    }
  });

  it('refreshes the open viewer when the library changes, and its link opens the postmortem', async () => {
    // The similar export's viewer is open from the previous test; its header links the first entry.
    await vscode.commands.executeCommand('vscode.openWith', similarUri, 'metricTriage.metricsEditor', { preview: false });
    const before = await waitFor(() => readViewer(similarUri), (v) => (v?.library?.nearest ?? []).some((n) => n.label === LABEL && n.entryId),
      `the viewer of ${SIMILAR_EXPORT} to link ${LABEL}`);
    assert.ok(before);
    const first = before.library?.nearest.find((n) => n.label === LABEL);
    assert.deepEqual([first?.opensKind, first?.opensPath], ['postmortem', 'postmortems/2026-01-14-basket-checkout-slow.md']);

    // Label the same window again with a new postmortem open beside it, through the command.
    const secondUri = vscode.Uri.joinPath(folder, SECOND_POSTMORTEM);
    await vscode.workspace.fs.writeFile(secondUri, new TextEncoder().encode('# Basket checkout slow again (Larkspur Provisions)\n\n## Supporting information\n'));
    await vscode.window.showTextDocument(secondUri, { viewColumn: vscode.ViewColumn.Beside, preserveFocus: true, preview: false });
    const entry = await vscode.commands.executeCommand<LibraryEntry | undefined>('metricTriage.labelWindow', { label: SECOND_LABEL });
    assert.ok(entry, 'expected the second entry to be saved');
    assert.equal(entry.postmortem, SECOND_POSTMORTEM);
    const refreshed = await waitFor(() => readViewer(similarUri), (v) => (v?.library?.nearest ?? []).some((n) => n.entryId === entry.id),
      `the open viewer to list ${SECOND_LABEL}`);
    assert.ok(refreshed && refreshed.libraryUpdateCount > before.libraryUpdateCount, 'a library refresh of the same viewer, not a reopened one');
    const linked = refreshed.library?.nearest.find((n) => n.entryId === entry.id);
    assert.deepEqual([linked?.label, linked?.opensKind, linked?.opensPath], [SECOND_LABEL, 'postmortem', SECOND_POSTMORTEM]);

    // The link opens that postmortem in an editor.
    await vscode.commands.executeCommand('workbench.action.closeEditorsInOtherGroups');
    const opened = await vscode.commands.executeCommand<OpenEntryOutcome>(OPEN_ENTRY, { entryId: entry.id, exportUri: similarUri });
    assert.equal(opened?.status, 'opened', JSON.stringify(opened));
    assert.equal(vscode.window.activeTextEditor?.document.uri.toString(), secondUri.toString());
    // An id the library does not hold is ignored (logged), never an error.
    const unknown = await vscode.commands.executeCommand<OpenEntryOutcome>(OPEN_ENTRY, { entryId: '20990101T000000Z-ffffff', exportUri: similarUri });
    assert.equal(unknown?.status, 'unknown');

    // Another window removes the entry by editing the file: the watcher refreshes the viewer too.
    const current = parseLibraryText(new TextDecoder().decode(await readDisk(libraryUri)), libraryUri.fsPath).document;
    assert.ok(current);
    await vscode.workspace.fs.writeFile(libraryUri, new TextEncoder().encode(serializeLibrary(applyLibraryChange(current, { removeIds: [entry.id] }))));
    const afterRemoval = await waitFor(() => readViewer(similarUri), (v) => !(v?.library?.nearest ?? []).some((n) => n.entryId === entry.id),
      `the open viewer to drop ${SECOND_LABEL} after the file changed on disk`);
    assert.ok(afterRemoval && afterRemoval.libraryUpdateCount > refreshed.libraryUpdateCount);
    console.log(`[editor-suite]     viewer refreshes: ${afterRemoval.libraryUpdateCount}; nearest now ${afterRemoval.library?.nearest.map((n) => n.label).join(', ')}`);
  });
});
