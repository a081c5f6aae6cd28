import assert from 'node:assert/strict';
import * as tf from '@tensorflow/tfjs-core';
import '@tensorflow/tfjs-backend-cpu';
import { combineSimilarity, computeEmbeddingCosine, computeMetricSignature, computeSignatureCosine, findSharedMovers, SIGNATURE_DEAD_BAND, SIGNATURE_FEATURES } from '../../../extension/core/model/librarySignature';
import { createLibraryEntry, toMetricWindows } from '../../../extension/core/model/libraryEntry';
import { createRandom } from '../../../training/simulator';

const sig = (entries: Record<string, number[]>): Map<string, Float64Array> => new Map(Object.entries(entries).map(([k, v]) => [k, Float64Array.from(v)]));

describe('metric signature cosine', () => {
  before(async () => { await tf.setBackend('cpu'); });

  it('compares only the metric ids both windows share, as one concatenated vector (hand-computed)', () => {
    // Shared ids: cpu and pool. Concatenated a = (1, 2, 0, 1), b = (2, 1, 1, 1) (two features each for brevity).
    // dot = 2 + 2 + 0 + 1 = 5; |a|² = 6; |b|² = 7 → cos = 5 / sqrt(42) ≈ 0.7715.
    const a = sig({ cpu: [1, 2], pool: [0, 1], onlyInA: [9, 9] });
    const b = sig({ pool: [1, 1], cpu: [2, 1], onlyInB: [-9, 3] });
    assert.ok(Math.abs(computeSignatureCosine(a, b) - 5 / Math.sqrt(42)) < 1e-12);
    // Symmetric, whatever the id order.
    assert.ok(Math.abs(computeSignatureCosine(b, a) - 5 / Math.sqrt(42)) < 1e-12);
  });

  it('is 0 when no metric id is shared or the shared part is all zeros', () => {
    assert.equal(computeSignatureCosine(sig({ a: [1, 2] }), sig({ b: [1, 2] })), 0);
    assert.equal(computeSignatureCosine(sig({ a: [0, 0] }), sig({ a: [1, 2] })), 0);
    assert.equal(computeSignatureCosine(new Map(), new Map()), 0);
  });

  it('names the metric when two signatures have feature vectors of different length', () => {
    assert.throws(() => computeSignatureCosine(sig({ pool: [1, 2] }), sig({ pool: [1, 2, 3] })), /expected signature vectors of length 2, got 3 for metric pool/);
  });

  it('embedding cosine agrees with TensorFlow.js cosineDistance (1 − cos) on random vectors', () => {
    // Reference: tf.losses.cosineDistance of L2-normalised inputs = 1 − cosine similarity (tfjs-core docs).
    const rng = createRandom(7);
    for (let trial = 0; trial < 5; trial++) {
      const a = Array.from({ length: 16 }, () => rng.uniform(-1, 1));
      const b = Array.from({ length: 16 }, () => rng.uniform(-1, 1));
      const distance = tf.tidy(() => tf.losses.cosineDistance(tf.div(tf.tensor1d(a), tf.norm(tf.tensor1d(a))), tf.div(tf.tensor1d(b), tf.norm(tf.tensor1d(b))), 0).dataSync()[0]);
      assert.ok(Math.abs(computeEmbeddingCosine(a, b) - (1 - distance)) < 1e-5, `trial ${trial}`);
    }
  });
});

describe('computeMetricSignature', () => {
  it('matches a worked example: a window held at median + 1.4826·MAD·sinh(2) reads 1 on every kept feature', () => {
    // Baseline 10, 12, 8, 11, 9: median 10, MAD 1, robust scale 1.4826·MAD (Iglewicz & Hoaglin 1993,
    // common practice). A window at 10 + 1.4826·sinh(2) is z = sinh(2), squashed asinh(z) = 2 at
    // every sample, so the mean, the four quarter means, max and min are all 2, and 2 − 1 = 1 after
    // the dead band.
    assert.equal(SIGNATURE_DEAD_BAND, 1);
    const level = 10 + 1.4826 * Math.sinh(2);
    const signature = computeMetricSignature([{ id: 'pantry_db_pool_in_use', family: 'saturation', baseline: [10, 12, 8, 11, 9], window: [level, level, level, level] }]);
    const values = signature.get('pantry_db_pool_in_use');
    assert.ok(values);
    assert.equal(values.length, SIGNATURE_FEATURES.length);
    for (const v of values) assert.ok(Math.abs(v - 1) < 1e-5, `expected 1, got ${v}`);
  });

  it('reads 0 for a window inside the dead band and keeps the sign below the baseline', () => {
    // Same baseline as above: z = sinh(0.5) squashes to 0.5, inside the dead band (→ 0); z = −sinh(3)
    // squashes to −3 (→ −2).
    const inside = 10 + 1.4826 * Math.sinh(0.5);
    const below = 10 - 1.4826 * Math.sinh(3);
    const signature = computeMetricSignature([
      { id: 'inside', family: 'latency', baseline: [10, 12, 8, 11, 9], window: [inside, inside, inside, inside] },
      { id: 'below', family: 'latency', baseline: [10, 12, 8, 11, 9], window: [below, below, below, below] },
    ]);
    for (const v of signature.get('inside')!) assert.ok(Math.abs(v) < 1e-6, `expected 0, got ${v}`);
    for (const v of signature.get('below')!) assert.ok(Math.abs(v + 2) < 1e-5, `expected −2, got ${v}`);
  });

  it('leaves out metrics the encoder cannot normalise and keeps the first of a repeated id', () => {
    const signature = computeMetricSignature([
      { id: 'a', family: 'cpu', baseline: [1, 2, 3, 4], window: [5, 6, 7] },
      { id: 'a', family: 'cpu', baseline: [1, 2, 3, 4], window: [1, 1, 1] },
      { id: 'short', family: 'cpu', baseline: [1, 2, 3, 4], window: [5, 6] },
      { id: 'gaps', family: 'cpu', baseline: [Number.NaN, Number.NaN, 1, 2], window: [5, 6, 7] },
    ]);
    assert.deepEqual([...signature.keys()], ['a']);
    assert.ok(signature.get('a')![0] > 0, 'the first "a" (window above its baseline) is kept');
    assert.equal(computeMetricSignature([]).size, 0);
  });

  it('gives the same signature from full-resolution data and from the library entry that stores it', () => {
    const rng = createRandom(11);
    const metrics = ['basket_api_requests_total', 'pantry_db_pool_pending'].map((id, m) => ({
      id, name: id, family: 'saturation' as const,
      baseline: Float64Array.from({ length: 300 }, () => 50 + rng.normal() * 5),
      window: Float64Array.from({ length: 200 }, (_, t) => 50 + (m + 1) * t * 0.3 + rng.normal() * 5),
    }));
    const entry = createLibraryEntry({
      id: 'e', label: 'pool_exhaustion', window: { startMs: 0, endMs: 1 }, baseline: { startMs: 0, endMs: 1 }, exportSha256: '0'.repeat(64),
      exportFile: 'exports/pantry-db.csv', createdMs: 0, modelVersion: 'v', embedding: [1], metrics,
    });
    const full = computeMetricSignature(metrics);
    const stored = computeMetricSignature(toMetricWindows(entry));
    // Stored numbers are rounded to 7 significant digits; the features may differ only by that rounding.
    assert.ok(computeSignatureCosine(full, stored) > 1 - 1e-9);
    assert.deepEqual([...stored.keys()], [...full.keys()]);
  });
});

