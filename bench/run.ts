/**
 * `npm run bench`: runs every bench/*.bench.ts in turn (each exports `run(): Promise<BenchReport>`),
 * prints a table and writes bench/results/latest.json. Benchmarks measure; they do not assert.
 */
import { readdirSync, mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';

export interface BenchLine {
  readonly name: string;
  readonly value: number;
  readonly unit: string;
  readonly target?: string;
  readonly note?: string;
}
export interface BenchReport {
  readonly suite: string;
  readonly lines: readonly BenchLine[];
}

async function main(): Promise<void> {
  const only = process.argv.slice(2);
  const files = readdirSync(__dirname).filter((f) => f.endsWith('.bench.ts')).sort()
    .filter((f) => only.length === 0 || only.some((o) => f.includes(o)));
  const reports: BenchReport[] = [];
  for (const file of files) {
    const mod = (await import(join(__dirname, file))) as { run: () => Promise<BenchReport> };
    const report = await mod.run();
    reports.push(report);
    process.stdout.write(`\n## ${report.suite}\n`);
    for (const l of report.lines) {
      process.stdout.write(`${l.name.padEnd(60)} ${l.value.toFixed(3).padStart(12)} ${l.unit.padEnd(8)} ${l.target ?? ''} ${l.note ?? ''}\n`);
    }
  }
  mkdirSync(join(__dirname, 'results'), { recursive: true });
  writeFileSync(join(__dirname, 'results', 'latest.json'), JSON.stringify(reports, null, 2));
}

void main();
