import { describeProbability } from './estimativeWords';
import { wrapFindingBlock } from './findingBlock';
import { renderSparkline } from './sparkline';
import type { Finding, MetricContribution, TimeSpan } from './types';
import { countExamples, formatMover } from './libraryWording';

/** Options of the markdown block. */
export interface RenderOptions {
  /** Rows in the metrics table (default 8). */
  readonly maxMetrics?: number;
  /** Add a Mermaid `xychart-beta` chart of the top metric (default true). */
  readonly includeMermaidChart?: boolean;
  /** Relative path of an SVG chart written beside the document, linked from the block. */
  readonly chartImagePath?: string;
}

export const CAUTION_LINE =
  'Decision aid, not a root cause: the classifier compares metric shapes with simulated faults. Confirm against logs, deploys and traces before naming a cause.';

/** ISO 8601 / RFC 3339 UTC without milliseconds when they are zero. */
export function formatUtc(ms: number): string {
  const iso = new Date(ms).toISOString();
  return iso.endsWith('.000Z') ? `${iso.slice(0, -5)}Z` : iso;
}

/** A duration in the largest sensible unit, e.g. "5 min", "90 s", "2 h 5 min". */
export function formatDuration(ms: number): string {
  const s = Math.round(ms / 1000);
  if (s < 120) return `${s} s`;
  const min = Math.round(s / 60);
  if (min < 120) return `${min} min`;
  return `${Math.floor(min / 60)} h ${min % 60} min`;
}

/** Human wording of a class id: `cpu_saturation` → "CPU saturation". */
export function describeClass(name: string): string {
  const words = name.replace(/_/g, ' ');
  return words.replace(/\bcpu\b/i, 'CPU').replace(/\bio\b/i, 'I/O').replace(/^./, (c) => c.toUpperCase());
}

/** A number with 3 significant digits and no exponent for ordinary magnitudes. */
export function formatNumber(x: number): string {
  if (!Number.isFinite(x)) return Number.isNaN(x) ? '—' : x > 0 ? '+∞' : '−∞';
  const a = Math.abs(x);
  if (a !== 0 && (a >= 1e6 || a < 1e-3)) return x.toExponential(2);
  return Number(x.toPrecision(3)).toString();
}

function escapeCell(text: string): string {
  return text.replace(/\|/g, '\\|').replace(/\r?\n/g, ' ');
}

/**
 * Caveat text (which quotes cells and names from the export) as plain prose in markdown: outside
 * `code spans`, "[" and "]" are escaped and "<" is written "&lt;", so a cell holding link or HTML
 * syntax reads as the text it is; line breaks become spaces.
 */
function escapeProse(text: string): string {
  return text.replace(/\r?\n/g, ' ').split(/(`[^`]*`)/).map((part, i) => (i % 2 === 1 ? part : part.replace(/[[\]]/g, '\\$&').replace(/</g, '&lt;'))).join('');
}

function seriesLabel(m: MetricContribution): string {
  const labels = Object.entries(m.labels).map(([k, v]) => `${k}=${v}`).join(', ');
  return labels ? `\`${m.name}\` (${labels})` : `\`${m.name}\``;
}

function spanText(span: TimeSpan, stepMs: number): string {
  return `${formatUtc(span.startMs)} → ${formatUtc(span.endMs)} (${formatDuration(span.endMs - span.startMs + stepMs)}, ± ${formatDuration(stepMs)} at each edge)`;
}

function renderVerdict(f: Finding): string[] {
  const v = f.verdict;
  const pct = (p: number): string => `${(p * 100).toFixed(0)} %`;
  if (v.isAbstained) {
    return [
      `**Classifier estimate:** no call — ${v.abstainReason ?? 'confidence below the abstain threshold'}.`,
      `Closest classes: ${describeClass(v.className)} (${pct(v.probability)}), ${describeClass(v.runnerUp.className)} (${pct(v.runnerUp.probability)}).`,
    ];
  }
  const what = v.libraryMatch
    ? `matches your past incident **${v.libraryMatch.label}** (${countExamples(v.libraryMatch.exampleCount)})`
    : `looks like **${describeClass(v.className)}**`;
  const moved = v.libraryMatch?.movedAlike ?? [];
  return [
    `**Classifier estimate:** it is *${describeProbability(v.probability)}* (${pct(v.probability)}, calibrated) that this window ${what}; runner-up ${describeClass(v.runnerUp.className)} (${pct(v.runnerUp.probability)}).`,
    ...(moved.length > 0 ? ['', `Moved alike here and in those incidents (check them): ${moved.map((m) => formatMover(m, (id) => `\`${id.replace(/`/g, "'")}\``)).join(', ')}.`] : []),
  ];
}

function renderMetricsTable(f: Finding, max: number): string[] {
  const rows = f.metrics.slice(0, max);
  if (rows.length === 0) return ['_No metric had usable samples in both windows._'];
  const out = [
    '| Metric | Family | Shapley (log-prob) | Robust z | Cliff\'s δ | Before → during (median) | Trend |',
    '|---|---|---:|---:|---:|---|---|',
  ];
  for (const m of rows) {
    const unit = m.unit ? ` ${m.unit}` : '';
    out.push(`| ${escapeCell(seriesLabel(m))} | ${m.family} | ${formatNumber(m.shapley)} ± ${formatNumber(m.shapleyCi95)} | ${formatNumber(m.effect.robustZ)} | ${formatNumber(m.effect.cliffsDelta)} | ${formatNumber(m.effect.baselineMedian)} → ${formatNumber(m.effect.incidentMedian)}${escapeCell(unit)} | ${renderSparkline(m.trend, 16)} |`);
  }
  if (f.metrics.length > max) out.push('', `_${f.metrics.length - max} more metrics are in the viewer._`);
  return out;
}

function hhmm(ms: number): string {
  return new Date(ms).toISOString().slice(11, 16);
}

function renderMermaid(f: Finding): string[] {
  const top = f.metrics[0];
  if (!top || top.trend.length < 2) return [];
  const n = top.trend.length;
  const spanMs = f.incident.endMs - f.baseline.startMs;
  const labels = top.trend.map((_, i) => `"${hhmm(f.baseline.startMs + (spanMs * i) / Math.max(1, n - 1))}"`);
  const values = top.trend.map((v) => (Number.isFinite(v) ? Number(v.toPrecision(4)) : 0));
  return [
    `Chart: \`${escapeCell(top.name)}\` from the start of the baseline to the end of the incident window (UTC).`,
    '',
    '```mermaid',
    'xychart-beta',
    `  title "${top.name.replace(/"/g, "'")}"`,
    `  x-axis [${labels.join(', ')}]`,
    `  line [${values.join(', ')}]`,
    '```',
  ];
}

