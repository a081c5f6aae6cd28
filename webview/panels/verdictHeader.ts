import type { LibraryView, NearestIncidentView, VerdictView } from '../../extension/protocol';
import { el } from '../dom';
import { post } from '../vscodeApi';

/**
 * One nearest past incident: its label and similarity, then a button that opens what the entry
 * records — its postmortem, else its export — naming the path it opens. A native <button> takes
 * Enter/Space and clicks alike, and screen readers announce it as one. Items the host could not
 * tie to a library entry stay plain text.
 */
function renderNearest(n: NearestIncidentView): HTMLElement {
  const text = `${n.label} — similarity ${n.similarityText}`;
  if (!n.entryId || !n.opensKind || !n.opensPath) {
    return el('li', { text: `${text}${n.postmortem ? ` — postmortem ${n.postmortem}` : ''}` });
  }
  const entryId = n.entryId;
  const action = n.opensKind === 'postmortem' ? `postmortem ${n.opensPath}` : `export ${n.opensPath}`;
  const link = el('button', {
    className: 'library-link',
    text: n.opensKind === 'postmortem' ? `postmortem ${n.opensPath}` : `export ${n.opensPath} (no postmortem recorded)`,
    attrs: { type: 'button', 'data-entry-id': entryId, 'data-opens': n.opensKind, title: `Open the ${action}`, 'aria-label': `Open the ${action} of past incident ${n.label}` },
  });
  link.addEventListener('click', () => post({ type: 'openLibraryEntry', entryId }));
  return el('li', {}, [document.createTextNode(`${text} — `), link]);
}

/**
 * The team's incident library under the verdict: the match line (a library class won the blended
 * verdict) and the nearest past incidents, each opening its postmortem. Null when no library was used.
 */
function renderLibrary(library: LibraryView | undefined): HTMLElement | null {
  if (!library || (library.matchText === '' && library.nearest.length === 0)) return null;
  return el('section', { className: 'verdict-library', attrs: { 'aria-label': 'Incident library' } }, [
    library.matchText ? el('p', { className: 'verdict-library-match', text: library.matchText }) : null,
    library.movedAlikeText ? el('p', { className: 'verdict-library-moved', text: library.movedAlikeText }) : null,
    library.nearest.length ? el('p', { className: 'verdict-kicker', text: 'Similar past incidents' }) : null,
    library.nearest.length ? el('ul', { className: 'verdict-notes verdict-library-nearest' }, library.nearest.map(renderNearest)) : null,
  ]);
}

/**
 * The verdict as a person reads it under stress: the class (or "not sure"), the calibrated
 * probability with its estimative word, the runner-up, and the caution line — always shown.
 */
export function renderVerdictHeader(root: HTMLElement, verdict: VerdictView, notes: readonly string[], library?: LibraryView): void {
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
      renderLibrary(library),
      el('p', { className: 'verdict-caution', attrs: { role: 'note' }, text: verdict.caution }),
      notes.length ? el('ul', { className: 'verdict-notes', attrs: { 'aria-label': 'Data caveats and open questions' } }, notes.map((n) => el('li', { text: n }))) : null,
    ]),
  );
}
