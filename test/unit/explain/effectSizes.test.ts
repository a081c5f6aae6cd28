import assert from 'node:assert/strict';
import { computeEffectSizes, computeHodgesLehmann, describeCliffsDelta } from '../../../extension/core/explain/effectSizes';
import { computeKolmogorovSmirnov, computeMannWhitney } from '../../../extension/core/explain/rankTests';
import { computeErfc, computeNormalSf } from '../../../extension/core/explain/normalDistribution';

// REFERENCE.md §4.3 item 8 (computed with scipy 1.17.1, hand-checkable).
const A = [1.2, 1.4, 1.9, 2.0, 2.3, 2.5, 2.6, 3.1];
const B = [2.8, 3.0, 3.3, 3.6, 3.9, 4.1, 4.4, 5.0];

describe('Mann–Whitney U', () => {
  // scipy.stats.mannwhitneyu docstring example (data from Shier 2004), REFERENCE.md §4.3 item 1.
  const males = [19, 22, 16, 29, 24];
  const females = [20, 11, 17, 12];

  it('gives U = 17 with exact two-sided p = 0.1111111111111111 for the scipy example', () => {
    const r = computeMannWhitney(males, females);
    assert.equal(r.u, 17);
    assert.equal(r.method, 'exact');
    assert.ok(Math.abs(r.p - 0.1111111111111111) < 1e-12);
  });

  it('gives asymptotic p = 0.11134688653314041 with continuity correction for the same data', () => {
    const r = computeMannWhitney(males, females, 'asymptotic');
    assert.ok(Math.abs(r.p - 0.11134688653314041) < 1e-10, `p = ${r.p}`);
  });

  it('gives U(a) = 2 and exact p = 0.00062160 for the KS worked example samples', () => {
    const r = computeMannWhitney(A, B);
    assert.equal(r.u, 2);
    assert.ok(Math.abs(r.p - 0.0006216) < 1e-7);
  });

  it('switches to the normal approximation when there are ties and counts ties as one half', () => {
    const r = computeMannWhitney([1, 2, 2, 3], [2, 4, 5]);
    assert.equal(r.method, 'normal');
    assert.equal(r.hasTies, true);
    assert.equal(r.u, 2); // by hand: x=3 > y=2 (1) plus x=2 tying y=2 twice (½ + ½)
  });
});

describe('Kolmogorov–Smirnov, Cliff δ, Hodges–Lehmann and robust z (worked example)', () => {
  it('gives KS D = 0.875 with exact p = 0.0024864', () => {
    const r = computeKolmogorovSmirnov(A, B);
    assert.equal(r.d, 0.875);
    assert.equal(r.method, 'exact');
    assert.ok(Math.abs(r.p - 0.0024864) < 1e-7, `p = ${r.p}`);
  });

  it('gives Cliff δ = 0.9375, A = 0.96875, HL shift 1.6, medians 2.15 → 3.75 and robust z 2.698', () => {
    const e = computeEffectSizes(A, B);
    assert.ok(Math.abs(e.cliffsDelta - 0.9375) < 1e-12);
    assert.ok(Math.abs(e.varghaDelaneyA - 0.96875) < 1e-12);
    assert.equal(e.mannWhitneyU, 62);
    assert.ok(Math.abs(e.hodgesLehmann - 1.6) < 1e-12);
    assert.ok(Math.abs(e.baselineMedian - 2.15) < 1e-12 && Math.abs(e.incidentMedian - 3.75) < 1e-12);
    assert.ok(Math.abs(e.baselineScale - 0.59304) < 1e-9);
    assert.ok(Math.abs(e.robustZ - 2.698) < 5e-4, `z = ${e.robustZ}`);
    assert.equal(e.isPValueIndicative, true);
    assert.equal(describeCliffsDelta(e.cliffsDelta), 'large');
  });

  it('derives A = 0.85 and δ = 0.70 for the Mann–Whitney example (REFERENCE.md §4.3 item 1)', () => {
    const e = computeEffectSizes([20, 11, 17, 12], [19, 22, 16, 29, 24]);
    assert.ok(Math.abs(e.varghaDelaneyA - 0.85) < 1e-12 && Math.abs(e.cliffsDelta - 0.7) < 1e-12);
  });

  it('drops NaN samples and reports NaN effects, not a crash, when a side is empty', () => {
    const withGaps = computeEffectSizes([...A, Number.NaN], [Number.NaN, ...B]);
    assert.ok(Math.abs(withGaps.cliffsDelta - 0.9375) < 1e-12);
    assert.equal(withGaps.baselineCount, 8);
    const empty = computeEffectSizes([Number.NaN], B);
    assert.equal(empty.baselineCount, 0);
    assert.ok(Number.isNaN(empty.robustZ) && Number.isNaN(empty.cliffsDelta) && Number.isNaN(empty.mannWhitneyP));
  });

  it('guards a constant baseline: relative scale 1% of the median instead of dividing by zero', () => {
    const e = computeEffectSizes([50, 50, 50, 50], [55, 56, 54]);
    assert.equal(e.baselineScaleMethod, 'relative');
    assert.ok(Math.abs(e.robustZ - 5 / 0.5) < 1e-12);
  });

  it('thins huge samples for Hodges–Lehmann and says so', () => {
    const x = Float64Array.from({ length: 2000 }, (_, i) => i);
    const y = Float64Array.from({ length: 2000 }, (_, i) => i + 10);
    const r = computeHodgesLehmann(x, y);
    assert.equal(r.isApproximate, true);
    assert.ok(Math.abs(r.shift - 10) < 1.5, `shift ${r.shift}`);
  });
});

describe('normal tail', () => {
  it('matches erfc tables: erfc(0.5) = 0.4795001221869535, erfc(2) = 0.004677734981047266 (Abramowitz & Stegun Table 7.1, from memory)', () => {
    assert.ok(Math.abs(computeErfc(0.5) - 0.4795001221869535) < 1e-14);
    assert.ok(Math.abs(computeErfc(2) - 0.004677734981047266) < 1e-16);
    assert.ok(Math.abs(computeNormalSf(1.959963984540054) - 0.025) < 1e-12); // common practice: z₀.₉₇₅ = 1.96
  });
});
