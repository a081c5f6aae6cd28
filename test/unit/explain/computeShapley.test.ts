import assert from 'node:assert/strict';
import fc from 'fast-check';
import { computeShapley, createMetricCoalitionValue, type CoalitionValue } from '../../../extension/core/explain/computeShapley';

/** Wraps a per-coalition characteristic function as the batched value function computeShapley takes. */
function asValue(v: (c: Uint8Array) => number): CoalitionValue {
  return async (coalitions) => Float64Array.from(coalitions, v);
}

function weightedVoting(quota: number, weights: readonly number[]): CoalitionValue {
  return asValue((c) => (weights.reduce((s, w, i) => s + (c[i] ? w : 0), 0) >= quota ? 1 : 0));
}

function assertClose(actual: ArrayLike<number>, expected: readonly number[], tol = 1e-12): void {
  assert.equal(actual.length, expected.length);
  expected.forEach((e, i) => assert.ok(Math.abs(actual[i] - e) <= tol, `player ${i}: ${actual[i]} vs ${e}`));
}

describe('computeShapley on classic games (Shapley 1953; Shapley & Shubik 1954; Littlechild & Owen 1973)', () => {
  it('glove game: two right-glove holders get 1/6 each, the left-glove holder 2/3', async () => {
    // v(S) = number of matched pairs: min(#left, #right); players 0, 1 right, player 2 left.
    const r = await computeShapley(3, asValue((c) => Math.min(c[0] + c[1], c[2])));
    assert.equal(r.isExact, true);
    assertClose(r.values, [1 / 6, 1 / 6, 2 / 3]);
    assert.equal(r.evaluations, 8);
  });

  it('one left glove and N = 5 right gloves: left N/(N+1), each right 1/(N(N+1))', async () => {
    const n = 5;
    const r = await computeShapley(n + 1, asValue((c) => Math.min(c[0], c.slice(1).reduce((a, b) => a + b, 0))));
    assertClose(r.values, [n / (n + 1), ...new Array<number>(n).fill(1 / (n * (n + 1)))]);
  });

  it('airport game with runway costs 8, 11, 13, 18 gives 2, 3, 4, 9', async () => {
    const cost = [8, 11, 13, 18];
    const r = await computeShapley(4, asValue((c) => Math.max(0, ...cost.filter((_, i) => c[i]))));
    assertClose(r.values, [2, 3, 4, 9], 1e-9);
  });

  it('weighted voting [4; 3,2,1,1] gives Shapley–Shubik indices 1/2, 1/6, 1/6, 1/6', async () => {
    const r = await computeShapley(4, weightedVoting(4, [3, 2, 1, 1]));
    assertClose(r.values, [1 / 2, 1 / 6, 1 / 6, 1 / 6]);
  });

  it('unanimity game on {1,3} among 3 players gives 1/2, 0, 1/2', async () => {
    const r = await computeShapley(3, asValue((c) => (c[0] && c[2] ? 1 : 0)));
    assertClose(r.values, [1 / 2, 0, 1 / 2]);
  });

  it('gives the same exact values whatever the batch size, in batches of at most batchSize', async () => {
    const sizes: number[] = [];
    const game = weightedVoting(4, [3, 2, 1, 1]);
    const r = await computeShapley(4, async (cs) => { sizes.push(cs.length); return game(cs); }, { batchSize: 5 });
    assertClose(r.values, [1 / 2, 1 / 6, 1 / 6, 1 / 6]);
    assert.deepEqual(sizes, [5, 5, 5, 1]);
  });

  it('UN Security Council [39; 7×5, 1×10] by sampling: 421/2145 and 4/2145 inside the sampled CI', async () => {
    // 15 players > exactUpTo, so this runs the permutation sampler. The check widens each 95% CI to
    // 99.9% (×3.29/1.96) because 15 simultaneous 95% intervals would miss one by chance too often.
    const weights = [7, 7, 7, 7, 7, 1, 1, 1, 1, 1, 1, 1, 1, 1, 1];
    const r = await computeShapley(15, weightedVoting(39, weights), { seed: 42, maxPermutations: 20000, timeBudgetMs: 60_000 });
    assert.equal(r.isExact, false);
    assert.equal(r.permutations, 20000);
    const truth = weights.map((w) => (w === 7 ? 421 / 2145 : 4 / 2145));
    truth.forEach((t, i) => {
      const allowed = (r.ci95HalfWidth[i] * 3.29) / 1.96;
      assert.ok(Math.abs(r.values[i] - t) <= allowed, `player ${i}: ${r.values[i]} vs ${t} ± ${allowed}`);
    });
    assert.ok(Math.abs(r.values.reduce((a, b) => a + b, 0) - 1) < 1e-9, 'efficiency: the sampled values sum to v(all) − v(∅) = 1');
  });

  it('is deterministic for a seed and differs for another seed', async () => {
    const game = weightedVoting(39, [7, 7, 7, 7, 7, 1, 1, 1, 1, 1, 1, 1, 1, 1, 1]);
    const a = await computeShapley(15, game, { seed: 7, maxPermutations: 200, timeBudgetMs: 60_000 });
    const b = await computeShapley(15, game, { seed: 7, maxPermutations: 200, timeBudgetMs: 60_000 });
    const c = await computeShapley(15, game, { seed: 8, maxPermutations: 200, timeBudgetMs: 60_000 });
    assert.deepEqual(Array.from(a.values), Array.from(b.values));
    assert.notDeepEqual(Array.from(a.values), Array.from(c.values));
  });

  it('sampled one-left-glove game (N = 14) lands within the CI of N/(N+1) and 1/(N(N+1))', async () => {
    const n = 14;
    const r = await computeShapley(n + 1, asValue((c) => Math.min(c[0], c.slice(1).reduce((a, b) => a + b, 0))),
      { seed: 3, maxPermutations: 4000, timeBudgetMs: 60_000 });
    const truth = [n / (n + 1), ...new Array<number>(n).fill(1 / (n * (n + 1)))];
    truth.forEach((t, i) => assert.ok(Math.abs(r.values[i] - t) <= (r.ci95HalfWidth[i] * 3.29) / 1.96 + 1e-12, `player ${i}`));
  });

  it('rejects a value function that returns the wrong number of values, naming both counts', async () => {
    await assert.rejects(computeShapley(3, async () => new Float64Array(2)), /expected 8 values, got 2/);
    await assert.rejects(computeShapley(2, async (cs) => new Float64Array(cs.length).fill(Number.NaN)), /expected a finite value/);
  });

  it('handles 0 and 1 players', async () => {
    assert.equal((await computeShapley(0, asValue(() => 1))).values.length, 0);
    assertClose((await computeShapley(1, asValue((c) => 3 + 2 * c[0]))).values, [2]);
  });
});

