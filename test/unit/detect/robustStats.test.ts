import assert from 'node:assert/strict';
import { computeMad, computeMadN, computeMedian, computeModifiedZ, computeRobustScale } from '../../../extension/core/detect/robustStats';

describe('robust statistics', () => {
  // REFERENCE.md §4.3 item 7 (computed, hand-checkable): Iglewicz & Hoaglin modified z.
  const x = [2.1, 2.3, 2.2, 2.4, 2.2, 9.8, 2.3];

  it('gives median 2.3, MAD 0.1 and MAD_n 0.14826 for the worked example', () => {
    assert.ok(Math.abs(computeMedian(x) - 2.3) < 1e-12);
    assert.ok(Math.abs(computeMad(x) - 0.1) < 1e-12);
    assert.ok(Math.abs(computeMadN(x) - 0.14826) < 1e-12);
  });

  it('gives the published modified z-scores and flags only 9.8 above 3.5', () => {
    const expected = [-1.349, 0, -0.674, 0.675, -0.674, 50.588, 0];
    const m = computeModifiedZ(x);
    expected.forEach((e, i) => assert.ok(Math.abs(m[i] - e) < 1.5e-3, `M[${i}] = ${m[i]}, expected ${e}`));
    assert.deepEqual(Array.from(m).map((v) => Math.abs(v) > 3.5), [false, false, false, false, false, true, false]);
  });

  it('drops NaN gaps and keeps them as NaN in the scores', () => {
    const withGaps = [Number.NaN, ...x, Number.NaN];
    assert.ok(Math.abs(computeMedian(withGaps) - 2.3) < 1e-12);
    const m = computeModifiedZ(withGaps);
    assert.ok(Number.isNaN(m[0]) && Number.isNaN(m[8]));
    assert.ok(Math.abs(m[6] - 50.588) < 1.5e-3);
  });

  it('uses the mean-absolute-deviation rule when MAD is 0 and gives zeros for a constant series', () => {
    // Iglewicz & Hoaglin (1993) MAD = 0 rule, from memory: M = (x − x̃)/(1.253314·MeanAD).
    const m = computeModifiedZ([5, 5, 5, 5, 9]);
    assert.ok(Math.abs(m[4] - 4 / (1.253314 * 0.8)) < 1e-9);
    assert.deepEqual(Array.from(computeModifiedZ([3, 3, 3])), [0, 0, 0]);
  });

  it('falls back from MAD to IQR/1.349 to a relative scale, never to zero', () => {
    assert.equal(computeRobustScale([1, 2, 3, 4, 5]).method, 'mad');
    const iqr = computeRobustScale([0, 0, 0, 0, 0, 0, 1, 1, 1, 1]); // MAD = 0, IQR = 1
    assert.equal(iqr.method, 'iqr');
    assert.ok(Math.abs(iqr.scale - 1 / 1.349) < 1e-12);
    const rel = computeRobustScale([7, 7, 7]);
    assert.equal(rel.method, 'relative');
    assert.ok(Math.abs(rel.scale - 0.07) < 1e-12);
    assert.equal(computeRobustScale([0, 0]).scale, 1);
    assert.ok(Number.isNaN(computeRobustScale([]).median));
  });
});
