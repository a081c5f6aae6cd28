/** `metric-triage inspect FILE [--json]`: what an export holds, before any analysis. */
import { FrameTooLargeError } from '../core/frame/buildFrame';
import { FAMILIES, type Family, type MetricFrame } from '../core/frame/types';
import { formatRfc3339Utc } from '../core/ingest/timestamps';
import type { IngestIssue, IngestResult } from '../core/ingest/types';
import { ExportFileError, loadFrame } from '../node/readExport';

export const INSPECT_USAGE = `metric-triage inspect FILE [--json]
  Read a metric export and print its format, time range (RFC 3339 UTC), step, series count,
  families, gaps, warnings and assumptions. --json prints the same as one JSON object.
  Exit codes: 0 read cleanly, 1 the export has errors or cannot be read, 2 usage error.`;

/** Summary printed by `inspect` (the --json shape). */
export interface InspectReport {
  readonly file: string;
  readonly format: string;
  readonly sha256: string;
  readonly timeRange: { readonly start: string; readonly end: string } | null;
  readonly stepMs: number;
  readonly gridPoints: number;
  readonly seriesCount: number;
  readonly ratesConverted: number;
  readonly families: Readonly<Partial<Record<Family, number>>>;
  readonly gaps: { readonly meanFraction: number; readonly seriesOverHalf: number; readonly emptySeries: number };
  readonly duplicateTimestamps: number;
  readonly warnings: readonly string[];
  readonly assumptions: readonly string[];
  readonly issues: readonly IngestIssue[];
}

/** Builds the inspect summary from a read result and its frame (pure; exported for tests). */
export function summarizeExport(result: IngestResult, frame: MetricFrame, sha256: string): InspectReport {
  const families: Partial<Record<Family, number>> = {};
  for (const family of FAMILIES) {
    const count = frame.series.filter((s) => s.family === family).length;
    if (count > 0) families[family] = count;
  }
  const n = frame.series.length;
  const t = frame.timesMs;
  return {
    file: result.file,
    format: result.format,
    sha256,
    timeRange: t.length > 0 ? { start: formatRfc3339Utc(t[0]), end: formatRfc3339Utc(t[t.length - 1]) } : null,
    stepMs: frame.stepMs,
    gridPoints: t.length,
    seriesCount: n,
    ratesConverted: frame.series.filter((s) => s.isConvertedToRate).length,
    families,
    gaps: {
      meanFraction: n === 0 ? 0 : frame.series.reduce((sum, s) => sum + s.gapFraction, 0) / n,
      seriesOverHalf: frame.series.filter((s) => s.gapFraction > 0.5).length,
      emptySeries: frame.series.filter((s) => s.gapFraction === 1).length,
    },
    duplicateTimestamps: frame.duplicateCount,
    warnings: frame.warnings,
    assumptions: frame.assumptions,
    issues: result.issues,
  };
}

/** Human form of a step in ms: "250 ms", "15 s", "5 min", "1 h". */
export function formatStep(stepMs: number): string {
  if (!(stepMs > 0)) return 'none (fewer than two distinct times)';
  if (stepMs < 1000) return `${stepMs} ms`;
  if (stepMs < 60_000 || stepMs % 60_000 !== 0) return `${stepMs / 1000} s`;
  if (stepMs < 3_600_000 || stepMs % 3_600_000 !== 0) return `${stepMs / 60_000} min`;
  return `${stepMs / 3_600_000} h`;
}

/** Plain-text form of the summary, one fact per line. */
export function renderInspectText(report: InspectReport): string {
  const lines = [
    `file:         ${report.file}`,
    `format:       ${report.format}`,
    `sha256:       ${report.sha256}`,
    `time range:   ${report.timeRange === null ? 'none' : `${report.timeRange.start} to ${report.timeRange.end}`} (${report.gridPoints} grid points)`,
    `step:         ${formatStep(report.stepMs)}`,
    `series:       ${report.seriesCount}${report.ratesConverted > 0 ? ` (${report.ratesConverted} counters shown as per-second rates)` : ''}`,
    `families:     ${Object.entries(report.families).map(([f, c]) => `${f} ${c}`).join(', ') || 'none'}`,
    `gaps:         ${(report.gaps.meanFraction * 100).toFixed(1)}% of grid points on average; ${report.gaps.seriesOverHalf} series over half empty; ${report.gaps.emptySeries} empty`,
  ];
  const list = (title: string, items: readonly string[]): void => {
    if (items.length === 0) return;
    lines.push(`${title}:`);
    for (const item of items) lines.push(`  - ${item}`);
  };
  list('assumptions', report.assumptions);
  list('warnings', report.warnings);
  const errors = report.issues.filter((i) => i.severity === 'error').length;
  lines.push(`issues:       ${errors} error(s), ${report.issues.length - errors} warning(s)`);
  for (const issue of report.issues) lines.push(`  ${issue.severity}: ${issue.file}:${issue.line}: ${issue.message}`);
  return lines.join('\n') + '\n';
}

/** Runs `inspect` with the arguments after the command name; returns the exit code. */
export async function runInspect(args: readonly string[]): Promise<number> {
  const files = args.filter((a) => !a.startsWith('--'));
  const unknown = args.filter((a) => a.startsWith('--') && a !== '--json');
  if (args.includes('--help')) { process.stdout.write(`${INSPECT_USAGE}\n`); return 0; }
  if (files.length !== 1 || unknown.length > 0) {
    const problem = unknown.length > 0 ? `unknown option ${unknown[0]}` : `expected one FILE, got ${files.length}`;
    process.stderr.write(`metric-triage inspect: ${problem}\n${INSPECT_USAGE}\n`);
    return 2;
  }
  try {
    const { result, frame, sha256 } = await loadFrame(files[0]);
    const report = summarizeExport(result, frame, sha256);
    process.stdout.write(args.includes('--json') ? `${JSON.stringify(report, null, 2)}\n` : renderInspectText(report));
    return report.issues.some((i) => i.severity === 'error') ? 1 : 0;
  } catch (err) {
    if (err instanceof ExportFileError || err instanceof FrameTooLargeError) {
      process.stderr.write(`metric-triage inspect: ${err.message}\n`);
      return 1;
    }
    throw err;
  }
}
