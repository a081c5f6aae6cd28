import type { ChartConfiguration } from 'chart.js';
import { buildLineChartConfig } from '../../extension/core/view/buildChartConfig';
import type { WindowRangeView } from '../../extension/protocol';
import { formatTickUtc } from '../dom';
import { readThemeColors } from '../theme';
import type { ViewState } from '../viewState';
import { Chart, createOverlayPlugin } from './chartSetup';

interface ChartSpec {
  readonly label: string;
  readonly timesMs: readonly number[];
  readonly valuesY: readonly (number | null)[];
  /** Fixed x range (contribution panels); undefined follows the page zoom. */
  readonly fixedViewMs?: WindowRangeView;
  readonly showTimeTicks: boolean;
}

/**
 * Creates charts lazily when their canvas scrolls into view (a 100-series export has 100
 * charts; drawing only the visible ones keeps first paint short) and redraws the live ones when
 * the windows, zoom or crosshair change. Pointer moves over any chart set the shared crosshair.
 */
export class ChartRegistry {
  readonly #charts = new Map<HTMLCanvasElement, Chart<'line'>>();
  readonly #specs = new Map<HTMLCanvasElement, ChartSpec>();
  readonly #observer: IntersectionObserver;
  readonly #overlay;
  #redrawQueued = false;

  constructor(private readonly state: ViewState, private readonly onFirstChart: () => void) {
    this.#overlay = createOverlayPlugin(state);
    this.#observer = new IntersectionObserver((entries) => {
      for (const entry of entries) if (entry.isIntersecting) this.#create(entry.target as HTMLCanvasElement);
    }, { rootMargin: '300px 0px' });
    state.onHover(() => this.#queueRedraw());
    state.onWindows(() => this.#queueRedraw());
    state.onView(() => this.#applyZoom());
  }

  /** Registers a canvas (inside a sized container) to hold a line chart once visible. */
  add(canvas: HTMLCanvasElement, spec: ChartSpec): void {
    this.#specs.set(canvas, spec);
    this.#observer.observe(canvas);
    canvas.addEventListener('pointermove', (event) => {
      const chart = this.#charts.get(canvas);
      if (chart) this.state.setHover(chart.scales.x.getValueForPixel(event.offsetX));
    });
    canvas.addEventListener('pointerleave', () => this.state.setHover(undefined));
  }

  /** Forgets every chart under `root` (before a section is rebuilt). */
  removeWithin(root: HTMLElement): void {
    for (const [canvas, chart] of this.#charts) {
      if (root.contains(canvas)) { chart.destroy(); this.#charts.delete(canvas); }
    }
    for (const canvas of this.#specs.keys()) {
      if (root.contains(canvas)) { this.#observer.unobserve(canvas); this.#specs.delete(canvas); }
    }
  }

  get liveChartCount(): number {
    return this.#charts.size;
  }

  #create(canvas: HTMLCanvasElement): void {
    const spec = this.#specs.get(canvas);
    if (!spec || this.#charts.has(canvas)) return;
    const colors = readThemeColors();
    const config = buildLineChartConfig({
      label: spec.label, timesMs: spec.timesMs, valuesY: spec.valuesY, viewMs: spec.fixedViewMs ?? this.state.viewMs,
      colors: { line: colors.line, grid: colors.grid, text: colors.muted }, showTimeTicks: spec.showTimeTicks,
    });
    // The pure builder returns chart.js's plain config shape; the cast only widens readonly arrays.
    const chartConfig = config as unknown as ChartConfiguration<'line'>;
    const ticks = chartConfig.options?.scales?.x?.ticks;
    if (ticks) {
      ticks.callback = function (value) {
        const scale = this as unknown as { min: number; max: number };
        return formatTickUtc(Number(value), scale.max - scale.min);
      };
    }
    const chart = new Chart(canvas, { ...chartConfig, plugins: [this.#overlay] });
    this.#charts.set(canvas, chart);
    if (this.#charts.size === 1) this.onFirstChart();
  }

  #queueRedraw(): void {
    if (this.#redrawQueued) return;
    this.#redrawQueued = true;
    requestAnimationFrame(() => {
      this.#redrawQueued = false;
      for (const chart of this.#charts.values()) chart.draw();
    });
  }

  #applyZoom(): void {
    for (const [canvas, chart] of this.#charts) {
      if (this.#specs.get(canvas)?.fixedViewMs) continue;
      const x = chart.options.scales?.x;
      if (x) { x.min = this.state.viewMs.startMs; x.max = this.state.viewMs.endMs; }
      chart.update('none');
    }
  }
}
