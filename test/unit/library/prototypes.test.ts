import assert from 'node:assert/strict';
import * as tf from '@tensorflow/tfjs-core';
import '@tensorflow/tfjs-backend-cpu';
import { computePrototypes, scorePrototypes, softmax, squaredDistance, prepareEmbedding } from '../../../extension/core/model/prototypes';
import { blendVerdict, computeLibraryWeight, findNearestIncidents, type BlendOptions } from '../../../extension/core/model/libraryVerdict';
import { matchLibrary } from '../../../extension/core/model/libraryMatch';
import { makeEntry } from './libraryFixtures';

describe('prototypes (prototypical networks, Snell et al. 2017)', () => {
  before(async () => { await tf.setBackend('cpu'); });

  it('matches a hand-computed example: prototypes are class means and p = softmax(-d²/T)', () => {
    // Hand-computed: class a = {(0,0), (2,0)} → prototype (1,0); class b = {(0,4)} → (0,4).
    // Query (1,1): d²(a) = 0 + 1 = 1, d²(b) = 1 + 9 = 10; with T = 1, p(a) = 1 / (1 + e^-9).
    const prototypes = computePrototypes([
      { label: 'a', embedding: [0, 0] }, { label: 'a', embedding: [2, 0] }, { label: 'b', embedding: [0, 4] },
    ], 'none');
    assert.deepEqual(Array.from(prototypes[0].centroid), [1, 0]);
    assert.equal(prototypes[0].exampleCount, 2);
    assert.deepEqual(Array.from(prototypes[1].centroid), [0, 4]);
    const scores = scorePrototypes([1, 1], prototypes, { normalization: 'none', temperature: 1 });
    assert.equal(scores[0].label, 'a');
    assert.equal(scores[0].squaredDistance, 1);
    assert.equal(scores[1].squaredDistance, 10);
    assert.ok(Math.abs(scores[0].probability - 1 / (1 + Math.exp(-9))) < 1e-12);
    assert.ok(Math.abs(scores[0].probability + scores[1].probability - 1) < 1e-12);
  });

  it('l2 normalisation puts squared distances in [0, 4]: opposite unit vectors are 4 apart (hand-computed)', () => {
    const prototypes = computePrototypes([{ label: 'up', embedding: [0, 3] }], 'l2');
    const [score] = scorePrototypes([0, -7], prototypes, { normalization: 'l2', temperature: 1 });
    assert.ok(Math.abs(score.squaredDistance - 4) < 1e-12);
  });

  it('agrees with the TensorFlow.js reference for softmax and squared distance on random vectors', () => {
    // Reference library: @tensorflow/tfjs-core (tf.softmax, tf.squaredDifference + tf.sum).
    let seed = 7;
    const random = (): number => { seed = (seed * 16807) % 2147483647; return seed / 2147483647 - 0.5; };
    for (let trial = 0; trial < 20; trial++) {
      const a = Array.from({ length: 16 }, random);
      const b = Array.from({ length: 16 }, random);
      const reference = tf.sum(tf.squaredDifference(tf.tensor1d(a, 'float32'), tf.tensor1d(b, 'float32'))).dataSync()[0];
      assert.ok(Math.abs(squaredDistance(a, b) - reference) < 1e-5);
      const logits = Array.from({ length: 5 }, () => random() * 40);
      const ours = softmax(logits);
      const theirs = Array.from(tf.softmax(tf.tensor1d(logits, 'float32')).dataSync());
      ours.forEach((p, i) => assert.ok(Math.abs(p - theirs[i]) < 1e-6, `class ${i}: ${p} vs ${theirs[i]}`));
    }
  });

  it('refuses embeddings of different lengths (models mixed without re-embedding)', () => {
    assert.throws(() => computePrototypes([{ label: 'a', embedding: [1, 2] }, { label: 'a', embedding: [1, 2, 3] }], 'none'), /expected embeddings of length 2, got 3/);
  });

  it('refuses NaN in an embedding instead of ranking it silently', () => {
    assert.throws(() => prepareEmbedding([1, Number.NaN], 'l2'), /finite embedding, got NaN at index 1/);
  });
});

