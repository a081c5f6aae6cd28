import type { VerdictView } from '../../extension/protocol';
import { el } from '../dom';

/**
 * The verdict as a person reads it under stress: the class (or "not sure"), the calibrated
 * probability with its estimative word, the runner-up, and the caution line — always shown.
 */
export function renderVerdictHeader(root: HTMLElement, verdict: VerdictView, notes: readonly string[]): void {
  const probability = el('span', { className: 'verdict-probability', text: verdict.probabilityText });
  root.replaceChildren(
    el('div', { className: `verdict ${verdict.isAbstained ? 'is-abstained' : ''}`, attrs: { 'data-class': verdict.className } }, [
      el('p', { className: 'verdict-kicker', text: verdict.isAbstained ? 'Classifier abstains' : 'Metrics most resemble' }),
      el('h1', { className: 'verdict-title', attrs: { id: 'verdict-title' }, text: verdict.title }),
      el('p', { className: 'verdict-detail' }, [
        verdict.isAbstained ? null : probability,
        verdict.isAbstained ? null : document.createTextNode(` calibrated probability (${verdict.estimativeWord}). `),
        document.createTextNode(`Runner-up: ${verdict.runnerUpTitle} ${verdict.runnerUpProbabilityText}.`),
        verdict.isAbstained && verdict.abstainReason ? document.createTextNode(` Reason: ${verdict.abstainReason}.`) : null,
      ]),
      el('p', { className: 'verdict-caution', attrs: { role: 'note' }, text: verdict.caution }),
      notes.length ? el('ul', { className: 'verdict-notes', attrs: { 'aria-label': 'Data caveats and open questions' } }, notes.map((n) => el('li', { text: n }))) : null,
    ]),
  );
}
