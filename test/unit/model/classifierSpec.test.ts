import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { parseClassifierSpec } from '../../../extension/core/model/classifierSpec';
import { computeCalibratedLogProbabilities } from '../../../extension/core/model/classifier';

const JSON_PATH = join(__dirname, '..', '..', '..', 'media', 'model', 'classifier.json');

describe('classifier.json', () => {
  const raw = JSON.parse(readFileSync(JSON_PATH, 'utf8')) as Record<string, unknown>;

  it('parses the bundled file with the FAMILIES order and a 64-hex sha256', () => {
    const spec = parseClassifierSpec(raw);
    assert.equal(spec.families[0], 'cpu');
    assert.match(spec.sha256, /^[0-9a-f]{64}$/);
    assert.ok(Math.abs(spec.classPriors.reduce((a, b) => a + b, 0) - 1) < 1e-4);
  });

  it('names the field, the expectation and the value when a field is wrong', () => {
    assert.throws(() => parseClassifierSpec({ ...raw, temperature: -1 }), /expected "temperature" > 0, got -1/);
    assert.throws(() => parseClassifierSpec({ ...raw, classes: ['normal'] }), /expected "classes" = \[/);
    assert.throws(() => parseClassifierSpec({ ...raw, sha256: 'abc' }), /expected "sha256" as 64 hex digits, got "abc"/);
    assert.throws(() => parseClassifierSpec({ ...raw, windowSpec: { ...(raw.windowSpec as object), sampleCount: 'x' } }), /windowSpec\.sampleCount/);
  });
});

describe('calibrated log-probabilities', () => {
  it('equal log softmax(logits / T) (worked example)', () => {
    // logits [2, 0], T = 2 → softmax([1, 0]) = [e/(e+1), 1/(e+1)] = [0.731059, 0.268941].
    const lp = computeCalibratedLogProbabilities([2, 0], 2);
    assert.ok(Math.abs(Math.exp(lp[0]) - Math.E / (Math.E + 1)) < 1e-12);
    assert.ok(Math.abs(Math.exp(lp[1]) - 1 / (Math.E + 1)) < 1e-12);
  });
});