/**
 * The finding as a complete markdown block (markers included), deterministic for the same
 * Finding. Observations (windows, numbers) are kept apart from the estimate (the verdict) and
 * from what is still to confirm (open questions), as blameless postmortem practice asks.
 */
export function renderFindingMarkdown(f: Finding, options: RenderOptions = {}): string {
  const lines: string[] = [
    `### Metric evidence — \`${escapeCell(f.provenance.exportFile)}\``,
    '',
    `> ${CAUTION_LINE}`,
    '',
    ...renderVerdict(f),
    '',
    `- **Incident window (UTC):** ${spanText(f.incident, f.stepMs)}`,
    `- **Baseline window (UTC):** ${spanText(f.baseline, f.stepMs)}`,
    `- **Sampling step:** ${formatDuration(f.stepMs)}`,
    '',
    '#### Metrics that carry the estimate',
    '',
    ...renderMetricsTable(f, options.maxMetrics ?? 8),
    '',
  ];
  if (options.includeMermaidChart ?? true) lines.push(...renderMermaid(f), '');
  if (options.chartImagePath) lines.push(`![Top metrics around the incident window](${options.chartImagePath})`, '');
  if (f.changePoints.length > 0) {
    lines.push('#### Change points (observed)', '');
    for (const c of f.changePoints.slice(0, 10)) lines.push(`- ${formatUtc(c.timeMs)} — \`${escapeCell(c.seriesId)}\` ${escapeCell(c.description)}`);
    lines.push('');
  }
  if (f.nearestIncidents && f.nearestIncidents.length > 0) {
    lines.push('#### Similar past incidents (incident library)', '');
    for (const n of f.nearestIncidents) lines.push(`- ${escapeCell(n.label)} — similarity ${formatNumber(n.similarity)}${n.postmortem ? ` — [postmortem](${n.postmortem})` : ''}`);
    lines.push('');
  }
  lines.push('#### Open questions (not yet confirmed)', '', ...f.openQuestions.map((q) => `- ${q}`), '');
  lines.push('#### Data caveats', '', ...f.caveats.map((c) => `- ${escapeProse(c)}`), '');
  const settings = Object.entries(f.provenance.settings).map(([k, v]) => `${k}=${String(v)}`).join(', ');
  lines.push(
    '<details><summary>Provenance</summary>',
    '',
    `- Export: \`${escapeCell(f.provenance.exportFile)}\`, sha256 \`${f.provenance.exportSha256}\``,
    `- Model: version ${f.provenance.modelVersion}, sha256 \`${f.provenance.modelSha256}\``,
    `- Settings: ${settings || 'defaults'}`,
    `- Finding ${f.id}, written ${formatUtc(f.createdMs)}`,
    '',
    '</details>',
  );
  return wrapFindingBlock(f.id, lines.join('\n'));
}
