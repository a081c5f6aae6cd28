import assert from 'node:assert/strict';
import * as tf from '@tensorflow/tfjs-core';
import '@tensorflow/tfjs-backend-cpu';
import type { Family } from '../../../extension/core/frame/types';
import { DEFAULT_WINDOW_SPEC, encodeBatch, getRowLength } from '../../../extension/core/model/encode';
import { CLASSES, type MetricWindow, type NodeBatch } from '../../../extension/core/model/types';
import type { SimClass, TrainingExample } from '../../../training/simulator/types';
import { computeFamilySummary } from '../../../training/baselines/familySummary';
import { buildCompleteAdjacency, createGcnBaseline, createGinBaseline, normalizeAdjacency, propagateGcn } from '../../../training/baselines/graphBaselines';
import { createGruReference, toGruVariables } from '../../../training/baselines/gruBaseline';
import { accumulateGruGradient, computeGruLogits, GruWorkspace } from '../../../training/baselines/gruNetwork';
import { getGruBlockShapes, GRU_BLOCKS, initGruParameters } from '../../../training/baselines/gruParameters';
import { scoreBaselines } from '../../../training/baselines/index';
import { trainGruNetwork } from '../../../training/baselines/trainGruNetwork';
import { toBatchTensors } from '../../../training/baselines/layers';
import { computeGini, findBestSplit } from '../../../training/baselines/randomForest';
import type { NodeSetModel } from '../../../training/baselines/nodeSetModel';
import { createRandom } from '../../../training/baselines/seededRandom';

/** Box–Muller normal draws from the seeded generator. */
function drawNormal(random: () => number): number {
  return Math.sqrt(-2 * Math.log(1 - random())) * Math.cos(2 * Math.PI * random());
}

/**
 * A tiny separable problem: four classes whose signature sits in one family each (common practice
 * signatures, REFERENCE.md §5: CPU step up, memory ramp, error ratio step), plus plain noise.
 */
const TOY_CLASSES: readonly SimClass[] = ['normal', 'cpu_saturation', 'memory_leak', 'error_storm'];
const TOY_FAMILIES: readonly Family[] = ['cpu', 'memory', 'errors', 'latency'];

function makeToyExample(label: SimClass, systemId: string, random: () => number, extraMetrics: number): TrainingExample {
  const metrics: MetricWindow[] = [];
  const metricCount = TOY_FAMILIES.length + Math.floor(random() * (extraMetrics + 1));
  for (let m = 0; m < metricCount; m++) {
    // Every family appears at least once so each signature is visible.
    const family = m < TOY_FAMILIES.length ? TOY_FAMILIES[m] : TOY_FAMILIES[Math.floor(random() * TOY_FAMILIES.length)];
    const level = 10 + 90 * random();
    const baseline = Float64Array.from({ length: 30 }, () => level + drawNormal(random));
    const window = Float64Array.from({ length: 20 }, (_, t) => {
      let shift = 0;
      if (label === 'cpu_saturation' && family === 'cpu') shift = 8;
      if (label === 'memory_leak' && family === 'memory') shift = 0.6 * t;
      if (label === 'error_storm' && family === 'errors') shift = 8;
      return level + shift + drawNormal(random);
    });
    metrics.push({ id: `${family}_${m}`, family, baseline, window });
  }
  return { label, systemId, metrics };
}

/** `count` balanced toy examples; each has one metric per family plus up to `extraMetrics` more. */
function makeToySplit(count: number, seed: number, extraMetrics = 4): TrainingExample[] {
  const random = createRandom(seed);
  return Array.from({ length: count }, (_, i) => makeToyExample(TOY_CLASSES[i % TOY_CLASSES.length], `toy-${seed}-${i % 7}`, random, extraMetrics));
}

function readLogits(model: NodeSetModel, batch: NodeBatch): Float32Array {
  return tf.tidy(() => model.computeLogits(toBatchTensors(batch)).dataSync() as Float32Array);
}

/** Appends `extra` masked rows full of large values to a batch of one example. */
function padWithMaskedRows(batch: NodeBatch, extra: number): NodeBatch {
  const rowLength = batch.windowLength;
  const nodeCount = batch.nodeCount + extra;
  const values = new Float32Array(nodeCount * rowLength).fill(123.5);
  values.set(batch.values);
  const families = new BigInt64Array(nodeCount).fill(2n);
  families.set(batch.families);
  const mask = new Float32Array(nodeCount);
  mask.set(batch.mask);
  return { batchSize: 1, nodeCount, windowLength: rowLength, values, families, mask };
}

