/**
 * Shapley sampling speed: 50 players on a synthetic nonlinear game (a logistic score of a weighted
 * sum plus pairwise interactions, the shape of a masked classifier's log-probability), sampled
 * until every player's 95% half-width is ≤ 0.02 or 1 s has passed.
 */
import type { BenchReport } from './run';
import { computeShapley, createMulberry32 } from '../extension/core/explain/computeShapley';

export async function run(): Promise<BenchReport> {
  const n = 50;
  const random = createMulberry32(5);
  const weight = Float64Array.from({ length: n }, () => (random() - 0.5) * 3);
  const value = async (coalitions: readonly Uint8Array[]): Promise<Float64Array> => Float64Array.from(coalitions, (c) => {
    let s = 0, pairs = 0;
    for (let i = 0; i < n; i++) {
      if (!c[i]) continue;
      s += weight[i];
      if (c[(i + 1) % n]) pairs += weight[i] * weight[(i + 1) % n];
    }
    return -Math.log1p(Math.exp(-(s + 0.5 * pairs)));
  });
  const t0 = performance.now();
  const r = await computeShapley(n, value, { targetHalfWidth: 0.02, timeBudgetMs: 1000, seed: 1 });
  const elapsed = performance.now() - t0;
  const widest = Math.max(...r.ci95HalfWidth);
  const sum = r.values.reduce((a, b) => a + b, 0);
  return { suite: 'shapley', lines: [
    { name: 'Shapley 50 players, time to reach ±0.02 (95% CI) or budget', value: elapsed, unit: 'ms', target: '≤ 1000 ms' },
    { name: 'Shapley 50 players, widest 95% half-width achieved', value: widest, unit: 'value', target: '≤ 0.02' },
    { name: 'Shapley 50 players, permutations sampled', value: r.permutations, unit: 'count', note: `${r.evaluations} evaluations` },
    { name: 'Shapley 50 players, |Σφ − (v(all) − v(∅))|', value: Math.abs(sum - r.total), unit: 'value', note: `total ${r.total.toFixed(4)}` },
  ] };
}
