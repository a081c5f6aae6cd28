import { strict as assert } from 'node:assert';
import { encodeInWorkers } from '../../../training/encodeInWorkers';
import { encodeInChunks } from '../../../training/train';
import { describeSplits } from '../../../training/simulator';

describe('parallel dataset builder', () => {
  it('draws and encodes a split on worker threads exactly as in one thread, in order', async () => {
    const options = { ...describeSplits(5, { trainCount: 90, trainSystems: 9 }).train };
    const inThread = encodeInChunks(options, 25);
    const inWorkers = await encodeInWorkers(options, 2, 20);
    assert.equal(inWorkers.length, 90);
    const summary = (xs: typeof inThread): unknown[] => xs.map((e) => [e.label, e.systemId, Array.from(e.familyIds), Array.from(e.mask), Array.from(e.features)]);
    assert.deepEqual(summary(inWorkers), summary(inThread));
  });

  it('refuses a worker count that is not a positive integer', async () => {
    await assert.rejects(encodeInWorkers({ ...describeSplits(5, { trainCount: 4 }).train }, 0), /workerCount as a positive integer, got 0/);
  });
});
