import { strict as assert } from 'node:assert';
import { computeArgmaxRows, computeClassScores, computeConfusionMatrix, computeEce, computeMacroF1 } from '../../../training/metrics';
import { computeNll, fitTemperature } from '../../../training/calibration';

describe('training metrics', () => {
  it('computes ECE as defined by Guo et al. 2017 on a worked example', () => {
    // Worked by hand, 5 equal-width bins (0,.2],(.2,.4],(.4,.6],(.6,.8],(.8,1]:
    //   (.4,.6]: {0.55 wrong}            acc 0,   conf 0.55     → |0 − 0.55| = 0.55, weight 1/6
    //   (.6,.8]: {0.75 wrong, 0.65 right} acc 0.5, conf 0.70     → 0.20, weight 2/6
    //   (.8, 1]: {0.95 right, 0.85 right, 0.92 wrong} acc 2/3, conf 2.72/3 → 0.24, weight 3/6
    //   ECE = 0.55/6 + 0.40/6 + 0.72/6 = 1.67/6 = 0.278333…
    const conf = [0.95, 0.85, 0.75, 0.65, 0.55, 0.92];
    const ok = [true, true, false, true, false, false];
    assert.ok(Math.abs(computeEce(conf, ok, 5) - 1.67 / 6) < 1e-12);
  });

  it('gives ECE 0 for a perfectly calibrated bin and counts a confidence on a bin edge in the lower bin', () => {
    // Four predictions at confidence 0.75, three right: acc = conf = 0.75.
    assert.equal(computeEce([0.75, 0.75, 0.75, 0.75], [true, true, true, false], 10), 0);
    // 0.8 lies in (0.6, 0.8] with M = 5: alone and wrong → ECE = 0.8.
    assert.ok(Math.abs(computeEce([0.8], [false], 5) - 0.8) < 1e-12);
  });

  it('computes per-class scores and macro-F1 from a hand-computed confusion matrix', () => {
    // rows = true, cols = predicted. By hand (F1 = 2TP / (2TP + FP + FN)):
    //   A: TP 5, FP 2, FN 1 → P 5/7, R 5/6, F1 10/13
    //   B: TP 3, FP 3, FN 3 → P 1/2, R 1/2, F1 1/2
    //   C: TP 6, FP 1, FN 2 → P 6/7, R 3/4, F1 12/15
    //   macro-F1 = (10/13 + 1/2 + 4/5) / 3 = 0.689744
    const m = [[5, 1, 0], [2, 3, 1], [0, 2, 6]];
    const s = computeClassScores(m);
    assert.ok(Math.abs(s[0].precision - 5 / 7) < 1e-12 && Math.abs(s[0].recall - 5 / 6) < 1e-12);
    assert.ok(Math.abs(s[2].f1 - 0.8) < 1e-12);
    assert.ok(Math.abs(computeMacroF1(m) - (10 / 13 + 0.5 + 0.8) / 3) < 1e-12);
  });

  it('matches the scikit-learn f1_score docstring example (macro 0.2667; from memory)', () => {
    // scikit-learn docs, sklearn.metrics.f1_score: y_true=[0,1,2,0,1,2], y_pred=[0,2,1,0,0,1]
    // → per class [0.8, 0, 0], macro 0.26666666666666666 (values recalled from the docstring).
    const m = computeConfusionMatrix([0, 1, 2, 0, 1, 2], [0, 2, 1, 0, 0, 1], 3);
    assert.deepEqual(computeClassScores(m).map((c) => Number(c.f1.toFixed(12))), [0.8, 0, 0]);
    assert.ok(Math.abs(computeMacroF1(m) - 0.26666666666666666) < 1e-12);
  });

  it('refuses labels out of range, naming the position', () => {
    assert.throws(() => computeConfusionMatrix([0, 3], [0, 0], 3), /expected labels in 0\.\.2, got true 3, predicted 0 at 1/);
  });

  it('takes row argmax', () => {
    assert.deepEqual(Array.from(computeArgmaxRows([0.1, 0.7, 0.2, 0.5, 0.3, 0.2], 3)), [1, 0]);
  });
});

describe('temperature scaling (Guo et al. 2017)', () => {
  it('recovers the temperature of logits that are exactly calibrated after division by T', () => {
    // Draw labels from softmax(z) and feed logits 3z: the NLL-optimal temperature is ≈ 3.
    let state = 12345;
    const rand = (): number => { state = (state * 1103515245 + 12345) % 2147483648; return state / 2147483648; };
    const n = 4000;
    const c = 3;
    const logits = new Float64Array(n * c);
    const labels: number[] = [];
    for (let i = 0; i < n; i++) {
      const z = [rand() * 4 - 2, rand() * 4 - 2, rand() * 4 - 2];
      const e = z.map(Math.exp);
      const s = e[0] + e[1] + e[2];
      const u = rand();
      labels.push(u < e[0] / s ? 0 : u < (e[0] + e[1]) / s ? 1 : 2);
      for (let j = 0; j < c; j++) logits[i * c + j] = 3 * z[j];
    }
    const t = fitTemperature(logits, labels, c);
    assert.ok(Math.abs(t - 3) < 0.3, `temperature ${t}`);
    assert.ok(computeNll(logits, labels, c, t) <= computeNll(logits, labels, c, 1));
  });
});
