import assert from 'node:assert/strict';
import { computeAccuracy, computeMacroF1 } from '../../../training/evaluateFewShot';
import { computeMeanSd } from '../../../training/fewShotScoring';

describe('few-shot evaluation metrics', () => {
  it('macro-F1 matches the scikit-learn f1_score documentation example (average="macro" → 0.2667)', () => {
    // scikit-learn docs, sklearn.metrics.f1_score: y_true [0,1,2,0,1,2], y_pred [0,2,1,0,0,1] → macro 0.26...
    // Hand check: class 0 has tp 2, fp 1, fn 0 → F1 0.8; classes 1 and 2 have tp 0 → 0; mean 0.8/3.
    const f1 = computeMacroF1(['0', '1', '2', '0', '1', '2'], ['0', '2', '1', '0', '0', '1'], ['0', '1', '2']);
    assert.ok(Math.abs(f1 - 0.8 / 3) < 1e-12);
    // Same example: micro average = accuracy = 0.33...
    assert.ok(Math.abs(computeAccuracy(['0', '1', '2', '0', '1', '2'], ['0', '2', '1', '0', '0', '1']) - 1 / 3) < 1e-12);
  });

  it('counts a library label predicted for a built-in example as a miss of that class', () => {
    assert.equal(computeMacroF1(['a', 'b'], ['a', 'pool_leak'], ['a', 'b']), 0.5);
  });

  it('mean and population sd match the textbook example 2, 4, 4, 4, 5, 5, 7, 9 → 5 and 2, ignoring NaN', () => {
    // Worked example of the population standard deviation (Wikipedia, "Standard deviation", basic example).
    const [m, sd] = computeMeanSd([2, 4, 4, 4, Number.NaN, 5, 5, 7, 9]);
    assert.equal(m, 5);
    assert.equal(sd, 2);
    assert.ok(computeMeanSd([]).every(Number.isNaN));
  });
});
