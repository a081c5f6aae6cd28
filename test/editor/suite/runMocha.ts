import type MochaType from 'mocha';

/** One tagged line; the harness prints lines carrying the tag from the page console. */
function report(line: string): void {
  console.log(`[editor-suite] ${line}`);
}

/**
 * Runs the given test modules with mocha inside the extension host. Each module is `require`d
 * after mocha's globals exist (`pre-require`), which is how `mocha.addFile` loads them too; the
 * modules are bundled, so they are passed as loader functions instead of file paths. Results are
 * reported as whole strings: the extension host forwards console format arguments unformatted.
 */
export function runMochaSuites(loaders: readonly (() => unknown)[]): Promise<void> {
  // eslint-disable-next-line @typescript-eslint/no-require-imports
  const Mocha = require('mocha') as typeof MochaType;
  const mocha = new Mocha({ ui: 'bdd', color: false, timeout: 120_000, reporter: Mocha.reporters.Base });
  mocha.suite.emit('pre-require', globalThis, 'editor-suite', mocha);
  for (const load of loaders) load();
  return new Promise<void>((resolve, reject) => {
    const runner = mocha.run((failures) => {
      report(`${runner.stats?.passes ?? 0} passing, ${failures} failing`);
      if (failures > 0) reject(new Error(`${failures} editor test(s) failed`)); else resolve();
    });
    runner.on('suite', (suite) => { if (suite.title) report(suite.title); });
    runner.on('pass', (test) => report(`  ✔ ${test.title} (${test.duration ?? 0} ms)`));
    runner.on('fail', (test, error: Error) => report(`  ✗ ${test.title}: ${error.stack ?? error.message}`));
  });
}
