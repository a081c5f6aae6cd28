import assert from 'node:assert/strict';
import { parseExperimentArgs } from '../../../training/experiment';

describe('parseExperimentArgs', () => {
  it('reads the flags and fills the defaults (dropout 0.5, the default width, N / 100 systems, at least 300)', () => {
    assert.deepEqual(parseExperimentArgs(['--train', '32000', '--epochs', '8']), { trainCount: 32000, epochs: 8, dropoutRates: [0.5], hiddenSize: 64, trainSystems: 320 });
    assert.equal(parseExperimentArgs(['--train', '6000', '--epochs', '2']).trainSystems, 300);
    assert.deepEqual(parseExperimentArgs(['--train', '800', '--epochs', '1', '--dropout', '0,0.2', '--hidden', '32', '--systems', '50']).dropoutRates, [0, 0.2]);
  });

  it('names the flag and what was expected on bad input', () => {
    assert.throws(() => parseExperimentArgs(['--epochs', '8']), /--train: expected a positive integer, got ""/);
    assert.throws(() => parseExperimentArgs(['--train', '1e3', '--epochs', '8', '--hidden', '2.5']), /--hidden: expected a positive integer, got "2.5"/);
    assert.throws(() => parseExperimentArgs(['--train', '100', '--epochs', '1', '--dropout', '0.5,x']), /--dropout: expected rates in 0..1/);
  });
});
