import type { MetricFrame } from '../frame/types';
import type { ChangePointEntry, Finding, MetricContribution, MetricEffect, Provenance, TimeSpan, VerdictSummary } from './types';
import { hashText } from './findingBlock';

/** Inputs of buildFinding: everything already computed by detect/, model/ and explain/. */
export interface FindingInputs {
  readonly frame: MetricFrame;
  readonly incident: TimeSpan;
  readonly baseline: TimeSpan;
  readonly verdict: VerdictSummary;
  /** Per frame series (same order as frame.series): Shapley value for the verdict class and CI. */
  readonly shapley: ArrayLike<number>;
  readonly shapleyCi95: ArrayLike<number>;
  readonly effects: readonly MetricEffect[];
  readonly changePoints: readonly ChangePointEntry[];
  readonly provenance: Provenance;
  readonly createdMs: number;
  /** Extra caveats (e.g. the window was given by the user, the suggestion failed and why). */
  readonly extraCaveats?: readonly string[];
  readonly nearestIncidents?: Finding['nearestIncidents'];
}

/** Questions a reviewer should settle before writing a cause, per estimated class (USE/RED practice). */
const QUESTIONS: Readonly<Record<string, readonly string[]>> = {
  cpu_saturation: ['Was CPU busy time high *and* work queueing (run queue, throttling, PSI cpu)? High steal points to a noisy neighbour instead.', 'Did request rate rise first (a traffic surge) or CPU alone (a code path, a batch job)?'],
  memory_leak: ['Does memory plateau (cache warm-up) or keep rising until a restart (leak)?', 'Were there OOM kills or restarts at the end of the window?'],
  disk_io_saturation: ['Was the device busy (io_time near 1 s/s) with queueing, or was the filesystem simply full?', 'Was swap activity part of the I/O?'],
  network_latency: ['Is latency up only from the callers\' side while server-side duration stays flat (network) or on both sides (the service)?', 'Which dependency or path carried the delay?'],
  packet_loss: ['Do retransmits or interface drops rise with the tail latency?', 'Was a link, conntrack table or listen queue at its limit?'],
  traffic_surge: ['Did request rate rise before errors (load) or after them (retries)?', 'Where did the extra traffic come from?'],
  error_storm: ['Did a deploy, config or feature-flag change happen at the step?', 'Are the errors concentrated on one downstream dependency?'],
  normal: ['The metrics here look like ordinary variation: is the incident visible in metrics not in this export?'],
};


function computeTrend(values: Float64Array, from: number, to: number, cells = 30): number[] {
  const n = Math.max(0, to - from + 1);
  const out: number[] = [];
  const count = Math.min(cells, n);
  for (let c = 0; c < count; c++) {
    const a = from + Math.floor((c * n) / count);
    const b = from + Math.max(Math.floor(((c + 1) * n) / count), Math.floor((c * n) / count) + 1);
    let sum = 0;
    let k = 0;
    for (let i = a; i < b; i++) if (Number.isFinite(values[i])) { sum += values[i]; k++; }
    out.push(k > 0 ? sum / k : Number.NaN);
  }
  return out;
}

function collectCaveats(inputs: FindingInputs): string[] {
  const { frame } = inputs;
  const caveats: string[] = [...frame.assumptions, ...frame.warnings];
  const converted = frame.series.filter((s) => s.isConvertedToRate).length;
  if (converted > 0) caveats.push(`${converted} counter series were converted to per-second rates (resets treated as restarts from zero).`);
  const gappy = frame.series.filter((s) => s.gapFraction > 0.1);
  if (gappy.length > 0) caveats.push(`${gappy.length} series have more than 10 % gaps (worst: \`${gappy.sort((a, b) => b.gapFraction - a.gapFraction)[0].id}\`, ${(gappy[0].gapFraction * 100).toFixed(0)} %).`);
  if (frame.duplicateCount > 0) caveats.push(`${frame.duplicateCount} duplicate samples were resolved (the last one written wins).`);
  caveats.push(...(inputs.extraCaveats ?? []));
  caveats.push('Samples of a time series are autocorrelated: p-values are indicative only; rank by effect size.');
  caveats.push('The classifier was trained on simulated systems; metrics moving together is not causation.');
  return caveats;
}

/**
 * Assemble the Finding: metrics sorted by Shapley value (largest first; ties by |robust z|), an
 * inline trend from baseline start to incident end, caveats from the frame, class-specific open
 * questions, and an id that depends only on the export's sha256 so that re-running replaces the
 * block. Series with no finite effect (no samples in either window) are left out of the table.
 */
export function buildFinding(inputs: FindingInputs): Finding {
  const { frame, incident, baseline, verdict } = inputs;
  const from = Math.min(baseline.startIndex, incident.startIndex);
  const to = Math.max(baseline.endIndex, incident.endIndex);
  const metrics: MetricContribution[] = frame.series.map((s, i) => ({
    id: s.id, name: s.name, labels: s.labels, unit: s.unit, family: s.family,
    shapley: inputs.shapley[i], shapleyCi95: inputs.shapleyCi95[i], effect: inputs.effects[i],
    trend: computeTrend(s.values, from, to),
  }))
    .filter((m) => Number.isFinite(m.effect.incidentMedian) && Number.isFinite(m.effect.baselineMedian))
    .sort((a, b) => (b.shapley - a.shapley) || (Math.abs(b.effect.robustZ) - Math.abs(a.effect.robustZ)));
  const questions = [
    ...(QUESTIONS[verdict.className] ?? ['This class came from your incident library: does this window match the labelled incidents?']),
    `What else changed near ${new Date(incident.startMs).toISOString()} (deploys, config, traffic, dependencies)?`,
  ];
  if (!verdict.isAbstained && verdict.runnerUp.probability > 0.15) {
    questions.push(`What rules out the runner-up, ${verdict.runnerUp.className.replace(/_/g, ' ')} (${(verdict.runnerUp.probability * 100).toFixed(0)} %)?`);
  }
  return {
    id: `mt-${hashText(inputs.provenance.exportSha256)}${hashText(inputs.provenance.exportFile).slice(0, 4)}`,
    createdMs: inputs.createdMs,
    verdict, incident, baseline,
    stepMs: frame.stepMs,
    metrics,
    changePoints: inputs.changePoints,
    caveats: collectCaveats(inputs),
    openQuestions: questions,
    provenance: inputs.provenance,
    nearestIncidents: inputs.nearestIncidents,
  };
}

