import assert from 'node:assert/strict';
import { createHash } from 'node:crypto';
import * as vscode from 'vscode';
import { parseLibraryText } from '../../../extension/core/model/libraryDocument';
import type { LibraryEntry } from '../../../extension/core/model/libraryTypes';
import type { Finding } from '../../../extension/core/report/types';
import type { InsertOutcome } from '../../../extension/host/postmortemWriter';
import { renderIncidentExport } from '../fixtures/writeExport';
import { getFixtureUris } from './fixturePaths';

/** The team's own name for the fixture's fault (not a built-in class), as a person would type it. */
const LABEL = 'basket_cpu_starvation';
const SIMILAR_EXPORT = 'basket-api-cpu-incident-2026-02-03.csv';

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
      assert.deepEqual(finding.verdict.libraryMatch, { label: LABEL, exampleCount: 1 });
      assert.equal(finding.verdict.className, LABEL);
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
      if (finding.verdict.libraryMatch) assert.ok(outcome.block.includes(`matches your past incident **${LABEL}** (1 example)`));
    } finally {
      await vscode.window.showTextDocument(doc);
      await vscode.commands.executeCommand('workbench.action.revertAndCloseActiveEditor');
    }
  });
});
