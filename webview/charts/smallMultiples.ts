import type { SeriesGroupView } from '../../extension/protocol';
import { el } from '../dom';
import type { ChartRegistry } from './chartRegistry';

/**
 * One section per group (family × service/host), each a grid of small charts with the metric
 * name and labels as a heading; the canvas carries an aria-label, the numbers are in the table view.
 */
export function renderSmallMultiples(root: HTMLElement, groups: readonly SeriesGroupView[], charts: ChartRegistry): void {
  charts.removeWithin(root);
  root.replaceChildren();
  for (const group of groups) {
    const grid = el('div', { className: 'multiples-grid' });
    for (const series of group.series) {
      const canvas = el('canvas', { attrs: { role: 'img', 'aria-label': `${series.name} ${series.labelText}, ${series.sourcePointCount} points` } });
      const card = el('figure', { className: 'multiple', attrs: { 'data-series-id': series.id } }, [
        el('figcaption', {}, [
          el('span', { className: 'metric-name', text: series.name }),
          series.unit ? el('span', { className: 'metric-unit', text: ` (${series.unit})` }) : null,
          series.labelText ? el('span', { className: 'metric-labels', text: series.labelText }) : null,
        ]),
        el('div', { className: 'chart-box' }, [canvas]),
      ]);
      grid.append(card);
      charts.add(canvas, { label: series.name, timesMs: series.timesMs, valuesY: series.valuesY, showTimeTicks: false });
    }
    root.append(el('section', { className: 'group', attrs: { 'aria-label': group.title } }, [
      el('h3', { className: 'group-title', text: `${group.title} — ${group.series.length} series` }),
      grid,
    ]));
  }
}
