/**
 * Starts code-server (VS Code 1.100.3 in the browser, a real Node extension host) on loopback
 * with throwaway profile folders, and headless Debian chromium through playwright-core.
 * Recipe and pitfalls: ../shared notes "real-editor-tests".
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromium, type BrowserContext } from 'playwright-core';

export const REPO_DIR = join(__dirname, '..', '..');
export const CODE_SERVER_BIN = process.env.CODE_SERVER_BIN ?? join(process.env.CODE_SERVER_DIR ?? join(REPO_DIR, '.cache', 'code-server'), 'node_modules', '.bin', 'code-server');
export const CHROMIUM_BIN = process.env.CHROMIUM ?? '/usr/bin/chromium';
const HOST = '127.0.0.1';

export interface CodeServer {
  readonly baseUrl: string;
  readonly port: number;
  readonly root: string;
  readonly log: () => string;
  stop(): Promise<void>;
}

async function findFreePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = createServer();
    server.once('error', reject);
    server.listen(0, HOST, () => {
      const address = server.address();
      server.close(() => (typeof address === 'object' && address ? resolve(address.port) : reject(new Error('no port'))));
    });
  });
}

/** Extra arguments for `code-server` itself, e.g. `--install-extension x.vsix`. */
export function buildProfile(options: { readonly isTrustEnabled: boolean }): { root: string; env: NodeJS.ProcessEnv; args: string[] } {
  const root = mkdtempSync(join(tmpdir(), 'triage-editor-'));
  for (const dir of ['home', 'udd/User', 'ext', 'chrome', 'tmp']) mkdirSync(join(root, dir), { recursive: true });
  const settings: Record<string, unknown> = {
    'telemetry.telemetryLevel': 'off', 'update.mode': 'none', 'extensions.autoUpdate': false, 'extensions.autoCheckUpdates': false,
    'workbench.startupEditor': 'none', 'workbench.enableExperiments': false, 'git.enabled': false, 'chat.disableAIFeatures': true,
    'workbench.tips.enabled': false, 'window.restoreWindows': 'none',
  };
  if (options.isTrustEnabled) {
    Object.assign(settings, { 'security.workspace.trust.enabled': true, 'security.workspace.trust.startupPrompt': 'never', 'security.workspace.trust.untrustedFiles': 'open' });
  }
  writeFileSync(join(root, 'udd', 'User', 'settings.json'), JSON.stringify(settings, null, 1));
  const env: NodeJS.ProcessEnv = {
    ...process.env, HOME: join(root, 'home'), XDG_CONFIG_HOME: join(root, 'home', '.config'), XDG_DATA_HOME: join(root, 'home', '.local', 'share'),
    XDG_CACHE_HOME: join(root, 'home', '.cache'), EXTENSIONS_GALLERY: '{}',
    // TMPDIR keeps vscode-ipc and git sockets inside the throwaway folder.
    TMPDIR: join(root, 'tmp'),
  };
  const args = ['--user-data-dir', join(root, 'udd'), '--extensions-dir', join(root, 'ext')];
  return { root, env, args };
}

/** Runs code-server once with extra args (e.g. --install-extension) and waits for it to exit. */
export async function runCodeServerCli(profile: ReturnType<typeof buildProfile>, extraArgs: readonly string[]): Promise<string> {
  return new Promise((resolve, reject) => {
    const child = spawn(CODE_SERVER_BIN, [...profile.args, ...extraArgs], { env: profile.env, stdio: ['ignore', 'pipe', 'pipe'] });
    let output = '';
    child.stdout.on('data', (d: Buffer) => { output += d.toString(); });
    child.stderr.on('data', (d: Buffer) => { output += d.toString(); });
    child.on('close', (code) => (code === 0 ? resolve(output) : reject(new Error(`code-server ${extraArgs.join(' ')} exited with ${code}:\n${output}`))));
  });
}

/** Starts code-server in its own process group; `stop()` ends the whole group (its file watcher ignores SIGTERM). */
export async function startCodeServer(options: { readonly isTrustEnabled: boolean; readonly profile?: ReturnType<typeof buildProfile> }): Promise<CodeServer> {
  const profile = options.profile ?? buildProfile(options);
  const port = await findFreePort();
  const config = [`bind-addr: ${HOST}:${port}`, 'auth: none', 'cert: false', 'disable-telemetry: true', 'disable-update-check: true',
    'disable-getting-started-override: true', ...(options.isTrustEnabled ? [] : ['disable-workspace-trust: true'])].join('\n');
  writeFileSync(join(profile.root, 'config.yaml'), `${config}\n`);
  const child: ChildProcess = spawn(CODE_SERVER_BIN, ['--config', join(profile.root, 'config.yaml'), ...profile.args], { env: profile.env, stdio: ['ignore', 'pipe', 'pipe'], detached: true });
  let log = '';
  child.stdout?.on('data', (d: Buffer) => { log += d.toString(); });
  child.stderr?.on('data', (d: Buffer) => { log += d.toString(); });
  const baseUrl = `http://${HOST}:${port}`;
  const deadline = Date.now() + 60_000;
  for (;;) {
    try { if ((await fetch(`${baseUrl}/healthz`)).ok) break; } catch { /* not up yet */ }
    if (Date.now() > deadline || child.exitCode !== null) throw new Error(`code-server did not start on ${baseUrl}:\n${log}`);
    await new Promise((r) => setTimeout(r, 100));
  }
  return {
    baseUrl, port, root: profile.root, log: () => log,
    async stop() {
      try { process.kill(-(child.pid ?? 0), 'SIGTERM'); } catch { /* already gone */ }
      await new Promise((r) => setTimeout(r, 1500));
      try { process.kill(-(child.pid ?? 0), 'SIGKILL'); } catch { /* already gone */ }
      if (!process.env.KEEP_TMP) rmSync(profile.root, { recursive: true, force: true });
    },
  };
}

/** Headless chromium that may only talk to loopback (every other request is aborted and logged). */
export async function launchBrowser(root: string, blocked: string[]): Promise<BrowserContext> {
  const context = await chromium.launchPersistentContext(join(root, 'chrome'), {
    executablePath: CHROMIUM_BIN, headless: true, viewport: { width: 1440, height: 900 },
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking',
      '--disable-component-update', '--disable-sync', `--host-resolver-rules=MAP * ~NOTFOUND , EXCLUDE ${HOST}`],
  });
  await context.route((url) => !['127.0.0.1', 'localhost'].includes(url.hostname), (route) => {
    blocked.push(route.request().url());
    return route.abort();
  });
  return context;
}
