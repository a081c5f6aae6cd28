import { format } from 'node:util';
import type MochaType from 'mocha';

/**
 * Runs the given test modules with mocha inside the extension host. Each module is `require`d
 * after mocha's globals exist (`pre-require`), which is how `mocha.addFile` loads them too; the
 * modules are bundled, so they are passed as loader functions instead of file paths.
 */
export function runMochaSuites(loaders: readonly (() => unknown)[]): Promise<void> {
  // The extension host forwards console arguments unformatted and mocha's reporters keep the
  // console.log they find when first loaded, so format and tag lines before mocha is required;
  // the harness prints the tagged lines.
  const log = console.log;
  console.log = (...args: unknown[]) => log(`[editor-suite] ${format(...args)}`);
  // eslint-disable-next-line @typescript-eslint/no-require-imports
  const Mocha = require('mocha') as typeof MochaType;
  const mocha = new Mocha({ ui: 'bdd', color: false, timeout: 120_000, reporter: 'spec' });
  mocha.suite.emit('pre-require', globalThis, 'editor-suite', mocha);
  for (const load of loaders) load();
  return new Promise<void>((resolve, reject) => {
    mocha.run((failures) => (failures > 0 ? reject(new Error(`${failures} editor test(s) failed`)) : resolve()));
  });
}
