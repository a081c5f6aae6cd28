import type { ContributionView } from '../../extension/protocol';
import { el } from '../dom';

const COLUMNS = ['Rank', 'Metric', 'Labels', 'Family', 'Shapley ± 95% CI', 'Before (median)', 'During (median)', 'Effect (Cliff\'s δ)'];

/** The same numbers as the panels, as a real table (screen readers, copy into a document). */
export function renderTableView(root: HTMLElement, panels: readonly ContributionView[]): void {
  const head = el('thead', {}, [el('tr', {}, COLUMNS.map((c) => el('th', { text: c, attrs: { scope: 'col' } })))]);
  const body = el('tbody', {}, panels.map((p) => el('tr', {}, [
    el('td', { text: String(p.rank) }),
    el('th', { text: p.name, attrs: { scope: 'row' } }),
    el('td', { text: p.labelText }),
    el('td', { text: p.family }),
    el('td', { text: p.shapleyText, className: 'num' }),
    el('td', { text: p.baselineMedianText, className: 'num' }),
    el('td', { text: p.incidentMedianText, className: 'num' }),
    el('td', { text: p.effectText }),
  ])));
  root.replaceChildren(el('table', { className: 'numbers-table' }, [
    el('caption', { text: 'Per-metric contributions to the verdict (decision aid — not a root cause)' }), head, body,
  ]));
}
