import assert from 'node:assert/strict';
import { competeVerdict, computeClassSimilarities, type CompetitionOptions } from '../../../extension/core/model/librarySignatureVerdict';

// Unit scale (mean 0, sd 1), signature weight 0.5: the combined similarity is (sig + emb)/2.
const options: CompetitionOptions = {
  scale: { signatureWeight: 0.5, signatureMean: 0, signatureSd: 1, embeddingMean: 0, embeddingSd: 1 }, classAggregate: 'mean',
  acceptSimilarity: 0.6, acceptMargin: 0, overrideMargin: Number.POSITIVE_INFINITY, recurrenceSimilarity: Number.POSITIVE_INFINITY, headConfidenceCap: 0.9, maxWeight: 0.9, temperature: 0.25,
};
const unsureHead = { normal: 0.2, cpu_saturation: 0.7, memory_leak: 0.1 };

describe('computeClassSimilarities', () => {
  it('averages the cosines of each label\'s entries (hand-computed)', () => {
    const signature = new Map([['pool', Float64Array.from([1, 0])]]);
    const classes = computeClassSimilarities({ embedding: [1, 0], signature }, [
      { label: 'pool_leak', embedding: [1, 0], signature: new Map([['pool', Float64Array.from([1, 0])]]) },
      { label: 'pool_leak', embedding: [0, 1], signature: new Map([['pool', Float64Array.from([1, 1])]]) },
      { label: 'cpu_saturation', embedding: [-1, 0] },
    ]);
    // pool_leak: embedding cosines 1 and 0 → 0.5; signature cosines 1 and 1/√2 → (1 + 0.7071)/2.
    assert.equal(classes[0].label, 'pool_leak');
    assert.equal(classes[0].exampleCount, 2);
    assert.ok(Math.abs(classes[0].embeddingCosine! - 0.5) < 1e-12);
    assert.ok(Math.abs(classes[0].signatureCosine! - (1 + Math.SQRT1_2) / 2) < 1e-12);
    // Nearest entry: the largest of each.
    assert.equal(classes[0].maxEmbeddingCosine, 1);
    assert.ok(Math.abs(classes[0].maxSignatureCosine! - 1) < 1e-12);
    // An entry without a signature leaves the class's signature mean undefined.
    assert.equal(classes.length, 2);
    assert.deepEqual(classes[1], { label: 'cpu_saturation', exampleCount: 1, embeddingCosine: -1, maxEmbeddingCosine: -1 });
  });

  it('leaves entries that share no metric id with the query out of the signature mean', () => {
    const [only] = computeClassSimilarities({ embedding: [1, 0], signature: new Map([['pool', Float64Array.from([1, 0])]]) }, [
      { label: 'pool_leak', embedding: [1, 0], signature: new Map([['pool', Float64Array.from([2, 0])]]) },
      { label: 'pool_leak', embedding: [1, 0], signature: new Map([['other_service_pool', Float64Array.from([1, 0])]]) },
    ]);
    // The first entry shares "pool" (cosine 1); the second shares nothing: counted as 0 it would halve the mean.
    assert.equal(only.signatureCosine, 1);
    const [none] = computeClassSimilarities({ embedding: [1, 0], signature: new Map([['a', Float64Array.from([1])]]) }, [{ label: 'x', embedding: [1, 0], signature: new Map([['b', Float64Array.from([1])]]) }]);
    assert.equal(none.signatureCosine, undefined);
  });
});

