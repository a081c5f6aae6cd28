/**
 * Screen tests: a person's path through the packaged extension in code-server, driven from
 * headless chromium. Each step leaves a PNG in the artifacts folder. Assertions use what the
 * person sees (text on screen, the editor's content), not internal state.
 */
import assert from 'node:assert/strict';
import { mkdirSync, writeFileSync } from 'node:fs';
import { loadavg } from 'node:os';
import { join } from 'node:path';
import type { FrameLocator, Page } from 'playwright-core';

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

function webviewContent(page: Page): FrameLocator {
  return page.frameLocator('iframe.webview.ready').last().frameLocator('#active-frame');
}

async function runCommand(page: Page, title: string): Promise<void> {
  await page.keyboard.press('F1');
  const input = page.locator('.quick-input-widget input.input');
  await input.waitFor({ state: 'visible' });
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
  await item.click();
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
    await page.keyboard.press('Control+S');
    await runCommand(page, 'View: Close All Editors');

    await openInExplorerMenu(page, input.largeExportName, 'Open Metric Viewer');
    const body = webviewContent(page).locator('body[data-first-paint-ms]');
    await body.waitFor({ timeout: 300_000 });
    const initToFirstPaintMs = Number(await body.getAttribute('data-first-paint-ms'));
    const pageToFirstPaintMs = Number(await body.getAttribute('data-page-to-first-paint-ms'));
    await shot('04-large-export-first-paint');
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
