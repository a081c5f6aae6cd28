/**
 * `npm run demo:data`: writes the invented demo incident ("Larkspur Provisions checkout
 * slowdown") to media/demo/ in all five export formats, from one deterministic simulation.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { buildDemoSystem } from './simulator/demoScenario';
import { writeLineProtocol, writeLongCsv, writeOtlpJsonLines, writeRangeQueryJson, writeWideCsv } from './simulator/demoExports';

function main(): void {
  const outDir = join(__dirname, '..', 'media', 'demo');
  mkdirSync(outDir, { recursive: true });
  const system = buildDemoSystem();
  const files: ReadonlyArray<readonly [string, string]> = [
    ['checkout-incident.csv', writeWideCsv(system)],
    ['checkout-incident-long.csv', writeLongCsv(system)],
    ['checkout-incident.json', writeRangeQueryJson(system)],
    ['checkout-incident.jsonl', writeOtlpJsonLines(system, { 'service.name': 'basket-api', 'service.namespace': 'larkspur-provisions', 'deployment.environment': 'production' })],
    ['checkout-incident.lp', writeLineProtocol(system)],
  ];
  for (const [name, text] of files) {
    writeFileSync(join(outDir, name), text);
    process.stdout.write(`${name.padEnd(30)} ${(Buffer.byteLength(text) / 1024).toFixed(0).padStart(6)} KiB\n`);
  }
}

main();
