/**
 * Two-sample rank statistics: Mann–Whitney U (Mann & Whitney 1947) and the two-sample
 * Kolmogorov–Smirnov D (Kolmogorov 1933; Smirnov 1948). NaN samples are dropped. p-values are
 * two-sided and only indicative on time series (autocorrelated samples overstate significance).
 */
import { sortFinite } from '../detect/robustStats';
import { computeNormalSf } from './normalDistribution';

/** Mann–Whitney result; `u` is the statistic of the first sample. */
export interface MannWhitneyResult {
  /** U of x: #{(xᵢ, yⱼ): xᵢ > yⱼ} + ½·#ties. */
  readonly u: number;
  /** Two-sided p; NaN when a sample is empty. */
  readonly p: number;
  readonly method: 'exact' | 'normal';
  readonly hasTies: boolean;
}

/** Which p-value method to use; 'auto' = exact when there are no ties and m·n ≤ 2500. */
export type PValueMethod = 'auto' | 'exact' | 'asymptotic';

/** Midranks of the pooled sorted samples; returns rank sum of x and the tie term Σ(t³ − t). */
function rankPooled(x: Float64Array, y: Float64Array): { rankSumX: number; tieTerm: number } {
  const pooled = [...Array.from(x, (v) => [v, 0] as const), ...Array.from(y, (v) => [v, 1] as const)].sort((a, b) => a[0] - b[0]);
  let rankSumX = 0, tieTerm = 0;
  for (let i = 0; i < pooled.length;) {
    let j = i;
    while (j + 1 < pooled.length && pooled[j + 1][0] === pooled[i][0]) j++;
    const midrank = (i + j + 2) / 2;
    const t = j - i + 1;
    tieTerm += t * t * t - t;
    for (let k = i; k <= j; k++) if (pooled[k][1] === 0) rankSumX += midrank;
    i = j + 1;
  }
  return { rankSumX, tieTerm };
}

/**
 * Exact null distribution of U for sizes m, n without ties: coefficients of the Gaussian
 * binomial [m+n choose m]_q, normalised to probabilities. Index u = 0..m·n.
 */
export function computeExactUDistribution(m: number, n: number): Float64Array {
  const size = m * n + 1;
  let poly = new Float64Array(size);
  poly[0] = 1;
  // Π_{i=1..m} (1 − q^{n+i}) / (1 − q^i): multiply, then divide by a cumulative sum with stride i.
  for (let i = 1; i <= m; i++) {
    const next = poly.slice();
    for (let u = size - 1; u >= n + i; u--) next[u] -= poly[u - n - i];
    for (let u = i; u < size; u++) next[u] += next[u - i];
    poly = next;
  }
  const total = poly.reduce((a, b) => a + b, 0);
  return poly.map((c) => c / total);
}

/**
 * Mann–Whitney U test of x vs y. Exact p (no ties) or the normal approximation with tie and
 * continuity correction (as scipy.stats.mannwhitneyu). Empty samples give p = NaN.
 */
export function computeMannWhitney(xIn: ArrayLike<number>, yIn: ArrayLike<number>, method: PValueMethod = 'auto'): MannWhitneyResult {
  const x = sortFinite(xIn), y = sortFinite(yIn);
  const m = x.length, n = y.length;
  if (m === 0 || n === 0) return { u: Number.NaN, p: Number.NaN, method: 'normal', hasTies: false };
  const { rankSumX, tieTerm } = rankPooled(x, y);
  const u = rankSumX - (m * (m + 1)) / 2;
  const uMax = Math.max(u, m * n - u);
  const hasTies = tieTerm > 0;
  const isExact = method === 'exact' || (method === 'auto' && !hasTies && m * n <= 2500);
  if (isExact) {
    const dist = computeExactUDistribution(m, n);
    let tail = 0;
    for (let k = Math.ceil(uMax - 1e-9); k <= m * n; k++) tail += dist[k];
    return { u, p: Math.min(1, 2 * tail), method: 'exact', hasTies };
  }
  const big = m + n;
  const sigma = Math.sqrt(((m * n) / 12) * (big + 1 - tieTerm / (big * (big - 1))));
  const z = sigma > 0 ? (uMax - (m * n) / 2 - 0.5) / sigma : 0;
  return { u, p: Math.min(1, 2 * computeNormalSf(z)), method: 'normal', hasTies };
}

/** Two-sample KS result. */
export interface KolmogorovSmirnovResult {
  /** sup |F_x − F_y| over the pooled values, in [0, 1]; NaN when a sample is empty. */
  readonly d: number;
  readonly p: number;
  readonly method: 'exact' | 'asymptotic';
}

/**
 * Two-sample KS test. Exact p = 1 − P(lattice path stays strictly inside |i/m − j/n| < D)
 * for m·n ≤ 250,000 (ties make it approximate, as in scipy); otherwise the asymptotic Kolmogorov
 * distribution with Stephens' small-sample correction.
 */
export function computeKolmogorovSmirnov(xIn: ArrayLike<number>, yIn: ArrayLike<number>, method: PValueMethod = 'auto'): KolmogorovSmirnovResult {
  const x = sortFinite(xIn), y = sortFinite(yIn);
  const m = x.length, n = y.length;
  if (m === 0 || n === 0) return { d: Number.NaN, p: Number.NaN, method: 'asymptotic' };
  let i = 0, j = 0, dInt = 0;
  while (i < m || j < n) {
    const v = Math.min(i < m ? x[i] : Infinity, j < n ? y[j] : Infinity);
    while (i < m && x[i] === v) i++;
    while (j < n && y[j] === v) j++;
    dInt = Math.max(dInt, Math.abs(i * n - j * m));
  }
  const d = dInt / (m * n);
  const isExact = method === 'exact' || (method === 'auto' && m * n <= 250_000);
  if (isExact) return { d, p: computeKsExactP(m, n, dInt), method: 'exact' };
  const en = Math.sqrt((m * n) / (m + n));
  return { d, p: computeKolmogorovSf((en + 0.12 + 0.11 / en) * d), method: 'asymptotic' };
}

function computeKsExactP(m: number, n: number, dInt: number): number {
  // w[j] = share of monotone paths to (i, j) that stayed inside |i·n − j·m| < dInt.
  const w = new Float64Array(n + 1);
  for (let i = 0; i <= m; i++) {
    for (let j = 0; j <= n; j++) {
      if (Math.abs(i * n - j * m) >= dInt) { w[j] = 0; continue; }
      if (i === 0 && j === 0) { w[j] = 1; continue; }
      const fromLeft = i > 0 ? (w[j] * i) / (i + j) : 0;
      const fromBelow = j > 0 ? (w[j - 1] * j) / (i + j) : 0;
      w[j] = fromLeft + fromBelow;
    }
  }
  return Math.min(1, Math.max(0, 1 - w[n]));
}

/** Kolmogorov distribution tail Q(λ) = 2 Σ (−1)^{k−1} e^{−2k²λ²}. */
function computeKolmogorovSf(lambda: number): number {
  if (lambda < 0.2) return 1;
  let sum = 0;
  for (let k = 1; k <= 100; k++) {
    const term = Math.exp(-2 * k * k * lambda * lambda);
    sum += (k % 2 === 1 ? 1 : -1) * term;
    if (term < 1e-16) break;
  }
  return Math.min(1, Math.max(0, 2 * sum));
}
