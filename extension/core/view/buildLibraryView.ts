import type { Finding } from '../report/types';
import type { LibraryView } from './types';

/**
 * The incident library's part of the verdict header: the match line when a library class won the
 * blended verdict, and the nearest past incidents with their postmortems. Returns undefined when
 * the finding was made without a library (no `nearestIncidents` and no match), so the header
 * stays as it was. A non-finite similarity is shown as "n/a" rather than "NaN".
 */
export function buildLibraryView(finding: Finding): LibraryView | undefined {
  const match = finding.verdict.libraryMatch;
  const nearest = finding.nearestIncidents;
  if (!match && nearest === undefined) return undefined;
  const examples = match ? `${match.exampleCount} example${match.exampleCount === 1 ? '' : 's'}` : '';
  return {
    matchText: match ? `Matches your past incident ${match.label} (${examples})` : '',
    nearest: (nearest ?? []).map((n) => ({
      label: n.label,
      similarityText: Number.isFinite(n.similarity) ? n.similarity.toPrecision(3) : 'n/a',
      postmortem: n.postmortem ?? '',
    })),
  };
}
