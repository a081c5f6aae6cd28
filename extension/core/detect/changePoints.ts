/**
 * Offline change points in the mean: the optimal single split (one step of binary segmentation,
 * Scott & Knott 1974; Vostrikova 1981), recursive binary segmentation, and PELT (Killick, Fearnhead
 * & Eckley 2012) with the normal-mean cost C(y) = Σ(yᵢ − ȳ)²/σ². Change points are reported as the
 * 0-based index of the first sample of each new segment (so "after observation 28" is 28).
 * NaN samples (gaps) are skipped by the cost: they add no cost and count toward no segment mean.
 */

/** Prefix sums over the non-NaN samples, for O(1) segment costs. */
interface PrefixSums {
  readonly sum: Float64Array;
  readonly sumSq: Float64Array;
  readonly count: Int32Array;
}

function buildPrefixSums(values: ArrayLike<number>): PrefixSums {
  const n = values.length;
  const sum = new Float64Array(n + 1), sumSq = new Float64Array(n + 1), count = new Int32Array(n + 1);
  for (let i = 0; i < n; i++) {
    const v = values[i];
    const ok = !Number.isNaN(v);
    sum[i + 1] = sum[i] + (ok ? v : 0);
    sumSq[i + 1] = sumSq[i] + (ok ? v * v : 0);
    count[i + 1] = count[i] + (ok ? 1 : 0);
  }
  return { sum, sumSq, count };
}

/** Sum of squared deviations from the segment mean over [start, end) (non-NaN only). */
function computeSegmentSse(p: PrefixSums, start: number, end: number): number {
  const c = p.count[end] - p.count[start];
  if (c === 0) return 0;
  const s = p.sum[end] - p.sum[start];
  return Math.max(0, p.sumSq[end] - p.sumSq[start] - (s * s) / c);
}

function computeSegmentMean(p: PrefixSums, start: number, end: number): number {
  const c = p.count[end] - p.count[start];
  return c === 0 ? Number.NaN : (p.sum[end] - p.sum[start]) / c;
}

/** The best single split of a series into two segments of different means. */
export interface SingleSplit {
  /** Index of the first sample of the second segment (split "after observation index"). */
  readonly index: number;
  readonly leftMean: number;
  readonly rightMean: number;
  /** Total SSE without a split minus the SSE with it (≥ 0), in squared units. */
  readonly costReduction: number;
}

/**
 * Optimal single split by least squares: the index minimising SSE(left) + SSE(right), each segment
 * holding at least `minSegmentLength` samples (default 2). Returns undefined when the series is too
 * short for two such segments or has fewer than two non-NaN samples on a side.
 */
export function findOptimalSplit(values: ArrayLike<number>, minSegmentLength = 2, start = 0,
  end = values.length, prefix?: PrefixSums): SingleSplit | undefined {
  const p = prefix ?? buildPrefixSums(values);
  const m = Math.max(1, minSegmentLength);
  const total = computeSegmentSse(p, start, end);
  let best = Number.POSITIVE_INFINITY, bestIndex = -1;
  for (let s = start + m; s <= end - m; s++) {
    if (p.count[s] - p.count[start] === 0 || p.count[end] - p.count[s] === 0) continue;
    const cost = computeSegmentSse(p, start, s) + computeSegmentSse(p, s, end);
    if (cost < best) { best = cost; bestIndex = s; }
  }
  if (bestIndex < 0) return undefined;
  return { index: bestIndex, leftMean: computeSegmentMean(p, start, bestIndex),
    rightMean: computeSegmentMean(p, bestIndex, end), costReduction: total - best };
}

/** Options of the mean-change segmenters. */
export interface MeanChangeOptions {
  /** Noise σ in the series' unit; costs are divided by σ². Default 1 (plain L2 cost). */
  readonly sigma?: number;
  /** Penalty β per added change point, in cost units. Default 2·ln(n) (BIC-like). */
  readonly penalty?: number;
  /** Minimum samples per segment. Default 2. */
  readonly minSegmentLength?: number;
}