describe('baselines', () => {
  before(async () => { await tf.setBackend('cpu'); });

  it('GCN propagation equals the hand-computed D^-1/2 (A+I) D^-1/2 H W on a 3-node path graph', () => {
    // Kipf & Welling 2017, eq. 2 (formula from memory). Path 0–1–2: A+I = [[1,1,0],[1,1,1],[0,1,1]],
    // degrees [2,3,2]. H W = [[1,2],[3,-1],[4,1]] for H = [[1,0],[0,1],[1,1]], W = [[1,2],[3,-1]].
    // Row 0: ½·[1,2] + (1/√6)·[3,-1]; row 1: (1/√6)·([1,2]+[4,1]) + ⅓·[3,-1]; row 2: (1/√6)·[3,-1] + ½·[4,1].
    const expected = [
      [0.5 + 3 / Math.sqrt(6), 1 - 1 / Math.sqrt(6)],
      [5 / Math.sqrt(6) + 1, 3 / Math.sqrt(6) - 1 / 3],
      [3 / Math.sqrt(6) + 2, -1 / Math.sqrt(6) + 0.5],
    ];
    const actual = tf.tidy(() => {
      const adjacency = [1, 1, 0, 1, 1, 1, 0, 1, 1];
      const h = tf.tensor3d([[[1, 0], [0, 1], [1, 1]]]);
      const w = tf.tensor2d([[1, 2], [3, -1]]);
      return propagateGcn(tf.tensor3d(normalizeAdjacency(adjacency, 1, 3), [1, 3, 3]), h, w).arraySync()[0];
    });
    actual.forEach((row, i) => row.forEach((v, j) => assert.ok(Math.abs(v - expected[i][j]) < 1e-5, `(${i},${j}): ${v} vs ${expected[i][j]}`)));
    // Hand values of the same sums, written out: 1.72474, 0.59175 / 3.04124, 0.89141 / 3.22474, 0.09175.
    assert.ok(Math.abs(actual[1][0] - 3.04124) < 1e-4);
  });

  it('on the complete graph with a masked node, GCN normalisation averages the unmasked nodes and zeroes the masked one', () => {
    const normalized = normalizeAdjacency(buildCompleteAdjacency([1, 1, 0, 1], 1, 4), 1, 4);
    // Complete graph over 3 nodes with self-loops: every degree is 3, so each entry is 1/√3·1/√3 = 1/3.
    const third = 1 / 3;
    const expected = [third, third, 0, third, third, third, 0, third, 0, 0, 0, 0, third, third, 0, third];
    normalized.forEach((v, k) => assert.ok(Math.abs(v - expected[k]) < 1e-6, `entry ${k}: ${v}`));
  });

  it('masked padding rows and metric order leave the GCN and GIN logits unchanged', () => {
    const example = makeToySplit(1, 11)[0];
    const batch = encodeBatch([example.metrics]);
    const permuted = encodeBatch([[...example.metrics].reverse()]);
    const spec = { windowLength: getRowLength(DEFAULT_WINDOW_SPEC), sequenceLength: DEFAULT_WINDOW_SPEC.sampleCount, classCount: CLASSES.length, hiddenSize: 8 };
    const models = [createGcnBaseline(spec, createRandom(1)), createGinBaseline(spec, createRandom(2))];
    for (const model of models) {
      const plain = readLogits(model, batch);
      const padded = readLogits(model, padWithMaskedRows(batch, 5));
      const reordered = readLogits(model, permuted);
      plain.forEach((v, c) => {
        assert.ok(Math.abs(v - padded[c]) < 1e-5, `${model.name} padded class ${c}: ${v} vs ${padded[c]}`);
        assert.ok(Math.abs(v - reordered[c]) < 1e-4, `${model.name} permuted class ${c}: ${v} vs ${reordered[c]}`);
      });
    }
  });

  it('masked padding rows and metric order leave the GRU baseline\'s logits unchanged', () => {
    const example = makeToySplit(1, 13)[0];
    const gru = initGruParameters({ rowLength: getRowLength(DEFAULT_WINDOW_SPEC), sequenceLength: DEFAULT_WINDOW_SPEC.sampleCount, hiddenSize: 8, classCount: CLASSES.length }, createRandom(4));
    const batch = encodeBatch([example.metrics]);
    const plain = computeGruLogits(gru, batch);
    const padded = computeGruLogits(gru, padWithMaskedRows(batch, 4));
    const reordered = computeGruLogits(gru, encodeBatch([[...example.metrics].reverse()]));
    plain.forEach((v, c) => {
      assert.ok(Math.abs(v - padded[c]) < 1e-9, `padded class ${c}`);
      assert.ok(Math.abs(v - reordered[c]) < 1e-6, `permuted class ${c}`);
    });
  });

  it('the hand-written GRU matches TensorFlow.js on logits and on autodiff gradients', () => {
    // Reference: tfjs-core autodiff (a general-purpose library) on the same network and weights.
    const shape = { rowLength: getRowLength(DEFAULT_WINDOW_SPEC), sequenceLength: DEFAULT_WINDOW_SPEC.sampleCount, hiddenSize: 6, classCount: CLASSES.length };
    const gru = initGruParameters(shape, createRandom(5));
    // Non-zero biases so their gradients are exercised away from the init point.
    gru.values.forEach((v, i) => { if (v === 0) gru.values[i] = 0.05 * Math.sin(i); });
    const toy = makeToySplit(2, 14);
    const batch = encodeBatch(toy.map((e) => e.metrics));
    const labels = [1, 3];
    const weights = [0.7, 1.3];
    const vars = toGruVariables(gru);
    const reference = createGruReference(gru, vars);
    const expectedLogits = readLogits(reference, batch);
    const actualLogits = computeGruLogits(gru, batch);
    actualLogits.forEach((v, k) => assert.ok(Math.abs(v - expectedLogits[k]) < 1e-4, `logit ${k}: ${v} vs ${expectedLogits[k]}`));
    const tensors = toBatchTensors(batch);
    const { grads } = tf.variableGrads(() => tf.tidy(() => {
      const logits = reference.computeLogits(tensors);
      const logSoftmax = tf.logSoftmax(logits);
      const picked = tf.sum(tf.mul(logSoftmax, tf.mul(tf.oneHot(tf.tensor1d(labels, 'int32'), CLASSES.length), tf.tensor2d(weights, [2, 1]))));
      return tf.neg(picked) as tf.Scalar;
    }), reference.variables as tf.Variable[]);
    const gradient = new Float64Array(gru.values.length);
    labels.forEach((label, e) => {
      const single = encodeBatch([toy[e].metrics]);
      accumulateGruGradient(gru, single, 0, label, weights[e], gradient);
    });
    const shapes = getGruBlockShapes(shape);
    for (const block of GRU_BLOCKS) {
      const expected = grads[vars[block].name].dataSync();
      const size = shapes[block][0] * shapes[block][1];
      for (let k = 0; k < size; k++) {
        const actual = gradient[gru.offsets[block] + k];
        assert.ok(Math.abs(actual - expected[k]) < 1e-4 + 1e-3 * Math.abs(expected[k]), `${block}[${k}]: ${actual} vs ${expected[k]}`);
      }
    }
  });

  it('a GRU workspace reused over examples of different sizes gives the same logits and gradients as fresh ones', () => {
    // Reference: a fresh workspace per example, the pass checked against tfjs autodiff above; a
    // larger example first leaves stale traces that the smaller one must not read.
    const shape = { rowLength: getRowLength(DEFAULT_WINDOW_SPEC), sequenceLength: DEFAULT_WINDOW_SPEC.sampleCount, hiddenSize: 5, classCount: CLASSES.length };
    const gru = initGruParameters(shape, createRandom(6));
    const examples = makeToySplit(3, 15, 6).map((e) => encodeBatch([e.metrics])).sort((a, b) => b.nodeCount - a.nodeCount);
    assert.ok(examples[0].nodeCount > examples[2].nodeCount, 'expected examples of different sizes');
    const shared = new GruWorkspace(shape);
    const reused = new Float64Array(gru.values.length);
    const fresh = new Float64Array(gru.values.length);
    examples.forEach((batch, e) => {
      const lossReused = accumulateGruGradient(gru, batch, 0, e + 1, 0.5, reused, shared);
      const lossFresh = accumulateGruGradient(gru, batch, 0, e + 1, 0.5, fresh);
      assert.equal(lossReused, lossFresh);
      assert.deepEqual(computeGruLogits(gru, batch, shared), computeGruLogits(gru, batch));
    });
    assert.deepEqual(reused, fresh);
  });

  it('GRU training gives the same weights with its shards in worker threads or in this thread', async () => {
    // The shards' gradients are added in shard order whichever thread computed them, so the two
    // runs must agree bit for bit; a shared-memory or ordering slip shows up as differing weights.
    const shape = { rowLength: getRowLength(DEFAULT_WINDOW_SPEC), sequenceLength: DEFAULT_WINDOW_SPEC.sampleCount, hiddenSize: 4, classCount: CLASSES.length };
    const toy = makeToySplit(24, 16, 2);
    const examples = toy.map((e) => encodeBatch([e.metrics]));
    const labels = Int32Array.from(toy, (e) => (CLASSES as readonly string[]).indexOf(e.label));
    const train = async (useWorkers: boolean): Promise<{ values: Float32Array; loss: number }> => {
      const gru = initGruParameters(shape, createRandom(8));
      const loss = await trainGruNetwork(gru, examples, labels, { epochs: 2, batchSize: 7, learningRate: 1e-2, random: createRandom(9), shardCount: 2, useWorkers });
      return { values: gru.values, loss };
    };
    const [inThread, inWorkers] = [await train(false), await train(true)];
    const initial = initGruParameters(shape, createRandom(8)).values;
    assert.ok(inThread.values.some((v, i) => v !== initial[i]), 'expected training to move the weights');
    assert.equal(inWorkers.loss, inThread.loss);
    assert.deepEqual(inWorkers.values, inThread.values);
  });

  it('Gini impurity and the best split match hand computation', () => {
    // Gini = 1 − Σ p² (Breiman et al. 1984, CART; from memory): counts [2, 2] → 0.5, [3, 1] → 0.375.
    assert.equal(computeGini([2, 2], 4), 0.5);
    assert.equal(computeGini([3, 1], 4), 0.375);
    // x = 1..6 with labels 0,0,0,1,1,1: the pure split lies halfway between 3 and 4, score 0.
    const features = [1, 2, 3, 4, 5, 6].map((v) => [v]);
    const split = findBestSplit(features, [0, 0, 0, 1, 1, 1], [0, 1, 2, 3, 4, 5], 0, 2, 1);
    assert.deepEqual(split, { feature: 0, threshold: 3.5, score: 0 });
    // Labels 0,1,0,1,1,1: best is x ≤ 3.5 → left [2,1] (Gini 4/9), right [0,3] (0) → 0.5·4/9 = 0.2222.
    const mixed = findBestSplit(features, [0, 1, 0, 1, 1, 1], [0, 1, 2, 3, 4, 5], 0, 2, 1);
    assert.equal(mixed?.threshold, 3.5);
    assert.ok(Math.abs((mixed?.score ?? 1) - 2 / 9) < 1e-12);
  });

  it('unusable (all-NaN) metrics leave the family summary, and so the nearest-centroid input, unchanged', () => {
    const example = makeToySplit(1, 12)[0];
    const gap = new Float64Array(20).fill(Number.NaN);
    const withGaps = [...example.metrics, { id: 'gap', family: 'cpu' as const, baseline: gap, window: gap }];
    assert.deepEqual(computeFamilySummary(withGaps), computeFamilySummary(example.metrics));
  });

  it('each baseline beats chance clearly on a small separable problem', async function () {
    this.timeout(240_000);
    // One metric per family keeps the GRU (the slowest) inside a unit-test budget.
    const split = { train: makeToySplit(400, 21, 0), calibration: [], test: makeToySplit(80, 22, 0) };
    const results = await scoreBaselines(split, { seed: 7, epochs: 6, batchSize: 16 });
    assert.equal(results.length, 5);
    const truth = split.test.map((e) => (CLASSES as readonly string[]).indexOf(e.label));
    for (const result of results) {
      assert.equal(result.predicted.length, split.test.length);
      const accuracy = truth.filter((c, i) => result.predicted[i] === c).length / truth.length;
      // Chance is 1/4 on four balanced classes; 0.6 leaves no doubt that the signal was learnt.
      assert.ok(accuracy >= 0.6, `${result.name}: accuracy ${accuracy.toFixed(2)}`);
      assert.ok(result.trainSeconds >= 0);
    }
  });
});
