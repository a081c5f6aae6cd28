/**
 * Writes one simulated system in the five export formats people have on disk (REFERENCE.md §1):
 * wide CSV (RFC 4180, RFC 3339 UTC times), long CSV, the range-query JSON of the common
 * open-source monitoring system's HTTP API, OTLP JSON lines (file exporter) and line protocol.
 * Gaps are never written as zeros: an empty cell in wide CSV, a missing row/point elsewhere.
 */
import { formatSeriesId } from './systemSpec';
import type { SimSeries, SimSystem } from './types';

/** RFC 3339 UTC with a `Z` suffix and no fractional seconds when they are zero. */
export function formatRfc3339(ms: number): string {
  return new Date(ms).toISOString().replace('.000Z', 'Z');
}

/** Shortest decimal text: 10 significant digits for counters (rates come from differences), 6 for gauges. */
export function formatSampleValue(value: number, kind: SimSeries['kind']): string {
  if (Number.isInteger(value)) return String(value);
  return String(Number(value.toPrecision(kind === 'counter' ? 10 : 6)));
}

/** RFC 4180 field: quoted when it holds a comma, quote, CR or LF; inner quotes doubled. */
export function quoteCsvField(text: string): string {
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

const seriesHeader = (s: SimSeries): string => formatSeriesId(s.name, s.labels);

/** Wide CSV: `time` then one column per series; CRLF line ends as RFC 4180 specifies. */
export function writeWideCsv(system: SimSystem): string {
  const lines = [['time', ...system.series.map(seriesHeader)].map(quoteCsvField).join(',')];
  system.timesMs.forEach((t, i) => {
    const cells = system.series.map((s) => {
      const v = s.values[i] as number;
      return Number.isNaN(v) ? '' : formatSampleValue(v, s.kind);
    });
    lines.push([formatRfc3339(t), ...cells].join(','));
  });
  return `${lines.join('\r\n')}\r\n`;
}

/** Long CSV: time, metric, one column per label key (empty = label absent), value; gaps omitted. */
export function writeLongCsv(system: SimSystem): string {
  const labelKeys = [...new Set(system.series.flatMap((s) => Object.keys(s.labels)))].sort();
  const lines = [['time', 'metric', ...labelKeys, 'value'].map(quoteCsvField).join(',')];
  system.timesMs.forEach((t, i) => {
    for (const s of system.series) {
      const v = s.values[i] as number;
      if (Number.isNaN(v)) continue;
      lines.push([formatRfc3339(t), s.name, ...labelKeys.map((k) => s.labels[k] ?? ''), formatSampleValue(v, s.kind)].map(quoteCsvField).join(','));
    }
  });
  return `${lines.join('\r\n')}\r\n`;
}

/** Range-query JSON (`resultType: "matrix"`): float-second times, string values, sorted by metric. */
export function writeRangeQueryJson(system: SimSystem): string {
  const result = system.series.map((s) => ({
    metric: { __name__: s.name, ...s.labels },
    values: [...system.timesMs].flatMap((t, i) => {
      const v = s.values[i] as number;
      return Number.isNaN(v) ? [] : [[t / 1000, formatSampleValue(v, s.kind)]];
    }),
  })).sort((a, b) => formatSeriesId(a.metric.__name__, a.metric).localeCompare(formatSeriesId(b.metric.__name__, b.metric)));
  return `${JSON.stringify({ status: 'success', data: { resultType: 'matrix', result } })}\n`;
}

const toNanoString = (ms: number): string => `${BigInt(Math.round(ms)) * 1_000_000n}`;
const attributes = (labels: Readonly<Record<string, string>>): Array<{ key: string; value: { stringValue: string } }> =>
  Object.keys(labels).sort().map((key) => ({ key, value: { stringValue: labels[key] ?? '' } }));

/** Start time of each counter point: the grid time of the last reset (a drop) or of the series start. */
function counterStartTimes(system: SimSystem, s: SimSeries): number[] {
  // The process had been running before the export begins, so the first start predates it.
  let start = (system.timesMs[0] as number) - 86_400_000;
  let prev = Number.NaN;
  return [...s.values].map((v, i) => {
    if (!Number.isNaN(v) && !Number.isNaN(prev) && v < prev) start = system.timesMs[i - 1] as number;
    if (!Number.isNaN(v)) prev = v;
    return start;
  });
}

/**
 * OTLP JSON lines as the file exporter writes them: one `MetricsData` per export batch of
 * `batchSteps` grid steps; gauges as `gauge`, counters as monotonic cumulative `sum`
 * (aggregationTemporality 2); 64-bit times and integers as decimal strings.
 */
export function writeOtlpJsonLines(system: SimSystem, resource: Readonly<Record<string, string>>, batchSteps = 15): string {
  const starts = system.series.map((s) => (s.kind === 'counter' ? counterStartTimes(system, s) : []));
  const lines: string[] = [];
  for (let from = 0; from < system.timesMs.length; from += batchSteps) {
    const to = Math.min(system.timesMs.length, from + batchSteps);
    const metrics = system.series.map((s, k) => {
      const dataPoints = [];
      for (let i = from; i < to; i += 1) {
        const v = s.values[i] as number;
        if (Number.isNaN(v)) continue;
        const isInt = s.kind === 'counter' && Number.isInteger(v);
        dataPoints.push({
          attributes: attributes(s.labels),
          ...(s.kind === 'counter' ? { startTimeUnixNano: toNanoString((starts[k] as number[])[i] as number) } : {}),
          timeUnixNano: toNanoString(system.timesMs[i] as number),
          ...(isInt ? { asInt: String(v) } : { asDouble: Number(formatSampleValue(v, s.kind)) }),
        });
      }
      const body = s.kind === 'counter'
        ? { sum: { aggregationTemporality: 2, isMonotonic: true, dataPoints } }
        : { gauge: { dataPoints } };
      return { name: s.name, unit: s.unit ?? '', ...body };
    });
    lines.push(JSON.stringify({ resourceMetrics: [{ resource: { attributes: attributes(resource) }, scopeMetrics: [{ scope: { name: 'larkspur.demo.exporter', version: '0.1.0' }, metrics }] }] }));
  }
  return `${lines.join('\n')}\n`;
}

const escapeKey = (text: string): string => text.replace(/([,= \\])/g, '\\$1');
const escapeMeasurement = (text: string): string => text.replace(/([, \\])/g, '\\$1');

/** Line protocol: measurement = metric name, tags = labels, field `value`, ns timestamps; integer counters get `i`. */
export function writeLineProtocol(system: SimSystem): string {
  const lines: string[] = [];
  system.timesMs.forEach((t, i) => {
    for (const s of system.series) {
      const v = s.values[i] as number;
      if (Number.isNaN(v)) continue;
      const tags = Object.keys(s.labels).sort().map((k) => `,${escapeKey(k)}=${escapeKey(s.labels[k] ?? '')}`).join('');
      const field = s.kind === 'counter' && Number.isInteger(v) ? `${v}i` : formatSampleValue(v, s.kind);
      lines.push(`${escapeMeasurement(s.name)}${tags} value=${field} ${toNanoString(t)}`);
    }
  });
  return `${lines.join('\n')}\n`;
}
