/**
 * Hand-written trainer of the set model (training/setModel.ts): exact backpropagation through the
 * forward pass of `forwardSetModel`, Adam (Kingma & Ba 2015), cosine learning-rate decay, L2 weight
 * decay, and random metric dropout (node masking) so that subsets of metrics stay in distribution,
 * which the Shapley explanation relies on. Seeded: same data + options → same weights.
 *
 * Why not tfjs autodiff: measured here, the tfjs CPU backend trained this model at ~11 examples/s on
 * the shared 2-core machine; these plain loops skip masked nodes and run far faster.
 */
import type { EncodedExample } from './buildDataset';
import { createRandom, FAMILY_COUNT, getPooledSize, initSetModel, type SetModelShape, type SetModelWeights } from './setModel';

export interface TrainOptions {
  readonly epochs: number;
  readonly batchSize: number;
  readonly learningRate: number;
  readonly weightDecay: number;
  /** Probability that an example's metrics are thinned at random in a training step. */
  readonly nodeDropoutRate: number;
  /** Per-class loss weights (length classCount); defaults to 1. */
  readonly classWeights?: Float64Array;
  readonly seed: number;
  readonly onEpoch?: (epoch: number, loss: number, seconds: number) => void;
}

const PARAM_NAMES = ['w1', 'b1', 'w2', 'b2', 'wc', 'bc', 'wo', 'bo'] as const;
type ParamName = (typeof PARAM_NAMES)[number];
type ParamSet = Record<ParamName, Float32Array>;
type GradSet = Record<ParamName, Float64Array>;

function zeroGrads(w: ParamSet): GradSet {
  const g = {} as GradSet;
  for (const name of PARAM_NAMES) g[name] = new Float64Array(w[name].length);
  return g;
}

/** y += W x for W row-major [inSize, outSize] (x is the input vector). */
function dense(x: Float64Array, w: Float32Array, b: Float32Array, out: Float64Array): void {
  const o = out.length;
  for (let j = 0; j < o; j++) out[j] = b[j];
  for (let i = 0; i < x.length; i++) {
    const v = x[i];
    if (v === 0) continue;
    const r = i * o;
    for (let j = 0; j < o; j++) out[j] += v * w[r + j];
  }
}

/** Accumulate dW += x ⊗ dy, db += dy and return dx = W dy (when wanted). */
function denseBackward(x: Float64Array, dy: Float64Array, w: Float32Array, gw: Float64Array, gb: Float64Array, dx: Float64Array | null): void {
  const o = dy.length;
  for (let j = 0; j < o; j++) gb[j] += dy[j];
  for (let i = 0; i < x.length; i++) {
    const v = x[i];
    const r = i * o;
    let acc = 0;
    for (let j = 0; j < o; j++) {
      if (v !== 0) gw[r + j] += v * dy[j];
      acc += w[r + j] * dy[j];
    }
    if (dx) dx[i] = acc;
  }
}

interface NodeCache { x: Float64Array; a1: Float64Array; h1: Float64Array; a2: Float64Array; h2: Float64Array; family: number }

/**
 * Loss (weighted softmax cross-entropy) of one example, accumulating gradients scaled by `scale`.
 * `mask` may be a thinned copy of the example's mask. Returns the unscaled loss.
 */
export function accumulateExampleGradient(w: SetModelWeights, ex: EncodedExample, mask: Float32Array, g: GradSet | null, scale: number, lossWeight = 1): number {
  const { featureCount: f, hiddenSize: h, embeddingSize: d, classCount: c } = w.shape;
  const nodes: NodeCache[] = [];
  const famCount = new Float64Array(FAMILY_COUNT);
  for (let n = 0; n < mask.length; n++) {
    if (mask[n] === 0) continue;
    const x = new Float64Array(f + FAMILY_COUNT);
    for (let i = 0; i < f; i++) x[i] = (ex.features[n * f + i] - w.featureMean[i]) / w.featureStd[i];
    x[f + ex.familyIds[n]] = 1;
    const a1 = new Float64Array(h); dense(x, w.w1, w.b1, a1);
    const h1 = a1.map((v) => (v > 0 ? v : 0));
    const a2 = new Float64Array(h); dense(h1, w.w2, w.b2, a2);
    const h2 = a2.map((v) => (v > 0 ? v : 0));
    nodes.push({ x, a1, h1, a2, h2, family: ex.familyIds[n] });
    famCount[ex.familyIds[n]] += 1;
  }
  const pooledSize = getPooledSize(w.shape);
  const pooled = new Float64Array(pooledSize);
  const argMax = new Int32Array(FAMILY_COUNT * h).fill(-1);
  const maxOffset = FAMILY_COUNT * h;
  const presenceOffset = 2 * FAMILY_COUNT * h;
  const globalOffset = presenceOffset + FAMILY_COUNT;
  const total = Math.max(nodes.length, 1);
  nodes.forEach((node, idx) => {
    const k = node.family;
    const divisor = Math.max(famCount[k], 1);
    for (let j = 0; j < h; j++) {
      const v = node.h2[j];
      pooled[k * h + j] += v / divisor;
      if (v > pooled[maxOffset + k * h + j]) { pooled[maxOffset + k * h + j] = v; argMax[k * h + j] = idx; }
      pooled[globalOffset + j] += v / total;
    }
  });
  for (let k = 0; k < FAMILY_COUNT; k++) pooled[presenceOffset + k] = Math.min(famCount[k], 1);
  const ae = new Float64Array(d); dense(pooled, w.wc, w.bc, ae);
  const e = ae.map((v) => (v > 0 ? v : 0));
  const logits = new Float64Array(c); dense(e, w.wo, w.bo, logits);
  let maxLogit = -Infinity;
  for (const v of logits) maxLogit = Math.max(maxLogit, v);
  let sum = 0;
  const prob = logits.map((v) => { const p = Math.exp(v - maxLogit); sum += p; return p; });
  for (let j = 0; j < c; j++) prob[j] /= sum;
  const loss = -Math.log(Math.max(prob[ex.label], 1e-12)) * lossWeight;
  if (!g) return loss;
  const dLogits = prob.map((p, j) => (p - (j === ex.label ? 1 : 0)) * scale * lossWeight);
  const de = new Float64Array(d);
  denseBackward(e, dLogits, w.wo, g.wo, g.bo, de);
  for (let j = 0; j < d; j++) if (ae[j] <= 0) de[j] = 0;
  const dPooled = new Float64Array(pooledSize);
  denseBackward(pooled, de, w.wc, g.wc, g.bc, dPooled);
  const dh1 = new Float64Array(h);
  const dx = null;
  nodes.forEach((node, idx) => {
    const k = node.family;
    const divisor = Math.max(famCount[k], 1);
    const da2 = new Float64Array(h);
    for (let j = 0; j < h; j++) {
      let grad = dPooled[k * h + j] / divisor + dPooled[globalOffset + j] / total;
      if (argMax[k * h + j] === idx) grad += dPooled[maxOffset + k * h + j];
      da2[j] = node.a2[j] > 0 ? grad : 0;
    }
    denseBackward(node.h1, da2, w.w2, g.w2, g.b2, dh1);
    for (let j = 0; j < h; j++) if (node.a1[j] <= 0) dh1[j] = 0;
    denseBackward(node.x, dh1, w.w1, g.w1, g.b1, dx);
  });
  return loss;
}

