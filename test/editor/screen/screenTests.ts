/**
 * Screen tests: a person's path through the packaged extension in code-server, driven from
 * headless chromium. Each step leaves a PNG in the artifacts folder. Assertions use what the
 * person sees (text on screen, the editor's content), not internal state.
 */
import assert from 'node:assert/strict';
import { existsSync, mkdirSync, writeFileSync } from 'node:fs';
import { loadavg } from 'node:os';
import { join } from 'node:path';
import type { FrameLocator, Page } from 'playwright-core';
import { renderIncidentExport } from '../fixtures/writeExport';

export interface ScreenTestInput {
  readonly page: Page;
  readonly baseUrl: string;
  readonly workspace: string;
  readonly artifactsDir: string;
  readonly largeExportName: string;
  readonly log: (message: string) => void;
}

const EXPORT_NAME = 'basket-api-cpu-incident.csv';
const POSTMORTEM_NAME = '2026-01-14-basket-checkout-slow.md';
/** The same kind of fault three weeks later (another hour, other noise), written at test time. */
const SIMILAR_EXPORT_NAME = 'basket-api-cpu-incident-2026-02-03.csv';
const LIBRARY_LABEL = 'basket_cpu_starvation';

async function waitForFile(file: string, timeoutMs: number): Promise<void> {
  const until = Date.now() + timeoutMs;
  while (!existsSync(file)) {
    if (Date.now() > until) throw new Error(`expected ${file} to be written within ${timeoutMs} ms, got no file`);
    await new Promise((resolve) => setTimeout(resolve, 200));
  }
}

function webviewContent(page: Page): FrameLocator {
  return page.frameLocator('iframe.webview.ready').last().frameLocator('#active-frame');
}

async function runCommand(page: Page, title: string): Promise<void> {
  const input = page.locator('.quick-input-widget input.input');
  // A busy workbench can drop an F1 that arrives while focus moves (e.g. a webview closing):
  // press it again until the command box shows, up to about the default timeout in all.
  for (let attempt = 1; ; attempt++) {
    await page.keyboard.press('F1');
    const isShown = await input.waitFor({ state: 'visible', timeout: 10_000 }).then(() => true, () => false);
    if (isShown) break;
    if (attempt >= 4) throw new Error(`the command box did not open for "${title}" after ${attempt} presses of F1`);
  }
  await input.fill(`>${title}`);
  await page.locator('.quick-input-list .monaco-list-row', { hasText: title }).first().waitFor();
  await page.keyboard.press('Enter');
}

async function openInExplorerMenu(page: Page, fileName: string, menuItem: string): Promise<void> {
  const row = page.locator('.explorer-folders-view .monaco-list-row', { hasText: fileName });
  if (!(await row.isVisible())) await page.locator('.explorer-folders-view .monaco-list-row', { hasText: 'exports' }).click();
  await row.click({ button: 'right' });
  const item = page.locator('.monaco-menu .action-item', { hasText: menuItem }).first();
  await item.waitFor({ state: 'visible' });
  await item.hover();
  await item.click();
  // When the explorer re-renders under the open menu (a file just appeared), the click can land
  // while the item is only highlighted; the menu then stays open with that item focused.
  const menu = page.locator('.monaco-menu');
  const isClosed = await menu.waitFor({ state: 'hidden', timeout: 5_000 }).then(() => true, () => false);
  if (!isClosed) {
    await page.keyboard.press('Enter');
    await menu.waitFor({ state: 'hidden', timeout: 5_000 });
  }
}

