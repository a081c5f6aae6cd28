import assert from 'node:assert/strict';
import * as vscode from 'vscode';
import { CLASSES } from '../../../extension/core/model/types';
import type { Finding } from '../../../extension/core/report/types';
import type { InsertOutcome } from '../../../extension/host/postmortemWriter';
import { countOccurrences, EXTENSION_ID, FINDING_START_MARK, getFixtureUris } from './fixturePaths';

const COMMAND_IDS = ['metricTriage.classifyExport', 'metricTriage.openViewer', 'metricTriage.insertFindings', 'metricTriage.labelWindow'];

async function readDisk(uri: vscode.Uri): Promise<string> {
  return new TextDecoder().decode(await vscode.workspace.fs.readFile(uri));
}

describe('Metric Triage in a real editor (trusted workspace)', () => {
  const { exportUri, postmortemUri } = getFixtureUris();
  let finding: Finding | undefined;
  let original = '';

  before(async () => {
    original = await readDisk(postmortemUri);
  });

  it('activates and registers its commands', async () => {
    const extension = vscode.extensions.getExtension(EXTENSION_ID);
    assert.ok(extension, `expected extension ${EXTENSION_ID} to be loaded`);
    await extension.activate();
    assert.equal(extension.isActive, true);
    const commands = await vscode.commands.getCommands(true);
    for (const id of COMMAND_IDS) assert.ok(commands.includes(id), `command ${id} registered`);
    assert.ok(vscode.workspace.isTrusted);
  });

  it('classifies the fixture export and opens it in the metric viewer', async () => {
    finding = await vscode.commands.executeCommand<Finding | undefined>('metricTriage.classifyExport', exportUri);
    assert.ok(finding, 'expected a finding');
    const names = [...CLASSES] as string[];
    assert.ok(names.includes(finding.verdict.className) || finding.verdict.libraryMatch, `class ${finding.verdict.className}`);
    assert.ok(finding.verdict.probability >= 0 && finding.verdict.probability <= 1);
    // Kolmogorov's axioms: calibrated class probabilities sum to 1.
    const total = Object.values(finding.verdict.probabilities).reduce((a, b) => a + b, 0);
    assert.ok(Math.abs(total - 1) < 1e-3, `probabilities sum to ${total}`);
    assert.equal(finding.provenance.exportFile.endsWith('basket-api-cpu-incident.csv'), true);
    assert.ok(finding.metrics.length >= 1 && finding.metrics.length <= 8, `${finding.metrics.length} metrics`);
    // The fixture injects the fault at 13:00Z–13:45Z (minutes 240–285): the suggested incident must overlap it.
    const faultStart = Date.UTC(2026, 0, 14, 13, 0);
    const faultEnd = Date.UTC(2026, 0, 14, 13, 45);
    assert.ok(finding.incident.startMs <= faultEnd && finding.incident.endMs >= faultStart,
      `incident ${new Date(finding.incident.startMs).toISOString()}–${new Date(finding.incident.endMs).toISOString()}`);
    const tab = vscode.window.tabGroups.activeTabGroup.activeTab;
    assert.ok(tab?.input instanceof vscode.TabInputCustom && tab.input.viewType === 'metricTriage.metricsEditor', 'viewer tab is active');
  });

  it('inserts the finding at the cursor as one edit, with the exact expected text', async () => {
    const doc = await vscode.workspace.openTextDocument(postmortemUri);
    const editor = await vscode.window.showTextDocument(doc);
    const at = original.indexOf('## Timeline');
    editor.selection = new vscode.Selection(doc.positionAt(at), doc.positionAt(at));
    const outcome = await vscode.commands.executeCommand<InsertOutcome>('metricTriage.insertFindings', { target: postmortemUri });
    assert.equal(outcome.status, 'inserted', JSON.stringify(outcome));
    if (outcome.status !== 'inserted') return;
    assert.ok(outcome.block.startsWith(FINDING_START_MARK) && outcome.block.endsWith('\n'));
    assert.match(outcome.block, /not a root cause/i);
    // The block sits on lines of its own between "## Supporting information" and "## Timeline",
    // followed by one blank line (CommonMark 0.31.2 §4.6: an HTML comment block ends at its line).
    assert.equal(doc.getText(), `${original.slice(0, at)}${outcome.block}\n${original.slice(at)}`);
    assert.equal(await readDisk(postmortemUri), original, 'the edit is in the editor buffer, not saved behind the user');
  });

  it('undo restores the postmortem in one step', async () => {
    const doc = await vscode.workspace.openTextDocument(postmortemUri);
    await vscode.window.showTextDocument(doc);
    await vscode.commands.executeCommand('undo');
    assert.equal(doc.getText(), original);
  });

  it('re-inserting the same finding replaces its block instead of duplicating it', async () => {
    const doc = await vscode.workspace.openTextDocument(postmortemUri);
    const editor = await vscode.window.showTextDocument(doc);
    editor.selection = new vscode.Selection(doc.positionAt(0), doc.positionAt(0));
    const first = await vscode.commands.executeCommand<InsertOutcome>('metricTriage.insertFindings', { target: postmortemUri });
    assert.equal(first.status, 'inserted');
    const afterFirst = doc.getText();
    const end = doc.positionAt(doc.getText().length);
    editor.selection = new vscode.Selection(end, end);
    const second = await vscode.commands.executeCommand<InsertOutcome>('metricTriage.insertFindings', { target: postmortemUri });
    assert.equal(second.status, 'replaced', JSON.stringify(second));
    assert.equal(countOccurrences(doc.getText(), FINDING_START_MARK), 1);
    assert.equal(doc.getText(), afterFirst);
  });

  it('writes the SVG chart beside the postmortem but never over a file it did not write', async () => {
    assert.ok(finding);
    const svgUri = vscode.Uri.joinPath(postmortemUri, '..', `2026-01-14-basket-checkout-slow-${finding.id}.svg`);
    const config = vscode.workspace.getConfiguration('metricTriage', postmortemUri);
    await config.update('chartStyle', 'svg', vscode.ConfigurationTarget.Workspace);
    try {
      const userText = '<svg xmlns="http://www.w3.org/2000/svg"><!-- drawn by a person --></svg>';
      await vscode.workspace.fs.writeFile(svgUri, new TextEncoder().encode(userText));
      const refused = await vscode.commands.executeCommand<InsertOutcome>('metricTriage.insertFindings', { target: postmortemUri });
      assert.equal(refused.status, 'replaced');
      assert.equal(await readDisk(svgUri), userText, 'the user file is left alone');
      if (refused.status === 'replaced') assert.ok(!refused.block.includes('.svg)'), 'no link to a chart that was not written');
      await vscode.workspace.fs.delete(svgUri);
      const written = await vscode.commands.executeCommand<InsertOutcome>('metricTriage.insertFindings', { target: postmortemUri });
      assert.equal(written.status, 'replaced');
      const svg = await readDisk(svgUri);
      assert.ok(svg.startsWith('<svg xmlns="http://www.w3.org/2000/svg"') && svg.includes('written by Metric Triage'));
      if (written.status === 'replaced') assert.ok(written.block.includes(`](./${svgUri.path.split('/').pop()})`), 'block links the chart');
    } finally {
      await config.update('chartStyle', undefined, vscode.ConfigurationTarget.Workspace);
      await vscode.commands.executeCommand('workbench.action.revertAndCloseActiveEditor');
    }
  });
});
