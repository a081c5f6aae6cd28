/**
 * Tests with the REAL bundled model (media/model) under plain Node and onnxruntime-node.
 * Inputs are real cloud metrics from the NAB corpus (test/fixtures/nab-cloud, MIT licence).
 */
import { strict as assert } from 'node:assert';
import { copyFileSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { inferFamily } from '../../../extension/core/frame/families';
import type { FrameSeries, MetricFrame } from '../../../extension/core/frame/types';
import { createClassifier } from '../../../extension/core/model/classifier';
import { encodeMetricWindows } from '../../../extension/core/model/encode';
import { computeNodeFeatures } from '../../../extension/core/model/temporalFeatures';
import type { MetricWindow, NodeBatch } from '../../../extension/core/model/types';
import { loadClassifierModel, type LoadedClassifier } from '../../../extension/runtime/onnxRunner';
import { readSetModelWeights } from '../../../training/onnx/writeClassifierOnnx';
import { forwardSetModel } from '../../../training/setModel';

const MODEL_DIR = join(__dirname, '..', '..', '..', 'media', 'model');
const NAB_DIR = join(__dirname, '..', '..', 'fixtures', 'nab-cloud', 'series');
const STEPS = 400;

function readNabSeries(): FrameSeries[] {
  return readdirSync(NAB_DIR).filter((f) => f.endsWith('.csv')).sort().map((file) => {
    const lines = readFileSync(join(NAB_DIR, file), 'utf8').trim().split('\n');
    const name = lines[0].split(',')[1];
    const values = Float64Array.from(lines.slice(1, STEPS + 1), (l) => Number(l.split(',')[1]));
    return { id: file, name, labels: {}, family: inferFamily(name), kind: 'gauge', isConvertedToRate: false, values, gapFraction: 0 };
  });
}

function makeFrame(series: readonly FrameSeries[]): MetricFrame {
  return { timesMs: Float64Array.from({ length: STEPS }, (_, i) => i * 300_000), stepMs: 300_000, series, warnings: [], assumptions: [], duplicateCount: 0 };
}

const INCIDENT = { startIndex: 300, endIndex: 329 };
const BASELINE = { startIndex: 200, endIndex: 299 };

describe('bundled classifier model (real ONNX, onnxruntime-node)', () => {
  let model: LoadedClassifier;
  let nab: FrameSeries[];
  before(async () => {
    model = await loadClassifierModel(MODEL_DIR);
    nab = readNabSeries();
  });
  after(async () => { await model.runner.release(); });

  it('gives the same probabilities, within 1e-5, whatever the metric order', async () => {
    const classifier = createClassifier(model.runner, model.spec);
    const a = await classifier.classifyWindow(makeFrame(nab), INCIDENT, BASELINE);
    const shuffled = [...nab].reverse();
    [shuffled[0], shuffled[5]] = [shuffled[5], shuffled[0]];
    const b = await classifier.classifyWindow(makeFrame(shuffled), INCIDENT, BASELINE);
    for (let k = 0; k < a.probabilities.length; k++) assert.ok(Math.abs(a.probabilities[k] - b.probabilities[k]) <= 1e-5);
    assert.ok(Math.abs(a.probabilities.reduce((x, y) => x + y, 0) - 1) < 1e-6);
  });

  it('ignores padding rows with mask 0 exactly', async () => {
    const metrics: MetricWindow[] = nab.slice(0, 4).map((s) => ({ id: s.id, family: s.family, baseline: s.values.subarray(200, 300), window: s.values.subarray(300, 330) }));
    const plain = encodeMetricWindows(metrics);
    const padded = encodeMetricWindows([...metrics, ...metrics.map((m) => ({ ...m, family: 'latency' as const }))]);
    padded.mask.fill(0, 4);
    // Padding rows carry real-looking values and another family: only the mask hides them.
    const a = await model.runner.run(plain);
    const b = await model.runner.run(padded);
    for (let k = 0; k < a.logits.length; k++) assert.ok(Math.abs(a.logits[k] - b.logits[k]) <= 1e-5);
  });

  it('classifies one metric and 500 metrics', async () => {
    const classifier = createClassifier(model.runner, model.spec);
    const one = await classifier.classifyWindow(makeFrame(nab.slice(0, 1)), INCIDENT, BASELINE);
    assert.equal(one.usedMetricCount, 1);
    const many: FrameSeries[] = [];
    for (let i = 0; i < 500; i++) {
      const s = nab[i % nab.length];
      many.push({ ...s, id: `${s.id}#${i}`, values: s.values.map((v) => v * (1 + (i % 7) * 0.1)) });
    }
    const v = await classifier.classifyWindow(makeFrame(many), INCIDENT, BASELINE);
    assert.equal(v.usedMetricCount, 500);
    assert.ok(v.probabilities.every((p) => Number.isFinite(p) && p >= 0 && p <= 1));
  });

  it('handles NaN gaps: gappy metrics are used or skipped, never turned into NaN output', async () => {
    const gappy = nab.slice(0, 3).map((s, i) => {
      const values = Float64Array.from(s.values);
      for (let t = 0; t < values.length; t += i + 2) values[t] = Number.NaN;
      return { ...s, values };
    });
    const allGap = { ...nab[3], id: 'all-gap', values: new Float64Array(STEPS).fill(Number.NaN) };
    const classifier = createClassifier(model.runner, model.spec);
    const v = await classifier.classifyWindow(makeFrame([...gappy, allGap]), INCIDENT, BASELINE);
    assert.deepEqual(v.skippedMetricIds, ['all-gap']);
    assert.ok(v.probabilities.every((p) => Number.isFinite(p)));
    const none = await classifier.classifyWindow(makeFrame([allGap]), INCIDENT, BASELINE);
    assert.equal(none.isAbstained, true);
    assert.match(none.abstainReason ?? '', /no metric has enough valid samples/);
  });

  it('refuses NaN values handed straight to the runner, naming the position', async () => {
    const batch = encodeMetricWindows([{ id: 'a', family: 'cpu', baseline: nab[0].values.subarray(0, 50), window: nab[0].values.subarray(50, 60) }]);
    const broken: NodeBatch = { ...batch, values: Float32Array.from(batch.values, (v, i) => (i === 7 ? Number.NaN : v)) };
    await assert.rejects(model.runner.run(broken), /expected finite values, got NaN at flat index 7/);
  });

  it('agrees with the trainer forward pass (TypeScript) within 1e-4', async () => {
    const weights = readSetModelWeights(readFileSync(join(MODEL_DIR, 'classifier.onnx')));
    const metrics: MetricWindow[] = nab.map((s, i) => ({ id: s.id, family: s.family, baseline: s.values.subarray(100, 100 + 20 + i * 5), window: s.values.subarray(300, 303 + i * 4) }));
    const batch = encodeMetricWindows(metrics, model.spec.windowSpec);
    const out = await model.runner.run(batch);
    const features = computeNodeFeatures(batch.values, batch.nodeCount, model.spec.windowSpec);
    const reference = forwardSetModel(weights, features, Array.from(batch.families, Number), batch.mask);
    for (let k = 0; k < out.classCount; k++) assert.ok(Math.abs(out.logits[k] - reference.logits[k]) <= 1e-4, `logit ${k}`);
    for (let k = 0; k < out.embeddingSize; k++) assert.ok(Math.abs(out.embedding[k] - reference.embedding[k]) <= 1e-4, `embedding ${k}`);
  });

  it('refuses a tampered model file, naming both hashes', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'classifier-'));
    copyFileSync(join(MODEL_DIR, 'classifier.json'), join(dir, 'classifier.json'));
    const bytes = readFileSync(join(MODEL_DIR, 'classifier.onnx'));
    bytes[bytes.length - 10] ^= 0x01;
    writeFileSync(join(dir, 'classifier.onnx'), bytes);
    await assert.rejects(loadClassifierModel(dir), (e: Error) => /sha256 [0-9a-f]{64} does not match [0-9a-f]{64}/.test(e.message) && e.message.includes(model.spec.sha256));
  });

  it('gives subset values with v(∅) = log class prior and v(all) = log of the verdict probability', async () => {
    const frame = makeFrame(nab.slice(0, 6));
    const classifier = createClassifier(model.runner, model.spec);
    const verdict = await classifier.classifyWindow(frame, INCIDENT, BASELINE);
    const value = classifier.createSubsetValue(frame, INCIDENT, BASELINE, verdict.classIndex);
    const v = await value([new Uint8Array(6), new Uint8Array(6).fill(1), Uint8Array.of(1, 0, 1, 0, 0, 0)]);
    assert.ok(Math.abs(v[0] - Math.log(model.spec.classPriors[verdict.classIndex])) < 1e-9);
    assert.ok(Math.abs(v[1] - Math.log(verdict.probability)) < 1e-5);
    assert.ok(v[2] <= 0 && Number.isFinite(v[2]));
  });

  it('produces a stride-1 timeline whose probabilities sum to 1', async () => {
    const classifier = createClassifier(model.runner, model.spec);
    const points = await classifier.timeline(makeFrame(nab.slice(0, 5)), { windowSteps: 12, baselineSteps: 48 });
    const first = model.spec.windowSpec.minBaselineSamples + 12 - 1;
    assert.equal(points.length, STEPS - first);
    assert.equal(points[0].index, first);
    for (const p of points) {
      assert.ok(Math.abs(p.probabilities.reduce((a, b) => a + b, 0) - 1) < 1e-6);
      assert.equal(p.index - p.startIndex + 1, 12, 'each point classifies the 12 steps ending at its index');
    }
    await assert.rejects(classifier.timeline(makeFrame(nab.slice(0, 2)), { isCancelled: () => true }), /cancelled/);
  });

  it('compares timeline windows during and after an excluded incident with the steps before it', async () => {
    const classifier = createClassifier(model.runner, model.spec);
    const frame = makeFrame(nab.slice(0, 5));
    const options = { windowSteps: 12, baselineSteps: 48 };
    const plain = await classifier.timeline(frame, options);
    const excluding = await classifier.timeline(frame, { ...options, excludeFromBaseline: [INCIDENT] });
    const at = (points: typeof plain, end: number): Float64Array => points.find((p) => p.index === end)!.probabilities;
    // A window inside the incident (steps 309..320): its baseline is the 48 steps before the incident, 252..299.
    const inside = await classifier.classifyWindow(frame, { startIndex: 309, endIndex: 320 }, { startIndex: 252, endIndex: 299 });
    at(excluding, 320).forEach((p, k) => assert.ok(Math.abs(p - inside.probabilities[k]) < 1e-6, `class ${k}`));
    // Before the incident nothing changes; right after it the baseline differs from the plain trailing one.
    assert.deepEqual(Array.from(at(excluding, 250)), Array.from(at(plain, 250)));
    assert.notDeepEqual(Array.from(at(excluding, 335)), Array.from(at(plain, 335)));
  });
});