/** Runs the steps in order; throws on the first failed expectation (after a screenshot). */
export async function runScreenTests(input: ScreenTestInput): Promise<{ readonly initToFirstPaintMs: number; readonly pageToFirstPaintMs: number }> {
  const { page, artifactsDir, log } = input;
  mkdirSync(artifactsDir, { recursive: true });
  const shot = (name: string): Promise<Buffer> => page.screenshot({ path: join(artifactsDir, `${name}.png`) });
  try {
    await page.goto(`${input.baseUrl}/?folder=${encodeURIComponent(input.workspace)}`);
    await page.locator('.monaco-workbench').waitFor({ timeout: 90_000 });
    await page.locator('.explorer-folders-view .monaco-list-row', { hasText: 'exports' }).waitFor({ timeout: 60_000 });
    log('workbench ready');

    await openInExplorerMenu(page, EXPORT_NAME, 'Classify Export');
    const view = webviewContent(page);
    const title = view.locator('#verdict-title');
    await title.waitFor({ timeout: 120_000 });
    const verdictText = (await title.textContent()) ?? '';
    assert.ok(verdictText.length > 0, 'verdict title shown');
    await view.locator('.verdict-caution', { hasText: 'not a root cause' }).waitFor();
    const panelCount = await view.locator('.contribution').count();
    assert.ok(panelCount >= 1, `expected contribution panels, got ${panelCount}`);
    await page.locator('.statusbar-item', { hasText: verdictText.split(' ')[0] }).first().waitFor({ timeout: 10_000 }).catch(() => log('status bar text not matched (verdict may be abstain)'));
    await shot('01-classified-from-explorer');
    log(`verdict "${verdictText}", ${panelCount} contribution panels`);

    const canvas = view.locator('.overview-canvas');
    const box = await canvas.boundingBox();
    assert.ok(box, 'window bar visible');
    const left = Number(await canvas.getAttribute('data-incident-left-px'));
    const right = Number(await canvas.getAttribute('data-incident-right-px'));
    const statusBefore = await view.locator('.overview-status').textContent();
    const grabX = box.x + (left + right) / 2;
    const y = box.y + 12;
    await page.mouse.move(grabX, y);
    await page.mouse.down();
    for (let step = 1; step <= 10; step++) await page.mouse.move(grabX - step * 6, y);
    await page.mouse.up();
    await view.locator('body[data-update-count="1"]').waitFor({ timeout: 120_000 });
    const statusAfter = await view.locator('.overview-status').textContent();
    assert.notEqual(statusAfter, statusBefore, 'window moved');
    await view.locator('#verdict-title').waitFor();
    await shot('02-window-dragged-reclassified');
    log(`after drag: ${statusAfter}`);

    await view.locator('#insert-findings').click();
    await page.keyboard.press('Control+P');
    const quickOpen = page.locator('.quick-input-widget input.input');
    await quickOpen.waitFor({ state: 'visible' });
    await quickOpen.fill(POSTMORTEM_NAME);
    await page.locator('.quick-input-list .monaco-list-row', { hasText: POSTMORTEM_NAME }).first().waitFor({ timeout: 20_000 });
    await page.keyboard.press('Enter');
    await page.locator('.monaco-editor .view-lines', { hasText: 'Metric evidence' }).waitFor({ timeout: 30_000 });
    await shot('03-findings-in-postmortem');
    log('findings block visible in the postmortem');
    // Auto-save is off (as on the desktop): save by hand and wait until the tab is clean.
    await page.locator('.monaco-editor .view-lines', { hasText: 'Metric evidence' }).click();
    await page.keyboard.press('Control+S');
    await page.locator('.tabs-container .tab.active.dirty').waitFor({ state: 'detached', timeout: 20_000 });
    await runCommand(page, 'View: Close All Editors');

    // Incident library: classify afresh (the suggested window), label it from the command palette
    // as a person would (quick pick → new label → name), then classify a similar export.
    await openInExplorerMenu(page, EXPORT_NAME, 'Classify Export');
    await webviewContent(page).locator('#verdict-title').waitFor({ timeout: 120_000 });
    await runCommand(page, 'Label Window for the Incident Library');
    const newLabelRow = page.locator('.quick-input-list .monaco-list-row', { hasText: 'New label' }).first();
    await newLabelRow.waitFor({ timeout: 20_000 });
    // Under load the quick pick can render before it takes keyboard focus, so an Enter may be lost:
    // choose the row by clicking it, and again while the name prompt has not appeared.
    const namePrompt = page.locator('.quick-input-widget', { hasText: 'Name of this kind of incident' });
    for (let attempt = 1; ; attempt++) {
      if (await newLabelRow.isVisible()) await newLabelRow.click().catch(() => undefined);
      const isShown = await namePrompt.waitFor({ timeout: 7_000 }).then(() => true, () => false);
      if (isShown) break;
      if (attempt >= 3) throw new Error('the "New label" choice did not open the name prompt after 3 clicks');
    }
    await page.locator('.quick-input-widget input.input').fill(LIBRARY_LABEL);
    await page.keyboard.press('Enter');
    await waitForFile(join(input.workspace, '.metric-triage', 'incident-library.json'), 60_000);
    await page.locator('.notifications-toasts', { hasText: `Saved this window as "${LIBRARY_LABEL}"` }).waitFor({ timeout: 20_000 })
      .catch(() => log('label saved; its notification was not seen'));
    await shot('04-window-labelled-for-library');
    log(`window labelled "${LIBRARY_LABEL}"`);
    await runCommand(page, 'View: Close All Editors');

    writeFileSync(join(input.workspace, 'exports', SIMILAR_EXPORT_NAME),
      renderIncidentExport({ seed: 20260203, startMs: Date.UTC(2026, 1, 3, 6, 0, 0), faultStartMinute: 150 }));
    await page.locator('.explorer-folders-view .monaco-list-row', { hasText: SIMILAR_EXPORT_NAME }).waitFor({ timeout: 30_000 });
    await openInExplorerMenu(page, SIMILAR_EXPORT_NAME, 'Classify Export');
    const similarView = webviewContent(page);
    await similarView.locator('.verdict-library-nearest li', { hasText: LIBRARY_LABEL }).waitFor({ timeout: 120_000 });
    const nearestText = (await similarView.locator('.verdict-library-nearest li').first().textContent()) ?? '';
    assert.match(nearestText, new RegExp(`^${LIBRARY_LABEL} — similarity \\d`), 'the nearest past incident is the labelled one');
    const matchLine = similarView.locator('.verdict-library-match');
    const matchText = (await matchLine.count()) > 0 ? (await matchLine.textContent()) ?? '' : '';
    if (matchText) {
      assert.equal(matchText, `Matches your past incident ${LIBRARY_LABEL} (1 example)`);
      const movedText = (await similarView.locator('.verdict-library-moved').textContent()) ?? '';
      assert.match(movedText, /^Moved alike here and in those incidents: .*cpu.* ↑/i, 'the metrics that moved alike are shown under the match');
    }
    await similarView.locator('.verdict-caution', { hasText: 'not a root cause' }).waitFor();
    await shot('05-similar-export-library-match');
    log(`similar export: nearest "${nearestText}"${matchText ? `; "${matchText}"` : ''}`);
    // The nearest incident is a link: with no postmortem recorded it opens the labelled export.
    const link = similarView.locator('.verdict-library-nearest .library-link').first();
    assert.match((await link.textContent()) ?? '', new RegExp(`export ${EXPORT_NAME.replace('.', '\\.')}`));
    await link.click();
    await page.locator('.tabs-container .tab', { hasText: EXPORT_NAME }).waitFor({ timeout: 60_000 });
    log('nearest incident link opened the labelled export');
    await runCommand(page, 'View: Close All Editors');

    await openInExplorerMenu(page, input.largeExportName, 'Open Metric Viewer');
    const body = webviewContent(page).locator('body[data-first-paint-ms]');
    await body.waitFor({ timeout: 300_000 });
    const initToFirstPaintMs = Number(await body.getAttribute('data-first-paint-ms'));
    const pageToFirstPaintMs = Number(await body.getAttribute('data-page-to-first-paint-ms'));
    await shot('06-large-export-first-paint');
    log(`100×10,000 export: first paint ${initToFirstPaintMs} ms after init, ${pageToFirstPaintMs} ms after page start`);
    writeFileSync(join(artifactsDir, 'editor-first-paint.json'), JSON.stringify({
      initToFirstPaintMs, pageToFirstPaintMs, seriesCount: 100, pointCount: 10_000, measuredAt: new Date().toISOString(),
      // The machine is shared: the 1-minute load average says how busy it was during the measurement.
      loadAverage1m: loadavg()[0],
    }, null, 2));
    return { initToFirstPaintMs, pageToFirstPaintMs };
  } catch (error) {
    await shot('failure').catch(() => undefined);
    throw error;
  }
}
