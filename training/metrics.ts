/**
 * Evaluation metrics: confusion matrix, per-class precision/recall/F1, macro-F1, and the expected
 * calibration error (ECE) exactly as defined by Guo et al. 2017 (equal-width confidence bins).
 */

/** Confusion matrix [true][predicted] of integer labels in 0..classCount−1. */
export function computeConfusionMatrix(trueLabels: ArrayLike<number>, predicted: ArrayLike<number>, classCount: number): number[][] {
  if (trueLabels.length !== predicted.length) throw new Error(`expected as many predictions as labels (${trueLabels.length}), got ${predicted.length}`);
  const m = Array.from({ length: classCount }, () => new Array<number>(classCount).fill(0));
  for (let i = 0; i < trueLabels.length; i++) {
    const t = trueLabels[i];
    const p = predicted[i];
    if (!(t >= 0 && t < classCount && p >= 0 && p < classCount)) throw new Error(`expected labels in 0..${classCount - 1}, got true ${t}, predicted ${p} at ${i}`);
    m[t][p]++;
  }
  return m;
}

export interface ClassScores {
  readonly precision: number;
  readonly recall: number;
  readonly f1: number;
  readonly support: number;
}

/**
 * Per-class precision, recall and F1 from a confusion matrix [true][predicted]. A class never
 * predicted has precision 0; a class with no support has recall 0 (the scikit-learn convention with zero_division=0).
 */
export function computeClassScores(confusion: readonly (readonly number[])[]): ClassScores[] {
  const c = confusion.length;
  return confusion.map((row, k) => {
    const tp = row[k];
    let predictedK = 0;
    for (let t = 0; t < c; t++) predictedK += confusion[t][k];
    const support = row.reduce((a, b) => a + b, 0);
    const precision = predictedK > 0 ? tp / predictedK : 0;
    const recall = support > 0 ? tp / support : 0;
    const f1 = precision + recall > 0 ? (2 * precision * recall) / (precision + recall) : 0;
    return { precision, recall, f1, support };
  });
}

/** Unweighted mean of per-class F1. */
export function computeMacroF1(confusion: readonly (readonly number[])[]): number {
  const scores = computeClassScores(confusion);
  return scores.reduce((a, s) => a + s.f1, 0) / Math.max(1, scores.length);
}

/**
 * Expected calibration error (Guo et al. 2017, eq. 3): ECE = Σ_m |B_m|/n · |acc(B_m) − conf(B_m)|
 * over `binCount` equal-width bins ((m−1)/M, m/M] of the top-class confidence. Empty input → 0.
 */
export function computeEce(confidences: ArrayLike<number>, isCorrect: ArrayLike<boolean>, binCount = 15): number {
  const n = confidences.length;
  if (n === 0) return 0;
  const count = new Float64Array(binCount);
  const correct = new Float64Array(binCount);
  const confSum = new Float64Array(binCount);
  for (let i = 0; i < n; i++) {
    const conf = confidences[i];
    // Bin (m−1)/M < conf ≤ m/M; conf = 0 goes to the first bin.
    const bin = Math.min(binCount - 1, Math.max(0, Math.ceil(conf * binCount) - 1));
    count[bin]++;
    confSum[bin] += conf;
    if (isCorrect[i]) correct[bin]++;
  }
  let ece = 0;
  for (let m = 0; m < binCount; m++) {
    if (count[m] === 0) continue;
    ece += (count[m] / n) * Math.abs(correct[m] / count[m] - confSum[m] / count[m]);
  }
  return ece;
}

/** Index of the largest entry in each row of a row-major [n, c] matrix. */
export function computeArgmaxRows(matrix: ArrayLike<number>, classCount: number): Int32Array {
  const n = Math.floor(matrix.length / classCount);
  const out = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    let best = 0;
    for (let j = 1; j < classCount; j++) if (matrix[i * classCount + j] > matrix[i * classCount + best]) best = j;
    out[i] = best;
  }
  return out;
}
