import type { ContributionView, WindowRangeView } from '../../extension/protocol';
import type { ChartRegistry } from '../charts/chartRegistry';
import { el } from '../dom';

const INITIAL_PANEL_COUNT = 12;

/** Shapley bar: the value as a bar from a centre line, the 95% CI as a whisker; widths via CSSOM. */
function renderShapleyBar(panel: ContributionView, maxAbs: number): HTMLElement {
  const scale = (v: number): number => (Math.abs(v) / Math.max(1e-12, maxAbs)) * 50;
  const bar = el('span', { className: `shapley-bar ${panel.shapley >= 0 ? 'is-positive' : 'is-negative'}` });
  bar.style.width = `${scale(panel.shapley)}%`;
  bar.style.left = panel.shapley >= 0 ? '50%' : `${50 - scale(panel.shapley)}%`;
  const whisker = el('span', { className: 'shapley-ci' });
  const centre = 50 + Math.sign(panel.shapley) * scale(panel.shapley);
  whisker.style.left = `${Math.max(0, centre - scale(panel.shapleyCi95))}%`;
  whisker.style.width = `${Math.min(100, 2 * scale(panel.shapleyCi95))}%`;
  return el('span', { className: 'shapley-track', attrs: { role: 'img', 'aria-label': `Shapley ${panel.shapleyText}` } }, [bar, whisker]);
}

/**
 * One panel per metric in Shapley order: its chart zoomed on the windows, before → during
 * medians, effect size in words and the Shapley bar with CI.
 */
export function renderContributionPanels(
  root: HTMLElement,
  allPanels: readonly ContributionView[],
  windows: { incident: WindowRangeView; baseline: WindowRangeView },
  charts: ChartRegistry,
  isShowingAll = false,
): void {
  charts.removeWithin(root);
  // The strongest few carry the verdict; the rest stay one click away (and in the table view).
  const panels = isShowingAll ? allPanels : allPanels.slice(0, INITIAL_PANEL_COUNT);
  const maxAbs = Math.max(...panels.map((p) => Math.abs(p.shapley) + p.shapleyCi95), 1e-9);
  const list = el('ol', { className: 'contribution-list' });
  for (const panel of panels) {
    const canvas = el('canvas', { attrs: { role: 'img', 'aria-label': `${panel.name} around the windows` } });
    const fixedViewMs = panel.timesMs.length
      ? { startMs: panel.timesMs[0], endMs: panel.timesMs[panel.timesMs.length - 1] }
      : { startMs: Math.min(windows.baseline.startMs, windows.incident.startMs), endMs: windows.incident.endMs };
    list.append(el('li', { className: 'contribution', attrs: { 'data-metric-id': panel.id } }, [
      el('header', {}, [
        el('span', { className: 'contribution-rank', text: `#${panel.rank}` }),
        el('span', { className: 'metric-name', text: panel.name }),
        panel.labelText ? el('span', { className: 'metric-labels', text: panel.labelText }) : null,
        el('span', { className: 'family-tag', text: panel.family }),
      ]),
      el('div', { className: 'chart-box is-tall' }, [canvas]),
      el('dl', { className: 'contribution-numbers' }, [
        el('dt', { text: 'Before → during' }), el('dd', { text: `${panel.baselineMedianText} → ${panel.incidentMedianText}` }),
        el('dt', { text: 'Effect' }), el('dd', { text: panel.effectText }),
        el('dt', { text: 'Shapley (95% CI)' }), el('dd', {}, [renderShapleyBar(panel, maxAbs), el('span', { className: 'shapley-text', text: panel.shapleyText })]),
      ]),
    ]));
    charts.add(canvas, { label: panel.name, timesMs: panel.timesMs, valuesY: panel.valuesY, fixedViewMs, showTimeTicks: true });
  }
  const more = allPanels.length > panels.length ? el('button', { className: 'show-all', text: `Show all ${allPanels.length} metrics` }) : null;
  more?.addEventListener('click', () => renderContributionPanels(root, allPanels, windows, charts, true));
  root.replaceChildren(el('h2', { className: 'section-title', text: `What carries the verdict — ${allPanels.length} metrics by Shapley value` }), list, ...(more ? [more] : []));
}
