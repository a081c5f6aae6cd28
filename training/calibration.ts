/**
 * Temperature scaling (Guo et al. 2017, "On Calibration of Modern Neural Networks"): one scalar
 * T > 0 fitted on held-out data by minimizing the negative log-likelihood of softmax(logits / T).
 */

/** Mean negative log-likelihood of `labels` under softmax(logits / T); logits row-major [n, c]. */
export function computeNll(logits: Float64Array, labels: ArrayLike<number>, classCount: number, temperature: number): number {
  const n = labels.length;
  let total = 0;
  for (let i = 0; i < n; i++) {
    let max = -Infinity;
    for (let j = 0; j < classCount; j++) max = Math.max(max, logits[i * classCount + j] / temperature);
    let sum = 0;
    for (let j = 0; j < classCount; j++) sum += Math.exp(logits[i * classCount + j] / temperature - max);
    total += max + Math.log(sum) - logits[i * classCount + labels[i]] / temperature;
  }
  return n === 0 ? 0 : total / n;
}

/**
 * The temperature minimizing NLL, by golden-section search over log T in [log 0.05, log 20]
 * (NLL is unimodal in T for fixed logits). Returns 1 for empty input.
 */
export function fitTemperature(logits: Float64Array, labels: ArrayLike<number>, classCount: number): number {
  if (labels.length === 0) return 1;
  let lo = Math.log(0.05);
  let hi = Math.log(20);
  const ratio = (Math.sqrt(5) - 1) / 2;
  let a = hi - ratio * (hi - lo);
  let b = lo + ratio * (hi - lo);
  let fa = computeNll(logits, labels, classCount, Math.exp(a));
  let fb = computeNll(logits, labels, classCount, Math.exp(b));
  for (let iter = 0; iter < 80 && hi - lo > 1e-6; iter++) {
    if (fa < fb) { hi = b; b = a; fb = fa; a = hi - ratio * (hi - lo); fa = computeNll(logits, labels, classCount, Math.exp(a)); }
    else { lo = a; a = b; fa = fb; b = lo + ratio * (hi - lo); fb = computeNll(logits, labels, classCount, Math.exp(b)); }
  }
  return Math.exp((lo + hi) / 2);
}

/** Row-wise softmax(logits / T), row-major [n, c]. */
export function computeProbabilities(logits: Float64Array, classCount: number, temperature: number): Float64Array {
  const out = new Float64Array(logits.length);
  for (let i = 0; i < logits.length / classCount; i++) {
    let max = -Infinity;
    for (let j = 0; j < classCount; j++) max = Math.max(max, logits[i * classCount + j] / temperature);
    let sum = 0;
    for (let j = 0; j < classCount; j++) { const e = Math.exp(logits[i * classCount + j] / temperature - max); out[i * classCount + j] = e; sum += e; }
    for (let j = 0; j < classCount; j++) out[i * classCount + j] /= sum;
  }
  return out;
}
