import assert from 'node:assert/strict';
import { measureTierGuard } from '../../../training/fewShotStudies';
import type { CompetitionOptions } from '../../../extension/core/model/librarySignatureVerdict';
import type { EvaluationGroup } from '../../../training/fewShotScoring';

// Embedding only, unit scale: the combined similarity is the embedding cosine itself.
const options: CompetitionOptions = {
  scale: { signatureWeight: 0.5, signatureMean: 0, signatureSd: 1, embeddingMean: 0, embeddingSd: 1 }, classAggregate: 'mean',
  acceptSimilarity: 0.5, acceptMargin: 0, overrideMargin: Number.POSITIVE_INFINITY, recurrenceSimilarity: 0.5, headConfidenceCap: 0.8, maxWeight: 0.9, temperature: 0.25,
};
const POOL = 'connection_pool_exhaustion';
const example = (label: string, embedding: number[], head: string, p: number): EvaluationGroup['support'][number] =>
  ({ label, systemId: 's1', embedding: Float64Array.from(embedding), probabilities: { [head]: p, normal: 1 - p } });
const group: EvaluationGroup = {
  support: [example(POOL, [1, 0], 'network_latency', 0.99)],
  heldOut: [example(POOL, [1, 0], 'network_latency', 0.999)],
  builtIn: [example('network_latency', [0.9, 0.1], 'network_latency', 0.995)],
};

describe('few-shot evaluation: guards on the tiers that overrule a confident head', () => {
  it('counts the near-repeat claims on a confident, correct head and what a guard costs (hand-computed)', () => {
    // Both queries are near-repeats of the one pool entry (cosines 1 and 0.9/√0.82 ≈ 0.994, ≥ 0.5) with heads above the cap.
    const none = measureTierGuard('none', [group], [POOL], 1, 2, options, () => true);
    assert.deepEqual({ ...none }, { name: 'none', heldOutAccuracy: 1, confidentCorrectClaimed: 1, confidentCorrectCount: 1 });
    // A head-probability guard at 0.99 stops both: the claim goes, and so does the held-out recognition.
    const guarded = measureTierGuard('head top ≤ 0.99', [group], [POOL], 1, 2, options, (c) => c.headTop <= 0.99);
    assert.deepEqual({ ...guarded }, { name: 'head top ≤ 0.99', heldOutAccuracy: 0, confidentCorrectClaimed: 0, confidentCorrectCount: 1 });
  });
});
