import { runMochaSuites } from './runMocha';

/** Entry for `extensionTestsPath` (trusted workspace run). */
export function run(): Promise<void> {
  return runMochaSuites([() => require('./trusted.test'), () => require('./library.test')]);
}
