import { existsSync, readFileSync, renameSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { applyTextEdits, renderFindingMarkdown, upsertFindingBlock } from '../core/report';
import type { Finding } from '../core/report/types';
import { analyzeExport, type MsRange } from '../node/analyze';
import { countExamples, formatMover } from '../core/report/libraryWording';

export const CLASSIFY_USAGE = `metric-triage classify FILE [--window START/END] [--baseline START/END] [--json] [--markdown OUT.md] [--model DIR] [--library FILE]
  Classify the incident window of a metric export and explain it.
  START/END are RFC 3339 times, e.g. 2026-01-05T10:00:00Z/2026-01-05T10:25:00Z.
  Without --window the suggested incident window is used.
  --markdown inserts (or replaces) the findings block in OUT.md; text outside the block is kept.`;

interface ClassifyArgs {
  readonly file: string;
  readonly window?: MsRange;
  readonly baseline?: MsRange;
  readonly isJson: boolean;
  readonly markdownPath?: string;
  readonly modelDir: string;
  readonly libraryPath?: string;
}

/** Parse `START/END` (RFC 3339 with Z or an offset); an error says what was expected. */
export function parseRange(text: string, flag: string): MsRange {
  const parts = text.split('/');
  const rfc3339 = /^\d{4}-\d{2}-\d{2}[Tt ]\d{2}:\d{2}(:\d{2}(\.\d+)?)?([Zz]|[+-]\d{2}:\d{2})$/;
  if (parts.length !== 2 || !parts.every((p) => rfc3339.test(p))) {
    throw new UsageError(`${flag} expects START/END as RFC 3339 times with a zone (e.g. 2026-01-05T10:00:00Z/2026-01-05T10:25:00Z), got "${text}"`);
  }
  const [startMs, endMs] = parts.map((p) => Date.parse(p));
  if (!(endMs >= startMs)) throw new UsageError(`${flag}: END must not be before START, got "${text}"`);
  return { startMs, endMs };
}

export class UsageError extends Error {}

function defaultModelDir(): string {
  // dist/cli.js → ../media/model; under tsx (extension/cli/classify.ts) → ../../media/model
  const candidates = [join(__dirname, '..', 'media', 'model'), join(__dirname, '..', '..', 'media', 'model')];
  return candidates.find((c) => existsSync(join(c, 'classifier.json'))) ?? candidates[0];
}

function parseArgs(args: readonly string[]): ClassifyArgs {
  let file: string | undefined;
  let window: MsRange | undefined;
  let baseline: MsRange | undefined;
  let isJson = false;
  let markdownPath: string | undefined;
  let modelDir = defaultModelDir();
  let libraryPath: string | undefined;
  for (let i = 0; i < args.length; i++) {
    const a = args[i];
    const next = (): string => {
      const v = args[++i];
      if (v === undefined) throw new UsageError(`${a} expects a value`);
      return v;
    };
    if (a === '--window') window = parseRange(next(), a);
    else if (a === '--baseline') baseline = parseRange(next(), a);
    else if (a === '--json') isJson = true;
    else if (a === '--markdown') markdownPath = next();
    else if (a === '--model') modelDir = next();
    else if (a === '--library') libraryPath = next();
    else if (a.startsWith('--')) throw new UsageError(`unknown option ${a}`);
    else if (file === undefined) file = a;
    else throw new UsageError(`expected one FILE, got a second one: ${a}`);
  }
  if (!file) throw new UsageError('expected FILE');
  return { file, window, baseline, isJson, markdownPath, modelDir, libraryPath };
}

function iso(ms: number): string {
  return new Date(ms).toISOString();
}

/** The `--json` document: the fields the issue promises plus the rest of the finding. */
export function toClassifyJson(f: Finding): object {
  return {
    verdict: { class: f.verdict.className, probability: f.verdict.probability, abstain: f.verdict.isAbstained, abstainReason: f.verdict.abstainReason, runnerUp: { class: f.verdict.runnerUp.className, probability: f.verdict.runnerUp.probability } },
    probabilities: f.verdict.probabilities,
    window: { start: iso(f.incident.startMs), end: iso(f.incident.endMs) },
    baseline: { start: iso(f.baseline.startMs), end: iso(f.baseline.endMs) },
    stepSeconds: f.stepMs / 1000,
    metrics: f.metrics.map((m) => ({ id: m.id, family: m.family, shapley: m.shapley, shapleyCi95: m.shapleyCi95, effect: m.effect })),
    changePoints: f.changePoints.map((c) => ({ time: iso(c.timeMs), series: c.seriesId, description: c.description })),
    caveats: f.caveats,
    openQuestions: f.openQuestions,
    ...(f.verdict.libraryMatch ? { libraryMatch: f.verdict.libraryMatch } : {}),
    ...(f.nearestIncidents ? { nearestIncidents: f.nearestIncidents } : {}),
    provenance: f.provenance,
    findingId: f.id,
    caution: 'Decision aid: an estimate from metric shapes, not a root cause.',
  };
}

/**
 * The incident library's say, as lines of the text output: the match (with the metrics that moved
 * alike) when a library label won, and the nearest past incidents. Empty without a library.
 */
export function describeLibraryLines(f: Finding): string[] {
  const lines: string[] = [];
  const match = f.verdict.libraryMatch;
  if (match) {
    const moved = match.movedAlike?.length ? `; moved alike: ${match.movedAlike.map((m) => formatMover(m)).join(', ')}` : '';
    lines.push(`  library: matches your past incident ${match.label} (${countExamples(match.exampleCount)})${moved}`);
  }
  if (f.nearestIncidents?.length) {
    lines.push(`  nearest past incidents: ${f.nearestIncidents.map((n) => `${n.label} (similarity ${Number.isFinite(n.similarity) ? n.similarity.toFixed(2) : 'n/a'}${n.postmortem ? `, ${n.postmortem}` : ''})`).join('; ')}`);
  }
  return lines;
}

/** Insert or replace the block in `path` without touching anything else; writes atomically. */
export function writeFindingInto(path: string, block: string): void {
  if (existsSync(path) && !statSync(path).isFile()) throw new Error(`${path}: expected a markdown file to write the finding into, got a ${statSync(path).isDirectory() ? 'directory' : 'special file'}`);
  const before = existsSync(path) ? readFileSync(path, 'utf8') : '';
  const result = upsertFindingBlock(before, block);
  if ('error' in result) throw new Error(`${path}: ${result.error}`);
  const temp = `${path}.metric-triage-${process.pid}.tmp`;
  writeFileSync(temp, applyTextEdits(before, result.edits));
  renameSync(temp, path);
}

/** `metric-triage classify …`; returns the exit code (0 ok, 1 bad input, 2 usage). */
export async function runClassify(args: readonly string[]): Promise<number> {
  let parsed: ClassifyArgs;
  try {
    parsed = parseArgs(args);
  } catch (e) {
    process.stderr.write(`metric-triage classify: ${(e as Error).message}\n\n${CLASSIFY_USAGE}\n`);
    return 2;
  }
  if (parsed.libraryPath !== undefined && !existsSync(parsed.libraryPath)) {
    // An explicit library that is not there is most likely a mistyped path: matching against nothing would look like "no similar incident".
    process.stderr.write(`metric-triage classify: --library ${parsed.libraryPath}: expected an incident library file, found none (create one with \`metric-triage library add\`)\n`);
    return 1;
  }
  try {
    const result = await analyzeExport(parsed.file, {
      modelDir: parsed.modelDir, incident: parsed.window, baseline: parsed.baseline, libraryPath: parsed.libraryPath,
    });
    const f = result.finding;
    if (parsed.markdownPath) writeFindingInto(parsed.markdownPath, renderFindingMarkdown(f));
    if (parsed.isJson) {
      process.stdout.write(`${JSON.stringify(toClassifyJson(f), null, 2)}\n`);
    } else {
      const v = f.verdict;
      process.stdout.write([
        `${parsed.file}`,
        `  estimate: ${v.isAbstained ? `no call (${v.abstainReason ?? 'low confidence'})` : `${v.className} (p = ${v.probability.toFixed(2)}, calibrated)`}; runner-up ${v.runnerUp.className} (${v.runnerUp.probability.toFixed(2)})`,
        `  incident window: ${iso(f.incident.startMs)} → ${iso(f.incident.endMs)}`,
        `  baseline window: ${iso(f.baseline.startMs)} → ${iso(f.baseline.endMs)}`,
        ...describeLibraryLines(f),
        '  top metrics (Shapley, robust z):',
        ...f.metrics.slice(0, 5).map((m) => `    ${m.id}  ${m.shapley.toFixed(3)}  z=${m.effect.robustZ.toFixed(1)}`),
        parsed.markdownPath ? `  findings written to ${parsed.markdownPath}` : '',
        '  decision aid: an estimate from metric shapes, not a root cause',
      ].filter(Boolean).join('\n') + '\n');
    }
    return 0;
  } catch (e) {
    process.stderr.write(`metric-triage classify: ${(e as Error).message}\n`);
    return 1;
  }
}
