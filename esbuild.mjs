// Two bundles (extension host: node/cjs; webview: browser), plus the headless CLI.
import * as esbuild from 'esbuild';

const production = process.argv.includes('--production');
const common = { bundle: true, sourcemap: !production, minify: production, logLevel: 'warning' };

await Promise.all([
  esbuild.build({
    ...common,
    entryPoints: ['extension/extension.ts'],
    outfile: 'dist/extension.js',
    platform: 'node',
    format: 'cjs',
    target: 'node20',
    external: ['vscode', 'onnxruntime-node'],
  }),
  esbuild.build({
    ...common,
    entryPoints: ['extension/cli/main.ts'],
    outfile: 'dist/cli.js',
    platform: 'node',
    format: 'cjs',
    target: 'node20',
    external: ['onnxruntime-node'],
    banner: { js: '#!/usr/bin/env node' },
  }),
  esbuild.build({
    ...common,
    entryPoints: ['webview/main.ts'],
    outfile: 'dist/webview.js',
    platform: 'browser',
    format: 'iife',
    target: 'es2022',
  }),
]);
