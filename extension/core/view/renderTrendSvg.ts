import { escapeHtml } from './renderWebviewHtml';
import type { WindowRangeView } from './types';

/** Marker comment in every SVG this project writes, so it never overwrites a file it did not write. */
export const SVG_OWNER_MARK = '<!-- written by Metric Triage; safe to regenerate -->';

/**
 * A self-contained SVG line chart (no scripts, no external references) of one series with the
 * baseline and incident windows shaded, for the postmortem's image link. Gaps break the line.
 * Fixed colours readable on light and dark markdown previews. An empty series gives an
 * axis-only chart with the title; a constant series is drawn at mid-height.
 */
export function renderTrendSvg(input: {
  readonly title: string;
  readonly timesMs: readonly number[];
  readonly valuesY: readonly (number | null)[];
  readonly incident: WindowRangeView;
  readonly baseline: WindowRangeView;
  readonly widthPx?: number;
  readonly heightPx?: number;
}): string {
  const width = input.widthPx ?? 640;
  const height = input.heightPx ?? 200;
  const pad = { left: 8, right: 8, top: 28, bottom: 12 };
  const times = input.timesMs;
  const x0 = times.length ? Math.min(times[0], input.baseline.startMs) : 0;
  const x1 = times.length ? Math.max(times[times.length - 1], input.incident.endMs) : 1;
  const finite = input.valuesY.filter((v): v is number => v !== null && Number.isFinite(v));
  const yMin = finite.length ? Math.min(...finite) : 0;
  const yMax = finite.length ? Math.max(...finite) : 1;
  const scaleX = (t: number): number => pad.left + ((t - x0) / Math.max(1, x1 - x0)) * (width - pad.left - pad.right);
  const scaleY = (v: number): number => (yMax === yMin ? height / 2 : pad.top + (1 - (v - yMin) / (yMax - yMin)) * (height - pad.top - pad.bottom));
  const band = (w: WindowRangeView, fill: string, label: string): string => {
    const left = scaleX(w.startMs);
    const right = Math.max(left + 1, scaleX(w.endMs));
    return `<rect x="${left.toFixed(1)}" y="${pad.top}" width="${(right - left).toFixed(1)}" height="${height - pad.top - pad.bottom}" fill="${fill}" fill-opacity="0.18"><title>${label}</title></rect>`;
  };
  const segments: string[] = [];
  let current = '';
  input.valuesY.forEach((v, i) => {
    if (v === null || !Number.isFinite(v)) { if (current) segments.push(current); current = ''; return; }
    current += `${current ? ' L' : 'M'}${scaleX(times[i]).toFixed(1)},${scaleY(v).toFixed(1)}`;
  });
  if (current) segments.push(current);
  return [
    `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" role="img" aria-label="${escapeHtml(input.title)}">`,
    SVG_OWNER_MARK,
    `<rect width="${width}" height="${height}" fill="#ffffff"/>`,
    band(input.baseline, '#2f7d32', 'baseline window'),
    band(input.incident, '#c62828', 'incident window'),
    ...segments.map((d) => `<path d="${d}" fill="none" stroke="#1f4e79" stroke-width="1.5"/>`),
    `<text x="${pad.left}" y="18" font-family="sans-serif" font-size="13" fill="#202020">${escapeHtml(input.title)}</text>`,
    '</svg>',
    '',
  ].join('\n');
}
