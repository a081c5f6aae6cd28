import { runMochaSuites } from './runMocha';

/** Entry for `extensionTestsPath` (restricted-mode run). */
export function run(): Promise<void> {
  return runMochaSuites([() => require('./untrusted.test')]);
}
