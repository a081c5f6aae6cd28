import assert from 'node:assert/strict';
import * as vscode from 'vscode';
import type { Finding } from '../../../extension/core/report/types';
import type { InsertOutcome } from '../../../extension/host/postmortemWriter';
import { EXTENSION_ID, getFixtureUris } from './fixturePaths';

async function listFiles(folder: vscode.Uri): Promise<string[]> {
  const out: string[] = [];
  for (const [name, type] of await vscode.workspace.fs.readDirectory(folder)) {
    const child = vscode.Uri.joinPath(folder, name);
    if (type === vscode.FileType.Directory) out.push(...(await listFiles(child)).map((n) => `${name}/${n}`));
    else out.push(name);
  }
  return out.sort();
}

describe('Metric Triage in a real editor (untrusted workspace)', () => {
  const { folder, exportUri, postmortemUri } = getFixtureUris();

  it('runs in restricted mode', async () => {
    assert.equal(vscode.workspace.isTrusted, false);
    const extension = vscode.extensions.getExtension(EXTENSION_ID);
    assert.ok(extension);
    await extension.activate();
    assert.equal(extension.isActive, true);
  });

  it('still reads and classifies, but writes nothing', async () => {
    const filesBefore = await listFiles(folder);
    const textBefore = new TextDecoder().decode(await vscode.workspace.fs.readFile(postmortemUri));
    const finding = await vscode.commands.executeCommand<Finding | undefined>('metricTriage.classifyExport', exportUri);
    assert.ok(finding, 'classification works in restricted mode');
    const doc = await vscode.workspace.openTextDocument(postmortemUri);
    await vscode.window.showTextDocument(doc);
    const outcome = await vscode.commands.executeCommand<InsertOutcome>('metricTriage.insertFindings', { target: postmortemUri });
    assert.equal(outcome.status, 'untrusted');
    assert.equal(doc.getText(), textBefore);
    assert.equal(doc.isDirty, false);
    assert.deepEqual(await listFiles(folder), filesBefore, 'no file created or removed');
    assert.equal(new TextDecoder().decode(await vscode.workspace.fs.readFile(postmortemUri)), textBefore);
  });

  it('refuses to label a window for the incident library: no library file is written', async () => {
    const filesBefore = await listFiles(folder);
    const finding = await vscode.commands.executeCommand<Finding | undefined>('metricTriage.classifyExport', exportUri);
    assert.ok(finding, 'a window to label exists');
    const entry = await vscode.commands.executeCommand<unknown>('metricTriage.labelWindow', { label: 'basket_cpu_starvation' });
    assert.equal(entry, undefined, 'no entry saved');
    const files = await listFiles(folder);
    assert.deepEqual(files, filesBefore, 'no file created or removed');
    assert.ok(!files.some((f) => f.startsWith('.metric-triage')), 'no .metric-triage folder');
  });
});
