/**
 * Re-blend an analysed window with the incident library as it is now, without re-analysing the
 * export: the bundled head's answer (kept from the analysis) is blended again with the library's
 * current entries, exactly as the analysis facade blends it. Pure (no vscode, no fs), so the
 * viewers' refresh on a library change is unit-tested under plain Node.
 */
import type { MetricFrame } from '../core/frame/types';
import type { WindowVerdict } from '../core/model/classifier';
import { matchLibrary } from '../core/model/libraryMatch';
import type { LibraryEntry } from '../core/model/libraryTypes';
import type { NearestIncident } from '../core/model/libraryVerdict';
import { buildFinding } from '../core/report/buildFinding';
import type { Finding, MetricEffect, VerdictSummary } from '../core/report/types';

/** The bundled classifier's own answer for one window, before any library blend. */
export interface BaseVerdict {
  /** The verdict as the analysis states it without a library (abstain state included). */
  readonly summary: VerdictSummary;
  readonly embedding: ArrayLike<number>;
  /** Library model version (spec version + ONNX sha256) an entry must carry to be compared. */
  readonly modelVersion: string;
  /** Abstain below this blended probability (the analysis' setting). */
  readonly abstainThreshold: number;
}

/** A finding re-blended with the current library. */
export interface ReblendedFinding {
  readonly finding: Finding;
  /** Nearest entries (ids and export files, for links), nearest first; empty without a library. */
  readonly nearest: readonly NearestIncident[];
  readonly staleEntryCount: number;
}

/** Marks the caveat the analysis adds for entries of another model version (same wording). */
const STALE_CAVEAT = /^\d+ incident-library entries were embedded by another model version/;

function formatStaleCaveat(count: number): string {
  return `${count} incident-library entries were embedded by another model version and were left out; re-embed the library.`;
}

/**
 * The classifier's verdict as the analysis summarises it before the library: class, calibrated
 * probability, runner-up, abstain state and the probability of every class by name.
 * Throws when `classNames` and the verdict's probabilities differ in length (programmer error).
 */
export function toBaseVerdict(verdict: WindowVerdict, classNames: readonly string[], modelVersion: string, abstainThreshold: number): BaseVerdict {
  if (classNames.length !== verdict.probabilities.length) {
    throw new Error(`expected ${classNames.length} class probabilities, got ${verdict.probabilities.length}`);
  }
  return {
    summary: {
      className: verdict.className, probability: verdict.probability, isAbstained: verdict.isAbstained,
      abstainReason: verdict.abstainReason,
      runnerUp: verdict.runnerUp,
      probabilities: Object.fromEntries(classNames.map((c, i) => [c, verdict.probabilities[i]])),
    },
    embedding: Array.from(verdict.embedding), modelVersion, abstainThreshold,
  };
}

/** Caveats with the stale-entry line replaced (or removed when count is 0), keeping its place. */
function replaceStaleCaveat(caveats: readonly string[], staleCount: number): string[] {
  const kept = caveats.filter((c) => !STALE_CAVEAT.test(c));
  if (staleCount === 0) return kept;
  const at = caveats.findIndex((c) => STALE_CAVEAT.test(c));
  // A new stale line goes before the two closing caveats every finding ends with.
  const index = at >= 0 ? at : Math.max(0, kept.length - 2);
  return [...kept.slice(0, index), formatStaleCaveat(staleCount), ...kept.slice(index)];
}

/** Open questions for a verdict, worded by buildFinding itself so both paths say the same. */
function rebuildOpenQuestions(frame: MetricFrame, finding: Finding, verdict: VerdictSummary): readonly string[] {
  const none: MetricEffect = { baselineMedian: Number.NaN, incidentMedian: Number.NaN, robustZ: Number.NaN, hodgesLehmann: Number.NaN, cliffsDelta: Number.NaN, ksD: Number.NaN, mannWhitneyP: Number.NaN };
  const zeros = new Float64Array(frame.series.length);
  return buildFinding({
    frame, incident: finding.incident, baseline: finding.baseline, verdict, shapley: zeros, shapleyCi95: zeros,
    effects: frame.series.map(() => none), changePoints: [], provenance: finding.provenance, createdMs: finding.createdMs,
  }).openQuestions;
}

/**
 * `finding` with its verdict, nearest incidents, stale-entry caveat and open questions recomputed
 * from `base` and the library's current `entries` (undefined: the workspace has no library file,
 * as when the analysis ran without one). Everything else — windows, metrics and their Shapley
 * values (computed for the base class), provenance, id — is kept. When the library takes no weight
 * (empty, fully stale, or far from every prototype) the verdict is `base.summary` unchanged; when
 * it does, the blended class may be a library label and abstains below `base.abstainThreshold`.
 */
export function reblendFinding(frame: MetricFrame, finding: Finding, base: BaseVerdict, entries: readonly LibraryEntry[] | undefined): ReblendedFinding {
  if (entries === undefined) {
    const verdict = base.summary;
    return {
      finding: { ...finding, verdict, nearestIncidents: undefined, caveats: replaceStaleCaveat(finding.caveats, 0), openQuestions: rebuildOpenQuestions(frame, finding, verdict) },
      nearest: [], staleEntryCount: 0,
    };
  }
  const match = matchLibrary(base.summary.probabilities, base.embedding, entries, base.modelVersion, { frame, incident: finding.incident, baseline: finding.baseline });
  let verdict = base.summary;
  if (match.verdict.libraryWeight > 0) {
    const v = match.verdict;
    const isAbstained = v.probability < base.abstainThreshold;
    verdict = {
      className: v.className, probability: v.probability, runnerUp: v.runnerUp, probabilities: v.probabilities, isAbstained,
      abstainReason: isAbstained ? `blended confidence ${v.probability.toFixed(2)} below ${base.abstainThreshold}` : undefined,
      libraryMatch: v.libraryMatch,
    };
  }
  // Same shape as the analysis facade's finding (keys included), so both read and render alike.
  const nearestIncidents = match.nearest.map((n) => ({ label: n.label, similarity: n.cosineSimilarity, postmortem: n.postmortem }));
  return {
    finding: {
      ...finding, verdict, nearestIncidents,
      caveats: replaceStaleCaveat(finding.caveats, match.staleEntryCount),
      openQuestions: rebuildOpenQuestions(frame, finding, verdict),
    },
    nearest: match.nearest, staleEntryCount: match.staleEntryCount,
  };
}