describe('computeShapley efficiency (sum = v(all) − v(∅)) on random games', () => {
  // Property of every Shapley value (Shapley 1953, efficiency axiom); numbers cross-checkable in scipy/numpy.
  const game = fc.record({ n: fc.integer({ min: 2, max: 16 }), seed: fc.integer({ min: 1, max: 1e9 }) });

  it('holds for exact and for sampled values of random non-additive games', async () => {
    await fc.assert(fc.asyncProperty(game, async ({ n, seed }) => {
      const coef = Array.from({ length: n }, (_, i) => Math.sin(seed + i) * 3);
      const v = asValue((c) => {
        let s = 0, pairs = 0;
        for (let i = 0; i < n; i++) { if (c[i]) { s += coef[i]; pairs += c[(i + 1) % n] ? coef[i] * coef[(i + 1) % n] : 0; } }
        return Math.tanh(s) + 0.3 * pairs + (c[0] ? 1 : 0) * (c[n - 1] ? 2 : 0);
      });
      const r = await computeShapley(n, v, { seed, maxPermutations: 40, timeBudgetMs: 60_000, exactUpTo: 10 });
      const full = (await v([new Uint8Array(n).fill(1), new Uint8Array(n)]));
      assert.ok(Math.abs(r.total - (full[0] - full[1])) < 1e-12);
      assert.ok(Math.abs(r.values.reduce((a, b) => a + b, 0) - r.total) < 1e-9);
    }), { numRuns: 40, seed: 20261202 });
  });
});

describe('createMetricCoalitionValue', () => {
  it('gives the empty coalition the prior and scores the rest in one batch; the values still sum to v(all) − prior', async () => {
    const batches: number[] = [];
    const prior = Math.log(0.125); // uniform prior over 8 classes
    const score: CoalitionValue = async (cs) => {
      batches.push(cs.length);
      return Float64Array.from(cs, (c) => Math.log(0.125 + 0.8 * (c[0] * 0.5 + c[1] * 0.3 + c[0] * c[2] * 0.2)));
    };
    const r = await computeShapley(3, createMetricCoalitionValue(prior, score));
    assert.deepEqual(batches, [7]);
    assert.ok(Math.abs(r.total - (Math.log(0.925) - prior)) < 1e-12);
    assert.ok(Math.abs(r.values.reduce((a, b) => a + b, 0) - r.total) < 1e-12);
    assert.ok(r.values[0] > r.values[2] && r.values[2] > 0, 'metric 0 carries most, metric 2 only with metric 0');
  });
});
