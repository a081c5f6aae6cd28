import type { WindowRangeView } from './types';

/** Theme colours read from the webview's CSS variables (`--vscode-*`), passed in as strings. */
export interface ChartColors {
  readonly line: string;
  readonly grid: string;
  readonly text: string;
}

/** The subset of a chart.js line config this project builds; plain data, no chart.js import. */
export interface LineChartConfig {
  readonly type: 'line';
  readonly data: {
    readonly datasets: readonly {
      readonly label: string;
      readonly data: readonly { readonly x: number; readonly y: number | null }[];
      readonly borderColor: string;
      readonly borderWidth: number;
      readonly pointRadius: number;
      readonly spanGaps: boolean;
      readonly tension: number;
    }[];
  };
  readonly options: {
    readonly animation: false;
    readonly parsing: false;
    readonly normalized: true;
    readonly responsive: true;
    readonly maintainAspectRatio: false;
    readonly events: readonly string[];
    readonly plugins: { readonly legend: { readonly display: false }; readonly tooltip: { readonly enabled: false } };
    readonly scales: {
      readonly x: { readonly type: 'linear'; readonly min: number; readonly max: number; readonly ticks: { readonly display: boolean; readonly color: string; readonly maxTicksLimit: number }; readonly grid: { readonly color: string } };
      readonly y: { readonly ticks: { readonly color: string; readonly maxTicksLimit: number }; readonly grid: { readonly color: string } };
    };
  };
}

/**
 * A chart.js line config for one small multiple. Data are {x: epoch ms, y} points, already
 * decimated; `parsing: false` + `normalized: true` tell chart.js the data are sorted and in its
 * internal format, the fast path for large series. Gaps (null) break the line (`spanGaps: false`),
 * so missing data are never drawn as a trend. `viewMs` sets the visible x range (zoom).
 * Mismatched array lengths throw (programmer error).
 */
export function buildLineChartConfig(input: {
  readonly label: string;
  readonly timesMs: readonly number[];
  readonly valuesY: readonly (number | null)[];
  readonly viewMs: WindowRangeView;
  readonly colors: ChartColors;
  readonly showTimeTicks: boolean;
}): LineChartConfig {
  if (input.timesMs.length !== input.valuesY.length) {
    throw new Error(`expected as many values as times, got ${input.valuesY.length} values for ${input.timesMs.length} times`);
  }
  const points = input.timesMs.map((x, i) => ({ x, y: input.valuesY[i] }));
  return {
    type: 'line',
    data: {
      datasets: [{ label: input.label, data: points, borderColor: input.colors.line, borderWidth: 1.25, pointRadius: 0, spanGaps: false, tension: 0 }],
    },
    options: {
      animation: false,
      parsing: false,
      normalized: true,
      responsive: true,
      maintainAspectRatio: false,
      events: ['mousemove', 'mouseout'],
      plugins: { legend: { display: false }, tooltip: { enabled: false } },
      scales: {
        x: {
          type: 'linear', min: input.viewMs.startMs, max: input.viewMs.endMs,
          ticks: { display: input.showTimeTicks, color: input.colors.text, maxTicksLimit: 6 },
          grid: { color: input.colors.grid },
        },
        y: { ticks: { color: input.colors.text, maxTicksLimit: 3 }, grid: { color: input.colors.grid } },
      },
    },
  };
}

/**
 * Moves or resizes a window by a drag of `deltaMs`: 'move' shifts both ends, 'start'/'end'
 * move one edge. The result stays inside `boundsMs` and keeps at least `minSpanMs` (one grid
 * step) between its ends; a move that would leave the bounds stops at the edge, keeping width.
 */
export function dragWindow(
  window: WindowRangeView,
  edge: 'move' | 'start' | 'end',
  deltaMs: number,
  boundsMs: WindowRangeView,
  minSpanMs: number,
): WindowRangeView {
  const delta = Number.isFinite(deltaMs) ? deltaMs : 0;
  if (edge === 'move') {
    const width = window.endMs - window.startMs;
    const startMs = Math.min(Math.max(window.startMs + delta, boundsMs.startMs), boundsMs.endMs - width);
    return { startMs, endMs: startMs + width };
  }
  if (edge === 'start') {
    const startMs = Math.min(Math.max(window.startMs + delta, boundsMs.startMs), window.endMs - minSpanMs);
    return { startMs, endMs: window.endMs };
  }
  const endMs = Math.max(Math.min(window.endMs + delta, boundsMs.endMs), window.startMs + minSpanMs);
  return { startMs: window.startMs, endMs };
}
