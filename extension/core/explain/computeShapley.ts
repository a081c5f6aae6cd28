/**
 * Shapley values (Shapley 1953) of `playerCount` players for any set function v. Exact by
 * enumeration up to `exactUpTo` players; above that, antithetic permutation sampling (each random
 * order and its reverse) with a 95% confidence half-width per player. For metrics, a player is a
 * metric and v(S) is the model's score with only the metrics in S unmasked (DESIGN.md §7); a
 * classic cooperative game is just another v.
 */

/**
 * Value function: receives a batch of coalitions (Uint8Array of length playerCount, 1 = member)
 * and resolves to one value per coalition, in the same order.
 */
export type CoalitionValue = (coalitions: readonly Uint8Array[]) => Promise<Float64Array>;

/** Options of computeShapley. */
export interface ShapleyOptions {
  /** Enumerate exactly when playerCount ≤ this (2^n coalitions). Default 12. */
  readonly exactUpTo?: number;
  /** Sampling stops after this wall time, in ms. Default 1000. */
  readonly timeBudgetMs?: number;
  /** Sampling stops once every player's 95% half-width is ≤ this (after ≥ 10 pairs). Default 0 (off). */
  readonly targetHalfWidth?: number;
  /** PRNG seed (mulberry32); the sequence of sampled orders depends only on it. Default 1. */
  readonly seed?: number;
  /** Coalitions per value call. Default 512. */
  readonly batchSize?: number;
  /** Upper bound on sampled permutations (counting each reverse), for reproducible runs. Default ∞. */
  readonly maxPermutations?: number;
}

/** Shapley values and how they were obtained. */
export interface ShapleyResult {
  readonly values: Float64Array;
  /** 95% CI half-width per player (0 when exact). */
  readonly ci95HalfWidth: Float64Array;
  readonly isExact: boolean;
  /** Number of coalitions evaluated (including ∅ and the grand coalition). */
  readonly evaluations: number;
  /** v(all) − v(∅); the values sum to it (exactly up to rounding, also when sampled). */
  readonly total: number;
  /** Permutations sampled (0 when exact). */
  readonly permutations: number;
}

export { createMulberry32 } from '../random';
import { createMulberry32 } from '../random';

async function evaluateBatch(value: CoalitionValue, coalitions: readonly Uint8Array[]): Promise<Float64Array> {
  const out = await value(coalitions);
  if (out.length !== coalitions.length) {
    throw new Error(`Shapley value function: expected ${coalitions.length} values, got ${out.length}`);
  }
  for (let i = 0; i < out.length; i++) {
    if (!Number.isFinite(out[i])) throw new Error(`Shapley value function: expected a finite value for coalition ${i} of the batch, got ${out[i]}`);
  }
  return out;
}

/**
 * Shapley value of each player. n = 0 gives empty arrays; n ≤ exactUpTo is exact with weights
 * |S|!(n−|S|−1)!/n!; larger n is sampled (see ShapleyOptions; half-widths are Infinity if the
 * budget allowed fewer than two pairs). Rejects (never silently returns) when the value function
 * returns the wrong count or a non-finite value.
 */
export async function computeShapley(playerCount: number, value: CoalitionValue, options: ShapleyOptions = {}): Promise<ShapleyResult> {
  if (!Number.isInteger(playerCount) || playerCount < 0) throw new Error(`Shapley: expected a player count ≥ 0, got ${playerCount}`);
  const batchSize = Math.max(1, Math.floor(options.batchSize ?? 512));
  if (playerCount === 0) {
    return { values: new Float64Array(0), ci95HalfWidth: new Float64Array(0), isExact: true, evaluations: 0, total: 0, permutations: 0 };
  }
  if (playerCount <= Math.min(options.exactUpTo ?? 12, 24) || playerCount === 1) {
    return computeExactShapley(playerCount, value, batchSize);
  }
  return sampleShapley(playerCount, value, options, batchSize);
}

async function computeExactShapley(n: number, value: CoalitionValue, batchSize: number): Promise<ShapleyResult> {
  const count = 1 << n;
  const v = new Float64Array(count);
  for (let first = 0; first < count; first += batchSize) {
    const batch: Uint8Array[] = [];
    for (let mask = first; mask < Math.min(count, first + batchSize); mask++) {
      const c = new Uint8Array(n);
      for (let i = 0; i < n; i++) c[i] = (mask >> i) & 1;
      batch.push(c);
    }
    v.set(await evaluateBatch(value, batch), first);
  }
  // weight(s) = s!(n−s−1)!/n! = 1/(n·C(n−1, s))
  const weight = new Float64Array(n);
  let binom = 1;
  for (let s = 0; s < n; s++) { weight[s] = 1 / (n * binom); binom = (binom * (n - 1 - s)) / (s + 1); }
  const values = new Float64Array(n);
  for (let mask = 0; mask < count; mask++) {
    let size = 0;
    for (let m = mask; m !== 0; m &= m - 1) size++;
    for (let i = 0; i < n; i++) {
      if ((mask >> i) & 1) continue;
      values[i] += weight[size] * (v[mask | (1 << i)] - v[mask]);
    }
  }
  return { values, ci95HalfWidth: new Float64Array(n), isExact: true, evaluations: count, total: v[count - 1] - v[0], permutations: 0 };
}

