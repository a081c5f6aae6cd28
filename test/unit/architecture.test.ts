import * as assert from 'node:assert/strict';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative, resolve, dirname } from 'node:path';

const ROOT = join(__dirname, '..', '..');

function listTs(dir: string): string[] {
  const out: string[] = [];
  for (const name of readdirSync(dir)) {
    const path = join(dir, name);
    if (statSync(path).isDirectory()) out.push(...listTs(path));
    else if (name.endsWith('.ts')) out.push(path);
  }
  return out;
}

function importsOf(file: string): string[] {
  const text = readFileSync(file, 'utf8');
  const found: string[] = [];
  const re = /(?:import|export)\s[^'"]*?from\s+['"]([^'"]+)['"]|import\(\s*['"]([^'"]+)['"]\s*\)|require\(\s*['"]([^'"]+)['"]\s*\)/g;
  for (let m = re.exec(text); m; m = re.exec(text)) found.push(m[1] ?? m[2] ?? m[3]);
  return found;
}

// The layering rule of the project's design (DESIGN.md §1): dependencies point one way.
describe('layering', () => {
  it('keeps extension/core pure: no vscode, fs, onnxruntime or imports from outside core', () => {
    const core = join(ROOT, 'extension', 'core');
    const offences: string[] = [];
    for (const file of listTs(core)) {
      for (const spec of importsOf(file)) {
        if (/^(vscode|onnxruntime-node|fs|node:fs|fs\/promises|node:fs\/promises|child_process|node:child_process)$/.test(spec)) offences.push(`${relative(ROOT, file)} imports ${spec}`);
        if (spec.startsWith('.') && !resolve(dirname(file), spec).startsWith(core)) offences.push(`${relative(ROOT, file)} imports ${spec} from outside core`);
      }
    }
    assert.deepEqual(offences, []);
  });

  it('lets only extension/runtime import onnxruntime-node', () => {
    const offences = listTs(join(ROOT, 'extension'))
      .filter((f) => !f.includes(`${join('extension', 'runtime')}`))
      .filter((f) => importsOf(f).includes('onnxruntime-node'))
      .map((f) => relative(ROOT, f));
    assert.deepEqual(offences, []);
  });

  it('keeps the webview free of Node and VS Code modules', () => {
    const offences = listTs(join(ROOT, 'webview'))
      .flatMap((f) => importsOf(f).filter((s) => /^(vscode|node:|fs|path|onnxruntime-node)/.test(s)).map((s) => `${relative(ROOT, f)} imports ${s}`));
    assert.deepEqual(offences, []);
  });
});
