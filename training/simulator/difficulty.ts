/**
 * How hard (and how real) simulated examples are: the knobs of sampleExamples and their defaults.
 */

/**
 * Knobs of what makes examples hard (and real). Defaults are the realistic setting; lowering them
 * gives cleaner data for curriculum training or for measuring what each costs.
 */
export interface Difficulty {
  /** Probability that all key metrics of the fault are missing from an example; default 0.15. */
  readonly keyMetricDropProbability?: number;
  /** Probability that an example loses a random 10–50 % of its metrics; default 0.35. */
  readonly randomDropProbability?: number;
  /** Share of faults with intensity 0.15–0.4 instead of 0.4–1; default 0.3. */
  readonly weakFaultShare?: number;
  /**
   * Least fault evidence (measureFaultEvidence: how far the fault moved the most-moved exported
   * metric, in baseline noise units) for a fault example; a draw below it is redrawn (a fault that
   * moved nothing exported looks exactly like a quiet period). Default 3; 0 keeps every draw.
   */
  readonly minFaultEvidence?: number;
}

export interface ResolvedDifficulty {
  readonly keyMetricDropProbability: number;
  readonly randomDropProbability: number;
  readonly weakFaultShare: number;
  readonly minFaultEvidence: number;
}

const resolvedCache = new WeakMap<Difficulty, ResolvedDifficulty>();
let resolvedDefault: ResolvedDifficulty | undefined;
/** resolveDifficulty, once per options object (it is resolved again for every example otherwise). */
export function resolveDifficultyCached(d: Difficulty | undefined): ResolvedDifficulty {
  if (d === undefined) return (resolvedDefault ??= resolveDifficulty(undefined));
  let resolved = resolvedCache.get(d);
  if (!resolved) {
    resolved = resolveDifficulty(d);
    resolvedCache.set(d, resolved);
  }
  return resolved;
}

export function resolveDifficulty(d: Difficulty | undefined): ResolvedDifficulty {
  const resolved = {
    keyMetricDropProbability: d?.keyMetricDropProbability ?? 0.15,
    randomDropProbability: d?.randomDropProbability ?? 0.35,
    weakFaultShare: d?.weakFaultShare ?? 0.3,
  };
  for (const [key, value] of Object.entries(resolved)) {
    if (!(value >= 0 && value <= 1)) throw new Error(`sampleExamples: expected difficulty.${key} in [0, 1], got ${value}`);
  }
  const minFaultEvidence = d?.minFaultEvidence ?? 3;
  if (!(minFaultEvidence >= 0 && Number.isFinite(minFaultEvidence))) throw new Error(`sampleExamples: expected difficulty.minFaultEvidence as a finite number >= 0, got ${minFaultEvidence}`);
  return { ...resolved, minFaultEvidence };
}
