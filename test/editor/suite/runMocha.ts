import { format } from 'node:util';
import Mocha from 'mocha';

/**
 * Runs the given test modules with mocha inside the extension host. Each module is `require`d
 * after mocha's globals exist (`pre-require`), which is how `mocha.addFile` loads them too; the
 * modules are bundled, so they are passed as loader functions instead of file paths.
 */
export function runMochaSuites(loaders: readonly (() => unknown)[]): Promise<void> {
  const mocha = new Mocha({ ui: 'bdd', color: false, timeout: 120_000, reporter: 'spec' });
  mocha.suite.emit('pre-require', globalThis, 'editor-suite', mocha);
  for (const load of loaders) load();
  // The extension host forwards console arguments unformatted; format them so the report reads well.
  const log = console.log;
  console.log = (...args: unknown[]) => log(`[editor-suite] ${format(...args)}`);
  return new Promise<void>((resolve, reject) => {
    mocha.run((failures) => (failures > 0 ? reject(new Error(`${failures} editor test(s) failed`)) : resolve()));
  }).finally(() => { console.log = log; });
}