function shuffle(order: Int32Array, random: () => number): void {
  for (let i = order.length - 1; i > 0; i--) {
    const j = Math.floor(random() * (i + 1));
    const t = order[i]; order[i] = order[j]; order[j] = t;
  }
}

/** Coalitions for prefixes 1..n−1 of `order` (∅ and the grand coalition are known). */
function buildPrefixCoalitions(order: Int32Array, out: Uint8Array[]): void {
  const c = new Uint8Array(order.length);
  for (let k = 0; k < order.length - 1; k++) {
    c[order[k]] = 1;
    out.push(c.slice());
  }
}

/** Running mean and variance per player over antithetic pairs (Welford). */
class PairStatistics {
  readonly mean: Float64Array;
  readonly #m2: Float64Array;
  pairs = 0;
  constructor(n: number) { this.mean = new Float64Array(n); this.#m2 = new Float64Array(n); }
  add(sample: Float64Array): void {
    this.pairs++;
    for (let i = 0; i < sample.length; i++) {
      const delta = sample[i] - this.mean[i];
      this.mean[i] += delta / this.pairs;
      this.#m2[i] += delta * (sample[i] - this.mean[i]);
    }
  }
  /** 95% half-widths (normal quantile 1.96); Infinity before two pairs exist. */
  computeHalfWidths(): Float64Array {
    return this.#m2.map((m2) => (this.pairs > 1 ? 1.96 * Math.sqrt(m2 / (this.pairs - 1) / this.pairs) : Number.POSITIVE_INFINITY));
  }
}

/**
 * Marginal contributions of one antithetic pair, averaged: sample[i] = ½(Δᵢ forward + Δᵢ reverse).
 * Each order's marginals telescope to vAll − vEmpty, so the sample sums to it exactly.
 */
function computePairSample(orders: readonly Int32Array[], v: Float64Array, offset: number, vEmpty: number,
  vAll: number, sample: Float64Array): void {
  const n = sample.length;
  sample.fill(0);
  orders.forEach((ord, which) => {
    let previous = vEmpty;
    for (let k = 0; k < n; k++) {
      const current = k === n - 1 ? vAll : v[offset + which * (n - 1) + k];
      sample[ord[k]] += (current - previous) / 2;
      previous = current;
    }
  });
}

async function sampleShapley(n: number, value: CoalitionValue, options: ShapleyOptions, batchSize: number): Promise<ShapleyResult> {
  const started = performance.now();
  const budgetMs = options.timeBudgetMs ?? 1000;
  const target = options.targetHalfWidth ?? 0;
  const maxPairs = Math.max(1, Math.floor((options.maxPermutations ?? Number.POSITIVE_INFINITY) / 2));
  const random = createMulberry32(options.seed ?? 1);
  const [vEmpty, vAll] = await evaluateBatch(value, [new Uint8Array(n), new Uint8Array(n).fill(1)]);
  const stats = new PairStatistics(n);
  const pairsPerBatch = Math.max(1, Math.floor(batchSize / (2 * (n - 1))));
  const sample = new Float64Array(n);
  let evaluations = 2;
  let halfWidth = stats.computeHalfWidths();
  for (;;) {
    const pairOrders: Int32Array[][] = [];
    const coalitions: Uint8Array[] = [];
    for (let p = 0; p < Math.min(pairsPerBatch, maxPairs - stats.pairs); p++) {
      const forward = Int32Array.from({ length: n }, (_, i) => i);
      shuffle(forward, random);
      const reverse = forward.slice().reverse();
      pairOrders.push([forward, reverse]);
      buildPrefixCoalitions(forward, coalitions);
      buildPrefixCoalitions(reverse, coalitions);
    }
    const v = await evaluateBatch(value, coalitions);
    evaluations += coalitions.length;
    pairOrders.forEach((orders, p) => {
      computePairSample(orders, v, p * 2 * (n - 1), vEmpty, vAll, sample);
      stats.add(sample);
    });
    halfWidth = stats.computeHalfWidths();
    const widest = halfWidth.reduce((a, b) => Math.max(a, b), 0);
    if (stats.pairs >= maxPairs || performance.now() - started >= budgetMs || (stats.pairs >= 10 && widest <= target)) break;
  }
  return { values: stats.mean, ci95HalfWidth: halfWidth, isExact: false, evaluations, total: vAll - vEmpty, permutations: 2 * stats.pairs };
}

/**
 * Value function for the Shapley value of metrics (DESIGN.md §7): the empty coalition gets
 * `emptyValue` (e.g. the log prior of the verdict class, since a model with every node masked has
 * no input); every other coalition goes, in one batch, to `scoreCoalitions` (e.g. the classifier
 * run with its node mask set to the coalition, returning the calibrated log-probability of the
 * verdict class). Rejects when scoreCoalitions returns the wrong number of values.
 */
export function createMetricCoalitionValue(emptyValue: number, scoreCoalitions: CoalitionValue): CoalitionValue {
  return async (coalitions) => {
    const out = new Float64Array(coalitions.length).fill(emptyValue);
    const index: number[] = [];
    coalitions.forEach((c, i) => { if (c.some((bit) => bit !== 0)) index.push(i); });
    if (index.length === 0) return out;
    const scored = await evaluateBatch(scoreCoalitions, index.map((i) => coalitions[i]));
    index.forEach((i, k) => { out[i] = scored[k]; });
    return out;
  };
}
