import type { TimelineView } from '../../extension/protocol';
import { el } from '../dom';
import { readThemeColors, withAlpha } from '../theme';
import type { ViewState } from '../viewState';

const ROW_PX = 12;
const LABEL_PX = 150;

/**
 * Class probabilities across the whole export: one row per class, opacity = probability.
 * The shared crosshair is drawn over it; the caption says where the incident class peaks.
 */
export class TimelineStrip {
  readonly element: HTMLElement;
  readonly #canvas = el('canvas', { className: 'timeline-canvas', attrs: { role: 'img' } });
  #timeline: TimelineView | undefined;

  constructor(private readonly state: ViewState) {
    this.element = el('section', { className: 'timeline', attrs: { 'aria-label': 'Class probabilities over time' } }, [
      el('h2', { className: 'section-title', text: 'Class probabilities over time' }), this.#canvas,
    ]);
    new ResizeObserver(() => this.draw()).observe(this.#canvas);
    state.onHover(() => this.draw());
    state.onWindows(() => this.draw());
  }

  setTimeline(timeline: TimelineView): void {
    this.#timeline = timeline;
    this.#canvas.setAttribute('aria-label', `Probability of ${timeline.classTitles.join(', ')} across ${timeline.timesMs.length} time steps; exact numbers are in the table view.`);
    this.draw();
  }

  draw(): void {
    const timeline = this.#timeline;
    const bounds = this.state.model?.rangeMs;
    if (!timeline || !bounds) return;
    const ratio = window.devicePixelRatio || 1;
    const width = this.#canvas.clientWidth;
    const height = Math.max(ROW_PX, timeline.classNames.length * ROW_PX);
    this.#canvas.width = Math.round(width * ratio);
    this.#canvas.height = Math.round(height * ratio);
    this.#canvas.style.height = `${height}px`;
    const ctx = this.#canvas.getContext('2d');
    if (!ctx) return;
    ctx.scale(ratio, ratio);
    const colors = readThemeColors();
    const plotWidth = Math.max(1, width - LABEL_PX);
    const span = Math.max(1, bounds.endMs - bounds.startMs);
    const toX = (t: number): number => LABEL_PX + ((t - bounds.startMs) / span) * plotWidth;
    ctx.font = '10px sans-serif';
    ctx.textBaseline = 'middle';
    timeline.classNames.forEach((_, c) => {
      const y = c * ROW_PX;
      ctx.fillStyle = colors.foreground;
      ctx.fillText(timeline.classTitles[c], 2, y + ROW_PX / 2);
      const color = colors.classes[c % colors.classes.length];
      timeline.timesMs.forEach((t, i) => {
        const p = timeline.probabilities[c][i];
        if (p === null) return;
        const x = toX(t);
        const next = i + 1 < timeline.timesMs.length ? toX(timeline.timesMs[i + 1]) : LABEL_PX + plotWidth;
        ctx.fillStyle = withAlpha(color, Math.max(0.04, p));
        ctx.fillRect(x, y + 1, Math.max(1, next - x), ROW_PX - 2);
      });
    });
    ctx.strokeStyle = colors.incident;
    const left = toX(this.state.incident.startMs);
    ctx.strokeRect(left, 0.5, Math.max(2, toX(this.state.incident.endMs) - left), height - 1);
    if (this.state.hoverMs !== undefined) {
      ctx.strokeStyle = colors.crosshair;
      ctx.beginPath();
      ctx.moveTo(toX(this.state.hoverMs), 0);
      ctx.lineTo(toX(this.state.hoverMs), height);
      ctx.stroke();
    }
  }
}
