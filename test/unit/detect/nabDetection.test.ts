import assert from 'node:assert/strict';
import { join } from 'node:path';
import { evaluateDetection } from '../../../training/evaluateDetection';

// Real cloud metrics with windows labelled outside this project: Numenta Anomaly Benchmark subset
// (test/fixtures/nab-cloud, MIT, licence kept beside the data), 20 files, 38 labelled windows.
// Rule: the single suggested incident window is a HIT for each labelled window it overlaps by at
// least one sample, and a FALSE window when it overlaps none (including the file with no label).
// Regression floor: the values measured when this detector was written (2026-12-02) were
// 16 hits, 5 false windows, median onset error 99 samples after the labelled window start (NAB
// windows are centred on the anomaly) and −1 sample from the labelled anomaly point.
// A change that does worse than that fails here.
describe('suggestWindows on the labelled cloud series (regression floor)', () => {
  let evaluation: ReturnType<typeof evaluateDetection>;
  before(function () {
    this.timeout(60_000); // 20 real files, ~112k samples; seconds on a loaded 2-core machine
    evaluation = evaluateDetection(join(__dirname, '..', '..', 'fixtures', 'nab-cloud'));
  });

  it('reads all 20 files and their 38 labelled windows', () => {
    assert.equal(evaluation.files.length, 20);
    assert.equal(evaluation.labelledWindows, 38);
  });

  it('overlaps at least 16 labelled windows with at most 5 false windows', () => {
    assert.ok(evaluation.hits >= 16, `hits ${evaluation.hits} < 16`);
    assert.ok(evaluation.falseWindows <= 5, `false windows ${evaluation.falseWindows} > 5`);
  });

  it('starts within 3 samples of the labelled anomaly point in the median', () => {
    assert.ok(Math.abs(evaluation.medianPointErrorSamples) <= 3, `median point error ${evaluation.medianPointErrorSamples}`);
  });
});
