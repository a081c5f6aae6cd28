import '@vscode-elements/elements/dist/vscode-button/index.js';
import { assertNever, type ToWebview, type ViewerModel } from '../extension/protocol';
import { ChartRegistry } from './charts/chartRegistry';
import { renderSmallMultiples } from './charts/smallMultiples';
import { TimelineStrip } from './charts/timelineStrip';
import { WindowOverview } from './charts/windowOverview';
import { el } from './dom';
import { renderContributionPanels } from './panels/contributionPanels';
import { renderTableView } from './panels/tableView';
import { renderVerdictHeader } from './panels/verdictHeader';
import { post, readUiState, writeUiState } from './vscodeApi';
import { ViewState } from './viewState';

/** Pause after the last drag step before asking the host to re-classify. */
const RECLASSIFY_DEBOUNCE_MS = 350;

const state = new ViewState();
let isFirstPaintReported = false;
let reclassifyTimer: ReturnType<typeof setTimeout> | undefined;

const app = document.getElementById('app') as HTMLElement;
const verdictRoot = el('header', { className: 'verdict-root', attrs: { 'aria-live': 'polite' } });
const busy = el('p', { className: 'busy', attrs: { role: 'status' } });
const errorBox = el('p', { className: 'error', attrs: { role: 'alert' } });
const contributionsRoot = el('section', { className: 'contributions', attrs: { 'aria-label': 'Contributions' } });
const tableRoot = el('section', { className: 'table-view', attrs: { 'aria-label': 'Contributions as a table' } });
const multiplesRoot = el('section', { className: 'multiples', attrs: { 'aria-label': 'All series' } });

function markFirstPaint(): void {
  if (isFirstPaintReported) return;
  isFirstPaintReported = true;
  // Two frames: the first runs layout and chart draws, the second starts after they are painted.
  requestAnimationFrame(() => requestAnimationFrame(() => {
    performance.mark('triage:first-paint');
    const sinceInit = performance.measure('triage:init-to-first-paint', 'triage:init', 'triage:first-paint').duration;
    const sinceStart = performance.now();
    document.body.dataset.firstPaintMs = sinceInit.toFixed(1);
    document.body.dataset.pageToFirstPaintMs = sinceStart.toFixed(1);
    post({ type: 'reportTiming', name: 'initToFirstPaint', durationMs: sinceInit });
    post({ type: 'reportTiming', name: 'pageToFirstPaint', durationMs: sinceStart });
  }));
}

const charts = new ChartRegistry(state, markFirstPaint);
const overview = new WindowOverview(state, scheduleReclassify);
const timeline = new TimelineStrip(state);

function scheduleReclassify(): void {
  if (reclassifyTimer !== undefined) clearTimeout(reclassifyTimer);
  reclassifyTimer = setTimeout(() => {
    reclassifyTimer = undefined;
    post({ type: 'selectWindow', incident: state.incident, baseline: state.baseline });
  }, RECLASSIFY_DEBOUNCE_MS);
}

function button(label: string, onClick: () => void, attrs: Record<string, string> = {}): HTMLElement {
  const node = el('vscode-button', { text: label, attrs });
  node.addEventListener('click', onClick);
  return node;
}

function setTableView(isTable: boolean): void {
  document.body.classList.toggle('is-table-view', isTable);
  writeUiState({ ...readUiState(), isTableView: isTable });
}

function setZoom(viewMs: { startMs: number; endMs: number }): void {
  state.setView(viewMs);
  writeUiState({ ...readUiState(), viewMs });
}

function renderToolbar(model: ViewerModel): HTMLElement {
  const around = (): { startMs: number; endMs: number } => {
    const start = Math.min(state.baseline.startMs, state.incident.startMs);
    const end = Math.max(state.baseline.endMs, state.incident.endMs);
    const pad = (end - start) / 4;
    return { startMs: Math.max(model.rangeMs.startMs, start - pad), endMs: Math.min(model.rangeMs.endMs, end + pad) };
  };
  const insert = model.isTrusted
    ? button('Insert findings into postmortem', () => post({ type: 'requestInsert', findingId: state.model?.findingId ?? '' }), { id: 'insert-findings' })
    : el('span', { className: 'hint', text: 'Untrusted workspace: findings can be read here but not written.' });
  return el('nav', { className: 'toolbar', attrs: { 'aria-label': 'Viewer actions' } }, [
    insert,
    button('Zoom to windows', () => setZoom(around()), { secondary: '' }),
    button('Show whole export', () => setZoom(model.rangeMs), { secondary: '' }),
    button('Charts / table', () => setTableView(!document.body.classList.contains('is-table-view')), { secondary: '', id: 'toggle-table' }),
    el('span', { className: 'meta', text: `${model.fileName} · model ${model.modelVersion}` }),
  ]);
}

function showInit(model: ViewerModel): void {
  performance.mark('triage:init');
  const ui = readUiState();
  state.init(model, ui.viewMs);
  app.replaceChildren(
    verdictRoot, renderToolbar(model), busy, errorBox, overview.element, timeline.element,
    contributionsRoot, tableRoot,
    el('h2', { className: 'section-title', text: `All series — ${model.groups.reduce((n, g) => n + g.series.length, 0)} in ${model.groups.length} groups` }),
    multiplesRoot,
  );
  app.setAttribute('aria-busy', 'false');
  document.body.classList.toggle('is-table-view', ui.isTableView === true);
  renderVerdictHeader(verdictRoot, model.verdict, model.notes, model.library);
  overview.draw();
  timeline.setTimeline(model.timeline);
  renderContributionPanels(contributionsRoot, model.contributions, state, charts);
  renderTableView(tableRoot, model.contributions);
  renderSmallMultiples(multiplesRoot, model.groups, charts);
  if (model.groups.length === 0 && model.contributions.length === 0) markFirstPaint();
}

function onMessage(message: ToWebview): void {
  switch (message.type) {
    case 'init':
      showInit(message.model);
      return;
    case 'update':
      state.applyUpdate(message.update);
      errorBox.textContent = '';
      renderVerdictHeader(verdictRoot, message.update.verdict, message.update.notes, message.update.library);
      renderContributionPanels(contributionsRoot, message.update.contributions, state, charts);
      renderTableView(tableRoot, message.update.contributions);
      document.body.dataset.updateCount = String(Number(document.body.dataset.updateCount ?? '0') + 1);
      return;
    case 'libraryUpdate':
      // Only the verdict header changes: the library moved the blend, not the windows or the charts.
      if (state.model) state.model = { ...state.model, verdict: message.update.verdict, notes: message.update.notes, library: message.update.library };
      errorBox.textContent = '';
      renderVerdictHeader(verdictRoot, message.update.verdict, message.update.notes, message.update.library);
      document.body.dataset.libraryUpdateCount = String(Number(document.body.dataset.libraryUpdateCount ?? '0') + 1);
      return;
    case 'busy':
      busy.textContent = message.isBusy ? message.message : '';
      document.body.classList.toggle('is-busy', message.isBusy);
      return;
    case 'showError':
      errorBox.textContent = message.message;
      // Before the first model arrives the page only holds the loading line: show the error there.
      if (!state.model) { app.replaceChildren(errorBox); app.setAttribute('aria-busy', 'false'); }
      return;
    default:
      assertNever(message);
  }
}

window.addEventListener('message', (event: MessageEvent<ToWebview>) => onMessage(event.data));
post({ type: 'ready' });
