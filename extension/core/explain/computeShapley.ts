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

/** Small fast PRNG (mulberry32, public domain); returns floats in [0, 1). */
export function createMulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

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
 * |S|!(n−|S|−1)!/n!; larger n is sampled (see ShapleyOptions). Rejects (never silently returns)
 * when the value function returns the wrong count or a non-finite value.
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

async function sampleShapley(n: number, value: CoalitionValue, options: ShapleyOptions, batchSize: number): Promise<ShapleyResult> {
  const started = performance.now();
  const budgetMs = options.timeBudgetMs ?? 1000;
  const target = options.targetHalfWidth ?? 0;
  const maxPairs = Math.max(1, Math.floor((options.maxPermutations ?? Number.POSITIVE_INFINITY) / 2));
  const random = createMulberry32(options.seed ?? 1);
  const ends = await evaluateBatch(value, [new Uint8Array(n), new Uint8Array(n).fill(1)]);
  const [vEmpty, vAll] = [ends[0], ends[1]];
  let evaluations = 2;
  const mean = new Float64Array(n), m2 = new Float64Array(n), halfWidth = new Float64Array(n);
  const pairsPerBatch = Math.max(1, Math.floor(batchSize / (2 * (n - 1))));
  let pairs = 0;
  const order = new Int32Array(n);
  const sample = new Float64Array(n);
  for (;;) {
    const batchPairs = Math.min(pairsPerBatch, maxPairs - pairs);
    const orders: Int32Array[] = [];
    const coalitions: Uint8Array[] = [];
    for (let p = 0; p < batchPairs; p++) {
      for (let i = 0; i < n; i++) order[i] = i;
      shuffle(order, random);
      const forward = order.slice();
      const reverse = forward.slice().reverse();
      orders.push(forward, reverse);
      buildPrefixCoalitions(forward, coalitions);
      buildPrefixCoalitions(reverse, coalitions);
    }
    const v = await evaluateBatch(value, coalitions);
    evaluations += coalitions.length;
    for (let p = 0; p < batchPairs; p++) {
      sample.fill(0);
      for (const which of [0, 1]) {
        const ord = orders[2 * p + which];
        const base = (2 * p + which) * (n - 1);
        let previous = vEmpty;
        for (let k = 0; k < n; k++) {
          const current = k === n - 1 ? vAll : v[base + k];
          sample[ord[k]] += (current - previous) / 2;
          previous = current;
        }
      }
      pairs++;
      for (let i = 0; i < n; i++) {
        const delta = sample[i] - mean[i];
        mean[i] += delta / pairs;
        m2[i] += delta * (sample[i] - mean[i]);
      }
    }
    let widest = 0;
    for (let i = 0; i < n; i++) {
      halfWidth[i] = pairs > 1 ? 1.96 * Math.sqrt(m2[i] / (pairs - 1) / pairs) : Number.POSITIVE_INFINITY;
      widest = Math.max(widest, halfWidth[i]);
    }
    if (pairs >= maxPairs || performance.now() - started >= budgetMs || (pairs >= 10 && widest <= target)) break;
  }
  return { values: mean, ci95HalfWidth: halfWidth, isExact: false, evaluations, total: vAll - vEmpty, permutations: 2 * pairs };
}