function resolveOptions(n: number, options: MeanChangeOptions): { sigma2: number; beta: number; m: number } {
  const sigma = options.sigma ?? 1;
  if (!(sigma > 0) || !Number.isFinite(sigma)) throw new Error(`change points: expected sigma > 0, got ${sigma}`);
  const beta = options.penalty ?? 2 * Math.log(Math.max(2, n));
  if (!(beta >= 0)) throw new Error(`change points: expected penalty ≥ 0, got ${beta}`);
  return { sigma2: sigma * sigma, beta, m: Math.max(1, Math.floor(options.minSegmentLength ?? 2)) };
}

/**
 * Binary segmentation: split at the optimal single split while the cost drop (in σ² units)
 * exceeds the penalty, recursing into both halves. Returns sorted change-point indices; an empty
 * array for short or constant input.
 */
export function segmentBinary(values: ArrayLike<number>, options: MeanChangeOptions = {}): number[] {
  const { sigma2, beta, m } = resolveOptions(values.length, options);
  const p = buildPrefixSums(values);
  const out: number[] = [];
  const stack: Array<[number, number]> = [[0, values.length]];
  while (stack.length > 0) {
    const [a, b] = stack.pop() as [number, number];
    const split = findOptimalSplit(values, m, a, b, p);
    if (!split || split.costReduction / sigma2 <= beta) continue;
    out.push(split.index);
    stack.push([a, split.index], [split.index, b]);
  }
  return out.sort((x, y) => x - y);
}

/**
 * PELT: the exact penalised optimal partition F(t) = min_τ [F(τ) + C(y_{τ:t}) + β] with pruning of
 * candidates τ where F(τ) + C(y_{τ:t}) > F(t) (valid for this cost, K = 0). Expected linear time
 * when change points keep arriving; quadratic in the worst case (few changes in a long series),
 * so callers with long series should aggregate first. Returns sorted change-point indices; an
 * empty array for input shorter than two segments.
 */
export function detectPelt(values: ArrayLike<number>, options: MeanChangeOptions = {}): number[] {
  const n = values.length;
  const { sigma2, beta, m } = resolveOptions(n, options);
  if (n < 2 * m) return [];
  const p = buildPrefixSums(values);
  const f = new Float64Array(n + 1).fill(Number.POSITIVE_INFINITY);
  const last = new Int32Array(n + 1);
  f[0] = -beta;
  // Candidate set R kept compact in a typed array; costs reused for the pruning test.
  const candidates = new Int32Array(n + 1);
  const costs = new Float64Array(n + 1);
  let size = 0;
  for (let t = 1; t <= n; t++) {
    const fresh = t - m;
    if (fresh === 0 || fresh >= m) candidates[size++] = fresh;
    if (size === 0) continue;
    let best = Number.POSITIVE_INFINITY, arg = 0;
    for (let j = 0; j < size; j++) {
      const tau = candidates[j];
      costs[j] = f[tau] + computeSegmentSse(p, tau, t) / sigma2;
      if (costs[j] + beta < best) { best = costs[j] + beta; arg = tau; }
    }
    f[t] = best;
    last[t] = arg;
    let kept = 0;
    for (let j = 0; j < size; j++) if (costs[j] <= best) candidates[kept++] = candidates[j];
    size = kept;
  }
  const out: number[] = [];
  for (let t = last[n]; t > 0; t = last[t]) out.push(t);
  return out.reverse();
}

/**
 * Noise σ from first differences: 1.4826·MAD(Δy)/√2, robust to level shifts (a common practice
 * for setting the CUSUM/PELT scale). NaN when fewer than two consecutive non-NaN samples.
 */
export function estimateDifferenceSigma(values: ArrayLike<number>): number {
  const diffs: number[] = [];
  for (let i = 1; i < values.length; i++) {
    const d = values[i] - values[i - 1];
    if (!Number.isNaN(d)) diffs.push(d);
  }
  if (diffs.length === 0) return Number.NaN;
  const sorted = Float64Array.from(diffs).sort();
  const med = sorted[(sorted.length - 1) >> 1] / 2 + sorted[sorted.length >> 1] / 2;
  const dev = sorted.map((d) => Math.abs(d - med)).sort();
  const mad = dev[(dev.length - 1) >> 1] / 2 + dev[dev.length >> 1] / 2;
  return (1.4826 * mad) / Math.SQRT2;
}
