/** Display titles of the built-in classes; library labels are shown as written. */
const CLASS_TITLES: Readonly<Record<string, string>> = {
  normal: 'No fault pattern',
  cpu_saturation: 'CPU saturation',
  memory_leak: 'Memory leak',
  disk_io_saturation: 'Disk I/O saturation',
  network_latency: 'Network latency',
  packet_loss: 'Packet loss',
  traffic_surge: 'Traffic surge',
  error_storm: 'Error storm',
};

/** The caution every surface carries: the classifier suggests, people conclude. */
export const CAUTION_TEXT = 'Decision aid — not a root cause. Confirm against logs, traces and the timeline.';

/** Human title of a class name; unknown names (library labels) come back with `_` as spaces. */
export function formatClassTitle(className: string): string {
  return CLASS_TITLES[className] ?? className.replace(/_/g, ' ');
}

/** `0.873` → `87%`; values below 1% show one decimal; NaN → `n/a`. */
export function formatPercent(probability: number): string {
  if (!Number.isFinite(probability)) return 'n/a';
  const percent = probability * 100;
  return percent > 0 && percent < 1 ? `${percent.toFixed(1)}%` : `${Math.round(percent)}%`;
}

/**
 * A measured value with up to 3 significant digits and its unit: `1234.5, 'ms'` → `1.23k ms`.
 * Uses SI prefixes k/M/G/T for large magnitudes (BIPM SI Brochure, 9th ed., table 7);
 * NaN → `gap`, ±Infinity → `∞` / `−∞`, an empty unit adds nothing.
 */
export function formatValue(value: number, unit = ''): string {
  if (Number.isNaN(value)) return 'gap';
  if (!Number.isFinite(value)) return value > 0 ? '∞' : '−∞';
  const prefixes: ReadonlyArray<readonly [number, string]> = [[1e12, 'T'], [1e9, 'G'], [1e6, 'M'], [1e3, 'k']];
  const magnitude = Math.abs(value);
  let text = '';
  for (const [scale, prefix] of prefixes) {
    if (magnitude >= scale) { text = `${trimNumber(value / scale)}${prefix}`; break; }
  }
  if (text === '') text = trimNumber(value);
  return unit ? `${text} ${unit}` : text;
}

function trimNumber(value: number): string {
  if (value === 0) return '0';
  return String(Number(value.toPrecision(3)));
}

/** Epoch ms → RFC 3339 UTC with `Z` and no fractional seconds unless present: `2026-01-02T03:04:05Z`. */
export function formatRfc3339(timeMs: number): string {
  if (!Number.isFinite(timeMs)) return 'invalid time';
  const iso = new Date(timeMs).toISOString();
  return iso.endsWith('.000Z') ? `${iso.slice(0, 19)}Z` : iso;
}

/**
 * Cliff's δ in words, using the thresholds of Romano et al. (2006): |δ| < 0.147 negligible,
 * < 0.33 small, < 0.474 medium, otherwise large. The sign says the direction (during vs before).
 */
export function describeCliffsDelta(delta: number): string {
  if (!Number.isFinite(delta)) return 'not computable';
  const size = Math.abs(delta);
  const word = size < 0.147 ? 'negligible' : size < 0.33 ? 'small' : size < 0.474 ? 'medium' : 'large';
  if (word === 'negligible') return `negligible (δ ${formatSigned(delta)})`;
  return `${word} ${delta > 0 ? 'rise' : 'drop'} (δ ${formatSigned(delta)})`;
}

function formatSigned(value: number): string {
  const text = Math.abs(value).toFixed(2);
  return value < 0 ? `−${text}` : `+${text}`;
}

/** `{service: 'basket-api', host: 'a'}` → `host=a, service=basket-api` (keys sorted for stable text). */
export function formatLabels(labels: Readonly<Record<string, string>>): string {
  return Object.keys(labels).sort().map((key) => `${key}=${labels[key]}`).join(', ');
}