function createThinner(random: () => number, rate: number): (mask: Float32Array) => Float32Array {
  return (mask) => {
    if (random() >= rate) return mask;
    const keep = 0.2 + 0.8 * random();
    const out = Float32Array.from(mask, (m) => (m > 0 && random() < keep ? 1 : 0));
    // Keep at least one usable metric so the label still has evidence behind it.
    if (!out.some((m) => m > 0)) {
      const usable = [...mask.keys()].filter((k) => mask[k] > 0);
      if (usable.length > 0) out[usable[Math.floor(random() * usable.length)]] = 1;
    }
    return out;
  };
}

function shuffle<T>(items: T[], random: () => number): void {
  for (let i = items.length - 1; i > 0; i--) {
    const j = Math.floor(random() * (i + 1));
    [items[i], items[j]] = [items[j], items[i]];
  }
}

/** Train from `initSetModel(shape, seed)`; `normalization` is baked into the returned weights. */
export function trainSetModel(examples: readonly EncodedExample[], shape: SetModelShape, normalization: { mean: Float32Array; std: Float32Array }, options: TrainOptions): SetModelWeights {
  const init = initSetModel(shape, options.seed);
  const weights: SetModelWeights = { ...init, featureMean: normalization.mean, featureStd: normalization.std };
  const params = weights as unknown as ParamSet;
  const m1 = zeroGrads(params);
  const m2 = zeroGrads(params);
  const random = createRandom(options.seed ^ 0x5bd1e995);
  const thin = createThinner(random, options.nodeDropoutRate);
  const order = [...examples];
  const beta1 = 0.9;
  const beta2 = 0.999;
  let step = 0;
  const stepsPerEpoch = Math.ceil(order.length / options.batchSize);
  for (let epoch = 0; epoch < options.epochs; epoch++) {
    const started = Date.now();
    shuffle(order, random);
    let lossSum = 0;
    for (let s = 0; s < stepsPerEpoch; s++) {
      // Cosine decay (Loshchilov & Hutter 2017) per step over the whole run.
      const progress = (epoch * stepsPerEpoch + s) / (options.epochs * stepsPerEpoch);
      const lr = options.learningRate * 0.5 * (1 + Math.cos(Math.PI * progress));
      const batch = order.slice(s * options.batchSize, (s + 1) * options.batchSize);
      const g = zeroGrads(params);
      for (const ex of batch) {
        const weight = options.classWeights ? options.classWeights[ex.label] : 1;
        lossSum += accumulateExampleGradient(weights, ex, thin(ex.mask), g, 1 / batch.length, weight) / order.length;
      }
      step++;
      for (const name of PARAM_NAMES) {
        const p = params[name];
        const grad = g[name];
        const isMatrix = name.startsWith('w');
        for (let i = 0; i < p.length; i++) {
          const gi = grad[i] + (isMatrix ? 2 * options.weightDecay * p[i] : 0);
          m1[name][i] = beta1 * m1[name][i] + (1 - beta1) * gi;
          m2[name][i] = beta2 * m2[name][i] + (1 - beta2) * gi * gi;
          const mHat = m1[name][i] / (1 - beta1 ** step);
          const vHat = m2[name][i] / (1 - beta2 ** step);
          p[i] -= (lr * mHat) / (Math.sqrt(vHat) + 1e-8);
        }
      }
    }
    options.onEpoch?.(epoch, lossSum, (Date.now() - started) / 1000);
  }
  return weights;
}

/** Exposed for the gradient check in tests. */
export { zeroGrads, PARAM_NAMES };
export type { GradSet, ParamSet };
