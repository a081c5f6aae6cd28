import assert from 'node:assert/strict';
import { computeRawCusum, computeTabularCusum } from '../../../extension/core/detect/tabularCusum';
import { detectPelt, estimateDifferenceSigma, findOptimalSplit, segmentBinary } from '../../../extension/core/detect/changePoints';

// Montgomery, Introduction to Statistical Quality Control, Example 9.1 (REFERENCE.md §4.3 item 3).
const MONTGOMERY_9_1 = [9.45, 7.99, 9.29, 11.66, 12.16, 10.18, 8.04, 11.46, 9.20, 10.34, 9.03, 11.47, 10.51, 9.40,
  10.08, 9.37, 10.62, 10.31, 8.52, 10.84, 10.90, 9.33, 12.29, 11.50, 10.60, 11.08, 10.38, 11.62, 11.31, 10.52];

// R datasets::Nile, annual flow 1871–1970 (REFERENCE.md §4.3 item 5).
const NILE = ('1120 1160 963 1210 1160 1160 813 1230 1370 1140 995 935 1110 994 1020 960 1180 799 958 1140 1100 1210 ' +
  '1150 1250 1260 1220 1030 1100 774 840 874 694 940 833 701 916 692 1020 1050 969 831 726 456 824 702 1120 1100 832 ' +
  '764 821 768 845 864 862 698 845 744 796 1040 759 781 865 845 944 984 897 822 1010 771 676 649 846 812 742 801 1040 ' +
  '860 874 848 890 744 749 838 1050 918 986 797 923 975 815 1020 906 901 1170 912 746 919 718 714 740').split(' ').map(Number);

describe('tabular CUSUM', () => {
  const result = computeTabularCusum(MONTGOMERY_9_1, { targetMean: 10, sigma: 1, k: 0.5, h: 5 });

  it('first signals at observation 29 with C+ = 5.28 and N+ = 7 (Montgomery Example 9.1)', () => {
    const first = result.signals[0];
    assert.equal(first.index + 1, 29);
    assert.equal(first.direction, 'up');
    assert.ok(Math.abs(first.sum - 5.28) < 0.005, `C+ = ${first.sum}`);
    assert.equal(first.runLength, 7);
  });

  it('estimates the shift onset at observation 23 and the new mean 11.25 (Montgomery Example 9.1)', () => {
    const first = result.signals[0];
    assert.equal(first.onsetIndex + 1, 23);
    assert.ok(Math.abs(first.estimatedMean - 11.25) < 0.005, `mu-hat = ${first.estimatedMean}`);
  });

  it('traces C+ 1.79, 2.79, 2.89, 3.47, 3.35, 4.47 over observations 23–28 and never signals down', () => {
    const expected = [1.79, 2.79, 2.89, 3.47, 3.35, 4.47];
    expected.forEach((e, j) => assert.ok(Math.abs(result.upper[22 + j] - e) < 0.005, `C+[${23 + j}] = ${result.upper[22 + j]}`));
    assert.ok(Math.max(...result.lower) <= 5);
    assert.ok(result.signals.every((s) => s.direction === 'up'));
  });

  it('carries the sums across NaN gaps instead of resetting or failing', () => {
    const gapped = [...MONTGOMERY_9_1.slice(0, 25), Number.NaN, ...MONTGOMERY_9_1.slice(25)];
    const r = computeTabularCusum(gapped, { targetMean: 10, sigma: 1 });
    assert.equal(r.upper[25], r.upper[24]);
    assert.equal(r.signals[0].index, 29);
  });

  it('rejects a non-positive sigma with a message naming the value', () => {
    assert.throws(() => computeTabularCusum([1], { targetMean: 0, sigma: 0 }), /expected sigma > 0, got 0/);
  });

  it('gives the raw cumulative sums of Montgomery & Runger Table 16-7 (target 99)', () => {
    const x = [102.0, 94.8, 98.3, 98.4, 102.0, 98.5, 99.0, 97.7, 100.0, 98.1, 101.3, 98.7, 101.1, 98.4, 97.0, 96.7, 100.3, 101.4, 97.2, 101.0];
    const s = [3.0, -1.2, -1.9, -2.5, 0.5, 0.0, 0.0, -1.3, -0.3, -1.2, 1.1, 0.8, 2.9, 2.3, 0.3, -2.0, -0.7, 1.7, -0.1, 1.9];
    const got = computeRawCusum(x, 99);
    s.forEach((e, i) => assert.ok(Math.abs(got[i] - e) < 1e-9, `s[${i}] = ${got[i]}, expected ${e}`));
  });
});

describe('optimal split and PELT', () => {
  it('splits the Nile series after observation 28 with means 1097.75 and 849.9722', () => {
    const split = findOptimalSplit(NILE, 1);
    assert.ok(split);
    assert.equal(split.index, 28);
    assert.ok(Math.abs(split.leftMean - 1097.75) < 1e-9);
    assert.ok(Math.abs(split.rightMean - 849.9722) < 1e-4);
  });

  it('estimates σ 115.32 from the differenced MAD and PELT with β = 2 ln n gives exactly [28] on the Nile', () => {
    const sigma = estimateDifferenceSigma(NILE);
    assert.ok(Math.abs(sigma - 115.32) < 0.005, `sigma = ${sigma}`);
    assert.deepEqual(detectPelt(NILE, { sigma, penalty: 2 * Math.log(100), minSegmentLength: 1 }), [28]);
  });

  it('finds [50] in 50 zeros followed by 50 tens with L2 cost and penalty 15 (sktime PELT docs example)', () => {
    const x = [...new Array<number>(50).fill(0), ...new Array<number>(50).fill(10)];
    assert.deepEqual(detectPelt(x, { penalty: 15, minSegmentLength: 1 }), [50]);
    assert.deepEqual(segmentBinary(x, { penalty: 15 }), [50]);
  });

  it('agrees with binary segmentation on a two-change toy series and ignores NaN gaps', () => {
    const x = [...new Array<number>(30).fill(1), ...new Array<number>(30).fill(6), ...new Array<number>(30).fill(2)];
    x[10] = Number.NaN; x[45] = Number.NaN;
    assert.deepEqual(detectPelt(x, { penalty: 10 }), [30, 60]);
    assert.deepEqual(segmentBinary(x, { penalty: 10 }), [30, 60]);
  });

  it('returns no change points for series too short or constant', () => {
    assert.deepEqual(detectPelt([1, 2, 3], { minSegmentLength: 2 }), []);
    assert.deepEqual(detectPelt(new Array<number>(40).fill(3)), []);
    assert.equal(findOptimalSplit([1]), undefined);
  });
});
