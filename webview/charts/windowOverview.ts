import { dragWindow } from '../../extension/core/view/buildChartConfig';
import type { WindowRangeView } from '../../extension/protocol';
import { el, formatShortUtc } from '../dom';
import { readThemeColors, withAlpha } from '../theme';
import type { ViewState } from '../viewState';

type WindowName = 'incident' | 'baseline';
type Edge = 'move' | 'start' | 'end';

const EDGE_PX = 7;
const HEIGHT_PX = 46;

/**
 * The whole export as one bar with the baseline and incident windows on it. Drag a window to
 * move it, drag its edge to resize; keyboard: focus the bar, `I`/`B` pick the window, arrows
 * move it one step (Shift: resize its end). `onCommit` fires after each change (the caller debounces).
 */
export class WindowOverview {
  readonly element: HTMLElement;
  readonly #canvas = el('canvas', { className: 'overview-canvas', attrs: { tabindex: '0', role: 'group' } });
  readonly #status = el('p', { className: 'overview-status', attrs: { 'aria-live': 'polite' } });
  #active: WindowName = 'incident';
  #drag: { name: WindowName; edge: Edge; startX: number; original: WindowRangeView } | undefined;

  constructor(private readonly state: ViewState, private readonly onCommit: () => void) {
    this.element = el('section', { className: 'overview', attrs: { 'aria-label': 'Incident and baseline windows' } }, [
      el('h2', { className: 'section-title', text: 'Windows' }),
      el('p', { className: 'hint', text: 'Drag a window or its edges to re-classify. Keyboard: I / B choose the window, ← → move it, Shift+← → resize it.' }),
      this.#canvas, this.#status,
    ]);
    this.#canvas.addEventListener('pointerdown', (e) => this.#onPointerDown(e));
    this.#canvas.addEventListener('pointermove', (e) => this.#onPointerMove(e));
    this.#canvas.addEventListener('pointerup', (e) => this.#onPointerUp(e));
    this.#canvas.addEventListener('keydown', (e) => this.#onKey(e));
    new ResizeObserver(() => this.draw()).observe(this.#canvas);
    state.onWindows(() => this.draw());
  }

  #bounds(): WindowRangeView {
    return this.state.model?.rangeMs ?? { startMs: 0, endMs: 1 };
  }

  #toPx(timeMs: number): number {
    const b = this.#bounds();
    return ((timeMs - b.startMs) / Math.max(1, b.endMs - b.startMs)) * this.#canvas.clientWidth;
  }

  #msPerPx(): number {
    const b = this.#bounds();
    return (b.endMs - b.startMs) / Math.max(1, this.#canvas.clientWidth);
  }

  #hit(x: number): { name: WindowName; edge: Edge } | undefined {
    for (const name of ['incident', 'baseline'] as const) {
      const w = this.state[name];
      const left = this.#toPx(w.startMs);
      const right = this.#toPx(w.endMs);
      if (Math.abs(x - left) <= EDGE_PX) return { name, edge: 'start' };
      if (Math.abs(x - right) <= EDGE_PX) return { name, edge: 'end' };
      if (x > left && x < right) return { name, edge: 'move' };
    }
    return undefined;
  }

  #onPointerDown(event: PointerEvent): void {
    const hit = this.#hit(event.offsetX);
    if (!hit) return;
    this.#active = hit.name;
    this.#drag = { ...hit, startX: event.offsetX, original: this.state[hit.name] };
    this.#canvas.setPointerCapture(event.pointerId);
  }

  #onPointerMove(event: PointerEvent): void {
    if (!this.#drag) {
      const hit = this.#hit(event.offsetX);
      this.#canvas.style.cursor = !hit ? 'default' : hit.edge === 'move' ? 'grab' : 'ew-resize';
      return;
    }
    const moved = dragWindow(this.#drag.original, this.#drag.edge, (event.offsetX - this.#drag.startX) * this.#msPerPx(), this.#bounds(), this.state.model?.stepMs ?? 1);
    this.#set(this.#drag.name, moved);
  }

  #onPointerUp(event: PointerEvent): void {
    if (!this.#drag) return;
    this.#drag = undefined;
    this.#canvas.releasePointerCapture(event.pointerId);
    this.onCommit();
  }

  #onKey(event: KeyboardEvent): void {
    const key = event.key.toLowerCase();
    if (key === 'i' || key === 'b') { this.#active = key === 'i' ? 'incident' : 'baseline'; this.draw(); return; }
    if (event.key !== 'ArrowLeft' && event.key !== 'ArrowRight') return;
    event.preventDefault();
    const step = (this.state.model?.stepMs ?? 1) * (event.key === 'ArrowLeft' ? -1 : 1);
    this.#set(this.#active, dragWindow(this.state[this.#active], event.shiftKey ? 'end' : 'move', step, this.#bounds(), this.state.model?.stepMs ?? 1));
    this.onCommit();
  }

  #set(name: WindowName, range: WindowRangeView): void {
    if (name === 'incident') this.state.setWindows(range, this.state.baseline);
    else this.state.setWindows(this.state.incident, range);
  }

  /** Redraws the bar; also refreshes the text that screen readers announce. */
  draw(): void {
    const canvas = this.#canvas;
    const ratio = window.devicePixelRatio || 1;
    const width = canvas.clientWidth;
    canvas.width = Math.round(width * ratio);
    canvas.height = Math.round(HEIGHT_PX * ratio);
    const ctx = canvas.getContext('2d');
    if (!ctx) return;
    ctx.scale(ratio, ratio);
    const colors = readThemeColors();
    ctx.strokeStyle = colors.grid;
    ctx.strokeRect(0.5, 0.5, width - 1, HEIGHT_PX - 14);
    for (const name of ['baseline', 'incident'] as const) {
      const w = this.state[name];
      const color = name === 'incident' ? colors.incident : colors.baseline;
      const left = this.#toPx(w.startMs);
      const right = Math.max(left + 2, this.#toPx(w.endMs));
      ctx.fillStyle = withAlpha(color, name === this.#active ? 0.45 : 0.28);
      ctx.fillRect(left, 1, right - left, HEIGHT_PX - 16);
      ctx.fillStyle = color;
      ctx.fillRect(left, 1, 2, HEIGHT_PX - 16);
      ctx.fillRect(right - 2, 1, 2, HEIGHT_PX - 16);
      // Positions in CSS px, for the screen tests that drag the window like a person would.
      canvas.dataset[`${name}LeftPx`] = left.toFixed(1);
      canvas.dataset[`${name}RightPx`] = right.toFixed(1);
    }
    ctx.fillStyle = colors.muted;
    ctx.font = '11px sans-serif';
    const b = this.#bounds();
    ctx.textAlign = 'left';
    ctx.fillText(formatShortUtc(b.startMs), 2, HEIGHT_PX - 2);
    ctx.textAlign = 'right';
    ctx.fillText(formatShortUtc(b.endMs), width - 2, HEIGHT_PX - 2);
    const text = `Incident ${formatShortUtc(this.state.incident.startMs)} – ${formatShortUtc(this.state.incident.endMs)}; baseline ${formatShortUtc(this.state.baseline.startMs)} – ${formatShortUtc(this.state.baseline.endMs)}. Active: ${this.#active}.`;
    this.#status.textContent = text;
    canvas.setAttribute('aria-label', `Window bar. ${text}`);
  }
}
