import { strict as assert } from 'node:assert';
import type { EncodedExample } from '../../../training/buildDataset';
import { createRandom, forwardSetModel, initSetModel, type SetModelShape } from '../../../training/setModel';
import { accumulateExampleGradient, PARAM_NAMES, trainSetModel, zeroGrads, type ParamSet } from '../../../training/trainSetModel';

const SHAPE: SetModelShape = { featureCount: 5, hiddenSize: 6, embeddingSize: 4, classCount: 3 };

function makeExample(random: () => number, label: number, nodeCount: number): EncodedExample {
  const features = new Float32Array(nodeCount * SHAPE.featureCount);
  const familyIds = new Int32Array(nodeCount);
  for (let n = 0; n < nodeCount; n++) {
    familyIds[n] = Math.floor(random() * 11);
    for (let i = 0; i < SHAPE.featureCount; i++) features[n * SHAPE.featureCount + i] = random() * 2 - 1 + (i === label ? 1.5 : 0);
  }
  return { features, familyIds, mask: new Float32Array(nodeCount).fill(1), label, systemId: 'toy' };
}

describe('set-model trainer', () => {
  it('computes the same gradient as central finite differences', () => {
    // Numerical differentiation (central differences, common practice) is the reference.
    const random = createRandom(3);
    const w = initSetModel(SHAPE, 9);
    for (const b of [w.b1, w.b2, w.bc, w.bo]) for (let i = 0; i < b.length; i++) b[i] = random() * 0.2;
    const ex = makeExample(random, 1, 5);
    ex.mask[2] = 0;
    const params = w as unknown as ParamSet;
    const g = zeroGrads(params);
    accumulateExampleGradient(w, ex, ex.mask, g, 1);
    const h = 1e-3;
    let checked = 0;
    for (const name of PARAM_NAMES) {
      for (let i = 0; i < params[name].length; i += 7) {
        const old = params[name][i];
        params[name][i] = old + h;
        const up = accumulateExampleGradient(w, ex, ex.mask, null, 1);
        params[name][i] = old - h;
        const down = accumulateExampleGradient(w, ex, ex.mask, null, 1);
        params[name][i] = old;
        const numeric = (up - down) / (2 * h);
        assert.ok(Math.abs(numeric - g[name][i]) < 2e-3 + 2e-2 * Math.abs(numeric), `${name}[${i}]: numeric ${numeric}, analytic ${g[name][i]}`);
        checked++;
      }
    }
    assert.ok(checked > 30);
  });

  it('learns a separable toy problem and is reproducible from its seed, in worker threads or not', async () => {
    const random = createRandom(5);
    const data = Array.from({ length: 300 }, (_, i) => makeExample(random, i % 3, 2 + (i % 5)));
    const norm = { mean: new Float32Array(SHAPE.featureCount), std: new Float32Array(SHAPE.featureCount).fill(1) };
    const options = { epochs: 15, batchSize: 32, learningRate: 1e-2, weightDecay: 0, nodeDropoutRate: 0.3, seed: 11 };
    const a = await trainSetModel(data, SHAPE, norm, { ...options, useWorkers: false });
    const b = await trainSetModel(data, SHAPE, norm, { ...options, useWorkers: true });
    // The shards run in two worker threads for b and one after the other here for a: same sums, same order.
    for (const name of PARAM_NAMES) assert.deepEqual(Array.from(a[name]), Array.from(b[name]), name);
    let correct = 0;
    for (const ex of data) {
      const { logits } = forwardSetModel(a, ex.features, ex.familyIds, ex.mask);
      if (logits.indexOf(Math.max(...logits)) === ex.label) correct++;
    }
    assert.ok(correct / data.length > 0.9, `accuracy ${correct / data.length}`);
  });

  it('changes the weights when the seed changes', async () => {
    const random = createRandom(6);
    const data = Array.from({ length: 60 }, (_, i) => makeExample(random, i % 3, 3));
    const norm = { mean: new Float32Array(SHAPE.featureCount), std: new Float32Array(SHAPE.featureCount).fill(1) };
    const options = { epochs: 2, batchSize: 16, learningRate: 1e-2, weightDecay: 0, nodeDropoutRate: 0.3, useWorkers: false };
    const a = await trainSetModel(data, SHAPE, norm, { ...options, seed: 1 });
    const b = await trainSetModel(data, SHAPE, norm, { ...options, seed: 2 });
    assert.notDeepEqual(Array.from(a.wc), Array.from(b.wc));
  });
});