describe('combineSimilarity', () => {
  const scale = { signatureWeight: 0.25, signatureMean: 0.2, signatureSd: 0.4, embeddingMean: 0.6, embeddingSd: 0.2 };

  it('mixes the two z-scores with the signature weight (hand-computed)', () => {
    // z_sig = (0.8 − 0.2)/0.4 = 1.5; z_emb = (0.7 − 0.6)/0.2 = 0.5; 0.25·1.5 + 0.75·0.5 = 0.75.
    assert.ok(Math.abs(combineSimilarity(0.8, 0.7, scale) - 0.75) < 1e-12);
  });

  it('uses the known term alone when the other is missing, and −Infinity when both are', () => {
    assert.ok(Math.abs(combineSimilarity(undefined, 0.7, scale) - 0.5) < 1e-12);
    assert.ok(Math.abs(combineSimilarity(0.8, undefined, scale) - 1.5) < 1e-12);
    assert.equal(combineSimilarity(undefined, undefined, scale), Number.NEGATIVE_INFINITY);
  });

  it('refuses a weight outside 0..1 or a zero sd, naming the value', () => {
    assert.throws(() => combineSimilarity(0, 0, { ...scale, signatureWeight: 1.5 }), /expected signatureWeight in 0..1, got 1.5/);
    assert.throws(() => combineSimilarity(0, 0, { ...scale, embeddingSd: 0 }), /expected positive sds/);
  });
});

describe('findSharedMovers', () => {
  // Constant vectors of the signature's length L: a vector of value v has norm |v|·√L.
  const L = SIGNATURE_FEATURES.length;
  const sig = (values: Record<string, number>): Map<string, Float64Array> => new Map(Object.entries(values).map(([id, v]) => [id, new Float64Array(L).fill(v)]));
  const query = sig({ a: 2, b: -3, c: 0, d: 1 });
  const e1 = sig({ a: 1, b: -4, d: -1 });
  const e2 = sig({ a: 3, d: 0.5 });

  it('ranks the metrics that moved the same way by the smaller of the two norms, averaged over agreeing incidents (hand-computed)', () => {
    // b: only e1 has it, down in both → min(3, 4) = 3. a: up in all → (min(2, 1) + min(2, 3)) / 2 = 1.5.
    // d: up in the query, down in e1, up in e2 → one of two agree (half suffices) → min(1, 0.5) = 0.5.
    // c: inside the dead band (all zeros) → no direction, never listed.
    assert.deepEqual(findSharedMovers(query, [e1, e2]), [{ id: 'b', direction: 'down' }, { id: 'a', direction: 'up' }, { id: 'd', direction: 'up' }]);
    assert.deepEqual(findSharedMovers(query, [e1, e2], 2).map((m) => m.id), ['b', 'a']);
  });

  it('needs at least half of the incidents to agree', () => {
    // With three incidents two must agree: d is up only in e2 now.
    const e3 = sig({ a: 1, d: -2 });
    assert.deepEqual(findSharedMovers(query, [e1, e2, e3]).map((m) => m.id), ['a']);
    assert.deepEqual(findSharedMovers(query, []), []);
  });

  it('puts the strongest mover of each family first when families are given', () => {
    const family: Record<string, string> = { a: 'latency', b: 'latency', d: 'saturation' };
    assert.deepEqual(findSharedMovers(query, [e1, e2], 3, (id) => family[id]).map((m) => m.id), ['b', 'd', 'a']);
  });
});
