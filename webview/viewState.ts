import type { AnalysisUpdateView, ViewerModel, WindowRangeView } from '../extension/protocol';

type Listener = () => void;

/**
 * Mutable state of the page, in one place: the model from the host, the windows as the user is
 * dragging them, the zoom and the shared crosshair time. Views subscribe to the part they draw.
 */
export class ViewState {
  model: ViewerModel | undefined;
  incident: WindowRangeView = { startMs: 0, endMs: 0 };
  baseline: WindowRangeView = { startMs: 0, endMs: 0 };
  viewMs: WindowRangeView = { startMs: 0, endMs: 0 };
  hoverMs: number | undefined;
  readonly #windowListeners: Listener[] = [];
  readonly #viewListeners: Listener[] = [];
  readonly #hoverListeners: Listener[] = [];

  init(model: ViewerModel, viewMs: WindowRangeView | undefined): void {
    this.model = model;
    this.incident = model.incident;
    this.baseline = model.baseline;
    this.viewMs = viewMs && viewMs.startMs >= model.rangeMs.startMs && viewMs.endMs <= model.rangeMs.endMs ? viewMs : model.rangeMs;
  }

  applyUpdate(update: AnalysisUpdateView): void {
    if (!this.model) return;
    this.model = { ...this.model, ...update };
    this.incident = update.incident;
    this.baseline = update.baseline;
    this.#emit(this.#windowListeners);
  }

  setWindows(incident: WindowRangeView, baseline: WindowRangeView): void {
    this.incident = incident;
    this.baseline = baseline;
    this.#emit(this.#windowListeners);
  }

  setView(viewMs: WindowRangeView): void {
    this.viewMs = viewMs;
    this.#emit(this.#viewListeners);
  }

  setHover(timeMs: number | undefined): void {
    if (timeMs === this.hoverMs) return;
    this.hoverMs = timeMs;
    this.#emit(this.#hoverListeners);
  }

  onWindows(listener: Listener): void { this.#windowListeners.push(listener); }
  onView(listener: Listener): void { this.#viewListeners.push(listener); }
  onHover(listener: Listener): void { this.#hoverListeners.push(listener); }

  #emit(listeners: readonly Listener[]): void {
    for (const listener of listeners) listener();
  }
}