describe('blendVerdict', () => {
  const options: BlendOptions = { normalization: 'none', temperature: 1, acceptDistance: 1, softness: 0.1, maxWeight: 0.9 };
  const base = { normal: 0.1, cpu_saturation: 0.7, memory_leak: 0.2 };

  it('leaves the base verdict unchanged when the library is empty', () => {
    const verdict = blendVerdict(base, [], options);
    assert.equal(verdict.className, 'cpu_saturation');
    assert.equal(verdict.libraryWeight, 0);
    assert.deepEqual(verdict.probabilities, base);
    assert.equal(verdict.libraryMatch, undefined);
  });

  it('lets a near library class win and reports it as a library match (hand-computed gate)', () => {
    // d² = 0 ≪ acceptDistance: w = 0.9 / (1 + e^-10) ≈ 0.899959; p(pool) = w·1.
    const prototypes = computePrototypes([{ label: 'pool_leak', embedding: [0, 0] }, { label: 'pool_leak', embedding: [0, 0] }], 'none');
    const verdict = blendVerdict(base, scorePrototypes([0, 0], prototypes, options), options);
    const w = 0.9 / (1 + Math.exp(-10));
    assert.equal(verdict.className, 'pool_leak');
    assert.ok(Math.abs(verdict.probability - w) < 1e-12);
    assert.ok(Math.abs(verdict.probabilities.cpu_saturation - 0.7 * (1 - w)) < 1e-12);
    assert.deepEqual(verdict.libraryMatch, { label: 'pool_leak', exampleCount: 2 });
    const total = Object.values(verdict.probabilities).reduce((s, p) => s + p, 0);
    assert.ok(Math.abs(total - 1) < 1e-12);
  });

  it('keeps the bundled verdict when the nearest prototype is far beyond the accept distance', () => {
    const prototypes = computePrototypes([{ label: 'pool_leak', embedding: [3, 0] }], 'none');
    const verdict = blendVerdict(base, scorePrototypes([0, 0], prototypes, options), options);
    assert.equal(verdict.className, 'cpu_saturation');
    assert.ok(verdict.libraryWeight < 1e-30);
    assert.equal(verdict.libraryMatch, undefined);
  });

  it('adds library mass of a built-in label to that built-in class', () => {
    const prototypes = computePrototypes([{ label: 'memory_leak', embedding: [0, 0] }], 'none');
    const verdict = blendVerdict(base, scorePrototypes([0, 0], prototypes, options), options);
    assert.equal(verdict.className, 'memory_leak');
    assert.equal(Object.keys(verdict.probabilities).length, 3);
    assert.ok(prototypes[0].isBuiltInClass);
  });

  it('gives half the maximum weight exactly at the accept distance', () => {
    assert.ok(Math.abs(computeLibraryWeight(1, options) - 0.45) < 1e-12);
  });
});

describe('findNearestIncidents', () => {
  it('lists the nearest entries first with cosine similarity and postmortem link, skipping other embedding sizes', () => {
    const entries = [
      makeEntry({ id: 'b', label: 'x', embedding: [1, 0], postmortem: 'postmortems/2026-11-04-basket.md' }),
      makeEntry({ id: 'a', label: 'y', embedding: [0, 1] }),
      makeEntry({ id: 'c', label: 'z', embedding: [1, 0, 0] }),
    ];
    const nearest = findNearestIncidents([2, 0.1], entries, 5, { normalization: 'l2', temperature: 1 });
    assert.deepEqual(nearest.map((n) => n.id), ['b', 'a']);
    assert.equal(nearest[0].postmortem, 'postmortems/2026-11-04-basket.md');
    // Hand-computed: cos((2, 0.1), (1, 0)) = 2 / sqrt(4.01).
    assert.ok(Math.abs(nearest[0].cosineSimilarity - 2 / Math.sqrt(4.01)) < 1e-12);
  });
});

describe('matchLibrary', () => {
  it('skips entries of another model version, counts them, and blends only current ones', () => {
    const entries = [
      makeEntry({ id: 'a', label: 'pool_leak', embedding: [1, 0, 0], modelVersion: 'v2' }),
      makeEntry({ id: 'b', label: 'pool_leak', embedding: [0, 0, 1], modelVersion: 'v1' }),
    ];
    // Embedding only (no query metrics): z = (cos − 0)/1, accepted from 0.5.
    const options = { scale: { signatureWeight: 0.5, signatureMean: 0, signatureSd: 1, embeddingMean: 0, embeddingSd: 1 }, classAggregate: 'mean' as const, acceptSimilarity: 0.5, acceptMargin: 0, overrideMargin: Number.POSITIVE_INFINITY, recurrenceSimilarity: Number.POSITIVE_INFINITY, headConfidenceCap: 0.9, maxWeight: 0.9, temperature: 0.25 };
    const match = matchLibrary({ normal: 0.6, cpu_saturation: 0.4 }, [1, 0.01, 0], entries, 'v2', undefined, options);
    assert.equal(match.usedEntryCount, 1);
    assert.equal(match.staleEntryCount, 1);
    assert.equal(match.verdict.className, 'pool_leak');
    assert.deepEqual(match.nearest.map((n) => n.id), ['a']);
    // Only library label, all of the mass: p = 0.9 · 1 (one library class, softmax of one value).
    assert.ok(Math.abs(match.verdict.probability - 0.9) < 1e-12);
    const none = matchLibrary({ normal: 0.6, cpu_saturation: 0.4 }, [1, 0.01, 0], entries, 'v3', undefined, options);
    assert.equal(none.verdict.className, 'normal');
    assert.equal(none.verdict.libraryWeight, 0);
  });
});
