/**
 * `npm run test:editor` (through testEditor.sh): the extension in a real VS Code.
 *  (a) mocha suites inside code-server's extension host, loaded from the development folder:
 *      a trusted workspace run and a restricted-mode (untrusted) run;
 *  (b) screen tests on the packaged .vsix, driven from headless chromium, with screenshots.
 * Exits non-zero when anything fails. `EDITOR_TESTS=host|screen` runs one part only.
 */
import { execFileSync } from 'node:child_process';
import { cpSync, existsSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { build } from 'esbuild';
import { renderLargeExport } from '../../test/editor/fixtures/writeExport';
import { runScreenTests } from '../../test/editor/screen/screenTests';
import { buildProfile, launchBrowser, REPO_DIR, runCodeServerCli, startCodeServer } from './codeServer';

const OUT_DIR = join(REPO_DIR, 'out', 'editor-tests');
const ARTIFACTS_DIR = join(REPO_DIR, 'test', 'artifacts');
const FIXTURE_WORKSPACE = join(REPO_DIR, 'test', 'editor', 'fixtures', 'workspace');
const t0 = Date.now();
const log = (message: string): void => { process.stdout.write(`[${((Date.now() - t0) / 1000).toFixed(1)}s] ${message}\n`); };

async function buildSuites(): Promise<void> {
  await build({
    entryPoints: { trustedIndex: 'test/editor/suite/trustedIndex.ts', untrustedIndex: 'test/editor/suite/untrustedIndex.ts' },
    outdir: OUT_DIR, bundle: true, platform: 'node', format: 'cjs', target: 'node20', sourcemap: 'inline',
    external: ['vscode', 'mocha', 'onnxruntime-node'], absWorkingDir: REPO_DIR, logLevel: 'warning',
  });
}

function copyWorkspace(): string {
  const dir = mkdtempSync(join(tmpdir(), 'triage-workspace-'));
  cpSync(FIXTURE_WORKSPACE, dir, { recursive: true });
  return dir;
}

/** Runs one extension-host suite; resolves to its exit code (0 = all passed). */
async function runHostSuite(name: string, suiteFile: string, isTrustEnabled: boolean): Promise<number> {
  const workspace = copyWorkspace();
  const server = await startCodeServer({ isTrustEnabled });
  const blocked: string[] = [];
  const context = await launchBrowser(server.root, blocked);
  try {
    const page = context.pages()[0] ?? await context.newPage();
    const exitCode = new Promise<number>((resolve) => { void page.exposeFunction('codeAutomationExit', (code: number) => resolve(code)); });
    // The extension host's console (mocha's reporter) reaches the page console; show it.
    page.on('console', (message) => {
      const text = message.text();
      const at = text.indexOf('[editor-suite] ');
      if (process.env.VERBOSE) process.stdout.write(`${text}\n`);
      else if (at >= 0) process.stdout.write(`  ${text.slice(at + 15)}\n`);
    });
    await page.exposeFunction('codeAutomationLog', (_type: string, args: unknown[]) => process.stdout.write(`${args.map(String).join(' ')}\n`));
    const remote = (p: string): string => `vscode-remote://127.0.0.1:${server.port}${p}`;
    const payload = JSON.stringify([['extensionDevelopmentPath', remote(REPO_DIR)], ['extensionTestsPath', remote(join(OUT_DIR, suiteFile))]]);
    await page.goto(`${server.baseUrl}/?folder=${encodeURIComponent(workspace)}&payload=${encodeURIComponent(payload)}`);
    const timeoutMs = Number(process.env.TEST_TIMEOUT_MS ?? 240_000);
    let timer: NodeJS.Timeout | undefined;
    const timedOut = new Promise<number>((resolve) => { timer = setTimeout(() => { log(`${name}: timed out after ${timeoutMs} ms`); resolve(1); }, timeoutMs); });
    const code = await Promise.race([exitCode, timedOut]);
    clearTimeout(timer);
    if (code !== 0) await page.screenshot({ path: join(ARTIFACTS_DIR, `host-${name}-failure.png`) }).catch(() => undefined);
    log(`${name}: exit code ${code}${blocked.length ? `; blocked non-loopback requests: ${blocked.length}` : ''}`);
    if (code !== 0 && process.env.VERBOSE) process.stdout.write(server.log());
    return code;
  } finally {
    await context.close().catch(() => undefined);
    await server.stop();
    rmSync(workspace, { recursive: true, force: true });
  }
}

function findVsix(): string {
  const version = (JSON.parse(execFileSync('node', ['-p', 'JSON.stringify(require("./package.json"))'], { cwd: REPO_DIR, encoding: 'utf8' })) as { version: string }).version;
  const vsix = join(REPO_DIR, `metric-triage-linux-x64-${version}.vsix`);
  if (!existsSync(vsix) || process.env.REPACKAGE !== '0') execFileSync('bash', ['scripts/editor/packageVsix.sh', 'linux-x64'], { cwd: REPO_DIR, stdio: 'inherit' });
  return vsix;
}

async function runScreenSuite(): Promise<number> {
  const vsix = findVsix();
  const workspace = copyWorkspace();
  const largeExportName = 'larkspur-fleet-100x10k.csv';
  writeFileSync(join(workspace, 'exports', largeExportName), renderLargeExport(100, 10_000));
  const profile = buildProfile({ isTrustEnabled: false });
  await runCodeServerCli(profile, ['--install-extension', vsix]);
  log(`installed ${vsix}: ${readdirSync(join(profile.root, 'ext')).filter((n) => n.startsWith('metric-triage')).join(', ')}`);
  const server = await startCodeServer({ isTrustEnabled: false, profile });
  const blocked: string[] = [];
  const context = await launchBrowser(server.root, blocked);
  try {
    const page = context.pages()[0] ?? await context.newPage();
    page.on('pageerror', (error) => log(`page error: ${error.message}`));
    const timing = await runScreenTests({ page, baseUrl: server.baseUrl, workspace, artifactsDir: ARTIFACTS_DIR, largeExportName, log });
    log(`screen tests passed; first paint ${timing.initToFirstPaintMs.toFixed(0)} ms; blocked non-loopback requests: ${blocked.length}`);
    return 0;
  } catch (error) {
    log(`screen tests failed: ${error instanceof Error ? error.stack ?? error.message : String(error)}`);
    if (process.env.VERBOSE) process.stdout.write(server.log());
    return 1;
  } finally {
    await context.close().catch(() => undefined);
    await server.stop();
    if (!process.env.KEEP_TMP) rmSync(workspace, { recursive: true, force: true });
  }
}

async function main(): Promise<void> {
  const only = process.env.EDITOR_TESTS ?? 'all';
  await buildSuites();
  const codes: number[] = [];
  if (only === 'all' || only === 'host') {
    codes.push(await runHostSuite('trusted', 'trustedIndex.js', false));
    codes.push(await runHostSuite('untrusted', 'untrustedIndex.js', true));
  }
  if (only === 'all' || only === 'screen') codes.push(await runScreenSuite());
  log(codes.every((c) => c === 0) ? 'editor tests passed' : 'editor tests FAILED');
  process.exit(codes.every((c) => c === 0) ? 0 : 1);
}

void main().catch((error: unknown) => { console.error(error); process.exit(1); });
