import type { NearestIncident } from '../model/libraryVerdict';
import type { Finding } from '../report/types';
import type { LibraryView, NearestIncidentView } from './types';
import { countExamples, formatMover } from '../report/libraryWording';

function formatSimilarity(similarity: number): string {
  return Number.isFinite(similarity) ? similarity.toPrecision(3) : 'n/a';
}

/**
 * One nearest incident that the viewer can open: its postmortem when the entry records one, else
 * the export file the window was taken from (every entry records that), so a link always leads
 * somewhere. An empty postmortem string counts as none.
 */
export function buildNearestIncidentLink(incident: NearestIncident): NearestIncidentView {
  const postmortem = incident.postmortem ?? '';
  return {
    label: incident.label,
    similarityText: formatSimilarity(incident.cosineSimilarity),
    postmortem,
    entryId: incident.id,
    opensKind: postmortem !== '' ? 'postmortem' : 'export',
    opensPath: postmortem !== '' ? postmortem : incident.exportFile,
  };
}

/**
 * The incident library's part of the verdict header: the match line when a library class won the
 * blended verdict, and the nearest past incidents with their postmortems. Returns undefined when
 * the finding was made without a library (no `nearestIncidents` and no match), so the header
 * stays as it was. A non-finite similarity is shown as "n/a" rather than "NaN".
 *
 * `linked`: the same nearest incidents as library entries (ids, export files), when the host has
 * them; they replace the finding's list and make each item openable (see buildNearestIncidentLink).
 * Without it the items carry no entry id and are shown as plain text.
 */
export function buildLibraryView(finding: Finding, linked?: readonly NearestIncident[]): LibraryView | undefined {
  const match = finding.verdict.libraryMatch;
  const nearest = finding.nearestIncidents;
  if (!match && nearest === undefined && linked === undefined) return undefined;
  const examples = match ? countExamples(match.exampleCount) : '';
  return {
    matchText: match ? `Matches your past incident ${match.label} (${examples})` : '',
    movedAlikeText: match?.movedAlike?.length ? `Moved alike here and in those incidents: ${match.movedAlike.map((m) => formatMover(m)).join(', ')}` : '',
    nearest: linked !== undefined
      ? linked.map(buildNearestIncidentLink)
      : (nearest ?? []).map((n) => ({ label: n.label, similarityText: formatSimilarity(n.similarity), postmortem: n.postmortem ?? '' })),
  };
}