describe('competeVerdict', () => {
  it('gives the verdict to the nearest team label when the head is unsure and the similarity is high', () => {
    const v = competeVerdict(unsureHead, [
      { label: 'pool_leak', exampleCount: 3, signatureCosine: 0.9, embeddingCosine: 0.7 },
      { label: 'cpu_saturation', exampleCount: 3, signatureCosine: 0.1, embeddingCosine: 0.5 },
    ], options);
    assert.equal(v.className, 'pool_leak');
    assert.deepEqual(v.libraryMatch, { label: 'pool_leak', exampleCount: 3 });
    assert.equal(v.libraryWeight, 0.9);
    // Hand-computed: s = 0.8 and 0.3; q = softmax((0.8, 0.3)/0.25) → q(pool_leak) = 1/(1 + e^−2).
    const q = 1 / (1 + Math.exp(-2));
    assert.ok(Math.abs(v.probability - 0.9 * q) < 1e-12);
    assert.ok(Math.abs(v.probabilities.cpu_saturation - (0.1 * 0.7 + 0.9 * (1 - q))) < 1e-12);
    const total = Object.values(v.probabilities).reduce((s, p) => s + p, 0);
    assert.ok(Math.abs(total - 1) < 1e-12, 'probabilities still sum to 1');
  });

  it('leaves the verdict to the head when the team\'s incidents of a built-in class are nearer', () => {
    const v = competeVerdict(unsureHead, [
      { label: 'pool_leak', exampleCount: 3, signatureCosine: 0.7, embeddingCosine: 0.7 },
      { label: 'cpu_saturation', exampleCount: 3, signatureCosine: 0.9, embeddingCosine: 0.9 },
    ], options);
    assert.equal(v.className, 'cpu_saturation');
    assert.equal(v.libraryWeight, 0);
    assert.equal(v.nearestLabel, 'cpu_saturation');
    assert.equal(v.libraryMatch, undefined);
  });

  it('requires the team label to lead the nearest built-in-named library class by the margin', () => {
    const classes = [
      { label: 'pool_leak', exampleCount: 3, signatureCosine: 0.9, embeddingCosine: 0.9 },
      { label: 'cpu_saturation', exampleCount: 3, signatureCosine: 0.7, embeddingCosine: 0.7 },
    ];
    // Lead = 0.9 − 0.7 = 0.2 sd units.
    assert.equal(competeVerdict(unsureHead, classes, { ...options, acceptMargin: 0.19 }).className, 'pool_leak');
    assert.equal(competeVerdict(unsureHead, classes, { ...options, acceptMargin: 0.21 }).className, 'cpu_saturation');
  });

  it('compares nearest entries instead of class means when classAggregate is max', () => {
    const classes = [
      { label: 'pool_leak', exampleCount: 2, signatureCosine: 0.5, embeddingCosine: 0.5, maxSignatureCosine: 0.95, maxEmbeddingCosine: 0.95 },
      { label: 'cpu_saturation', exampleCount: 2, signatureCosine: 0.7, embeddingCosine: 0.7, maxSignatureCosine: 0.75, maxEmbeddingCosine: 0.75 },
    ];
    assert.equal(competeVerdict(unsureHead, classes, options).nearestLabel, 'cpu_saturation');
    assert.equal(competeVerdict(unsureHead, classes, { ...options, classAggregate: 'max' }).className, 'pool_leak');
  });

  it('does not claim a window the head is confident about, however similar', () => {
    const v = competeVerdict({ normal: 0.02, cpu_saturation: 0.95, memory_leak: 0.03 }, [{ label: 'pool_leak', exampleCount: 5, signatureCosine: 1, embeddingCosine: 1 }], options);
    assert.equal(v.className, 'cpu_saturation');
    assert.equal(v.probability, 0.95);
    assert.equal(v.libraryWeight, 0);
  });

  it('lets a team label overrule a confident head only by the override lead over the team\'s built-in-named incidents', () => {
    const confidentHead = { normal: 0.01, cpu_saturation: 0.98, memory_leak: 0.01 };
    const classes = [
      { label: 'cpu_steal', exampleCount: 3, signatureCosine: 0.9, embeddingCosine: 0.9 },
      { label: 'cpu_saturation', exampleCount: 3, signatureCosine: -0.6, embeddingCosine: 0.4 },
    ];
    // Lead = 0.9 − (−0.1) = 1.0 sd units.
    assert.equal(competeVerdict(confidentHead, classes, { ...options, overrideMargin: 1.1 }).className, 'cpu_saturation');
    assert.equal(competeVerdict(confidentHead, classes, { ...options, overrideMargin: 0.9 }).className, 'cpu_steal');
    // Without built-in-named classes in the library there is no lead to judge: the plain gate holds.
    assert.equal(competeVerdict(confidentHead, [classes[0]], { ...options, overrideMargin: 0 }).className, 'cpu_saturation');
  });

  it('lets a near-repeat of a team incident win against a confident head from the recurrence similarity on', () => {
    const confidentHead = { normal: 0.01, cpu_saturation: 0.98, memory_leak: 0.01 };
    const repeat = [{ label: 'basket_cpu_starvation', exampleCount: 1, signatureCosine: 3, embeddingCosine: 3 }];
    assert.equal(competeVerdict(confidentHead, repeat, options).className, 'cpu_saturation');
    assert.equal(competeVerdict(confidentHead, repeat, { ...options, recurrenceSimilarity: 3.1 }).className, 'cpu_saturation');
    const v = competeVerdict(confidentHead, repeat, { ...options, recurrenceSimilarity: 3 });
    assert.equal(v.className, 'basket_cpu_starvation');
    // One library class takes all the library's share: 0.9.
    assert.ok(Math.abs(v.probability - 0.9) < 1e-12);
  });

  it('does not claim a window below the acceptance similarity, and an empty library changes nothing', () => {
    const far = competeVerdict(unsureHead, [{ label: 'pool_leak', exampleCount: 1, signatureCosine: 0.5, embeddingCosine: 0.6 }], options);
    assert.equal(far.className, 'cpu_saturation');
    assert.equal(far.libraryWeight, 0);
    assert.ok(Math.abs(far.nearestSimilarity! - 0.55) < 1e-12);
    const empty = competeVerdict(unsureHead, [], options);
    assert.deepEqual(empty.probabilities, unsureHead);
    assert.equal(empty.nearestLabel, undefined);
  });

  it('refuses empty base probabilities and out-of-range options, naming them', () => {
    assert.throws(() => competeVerdict({}, [], options), /expected base probabilities for at least one class, got none/);
    assert.throws(() => competeVerdict(unsureHead, [], { ...options, maxWeight: 2 }), /expected maxWeight in 0..1, got 2/);
    assert.throws(() => competeVerdict(unsureHead, [], { ...options, temperature: 0 }), /expected temperature > 0, got 0/);
  });
});
