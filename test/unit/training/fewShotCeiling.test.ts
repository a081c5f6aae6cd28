import { strict as assert } from 'node:assert';
import { DEFAULT_WINDOW_SPEC } from '../../../extension/core/model/encode';
import { CLASSES } from '../../../extension/core/model/types';
import { encodeExamples } from '../../../training/buildDataset';
import { ALL_KINDS, computeBuiltInMacroF1, parseCeilingArgs } from '../../../training/fewShotCeiling';
import { describeSplits, HELD_OUT_CLASSES, sampleExamples } from '../../../training/simulator';

describe('few-shot ceiling (many-shot upper bound of the library task)', () => {
  it('keeps the built-in classes at their indices and puts the held-out kinds after them', () => {
    assert.deepEqual(ALL_KINDS.slice(0, CLASSES.length), [...CLASSES]);
    assert.deepEqual(ALL_KINDS.slice(CLASSES.length), [...HELD_OUT_CLASSES]);
  });

  it('reads --train and --epochs with defaults, and names the flag on bad input', () => {
    assert.deepEqual(parseCeilingArgs([]), { trainCount: 40_000, epochs: 8 });
    assert.deepEqual(parseCeilingArgs(['--train', '2000', '--epochs', '3']), { trainCount: 2000, epochs: 3 });
    assert.throws(() => parseCeilingArgs(['--train', '-5']), /--train: expected a positive integer, got "-5"/);
    assert.throws(() => parseCeilingArgs(['--epochs', 'two']), /--epochs: expected a positive integer, got "two"/);
  });

  it('averages F1 over the built-in classes only; a built-in incident called a held-out kind is a miss', () => {
    // Built-in classes A, B, C (indices 0–2) and the held-out kind H (index 8); rows = true,
    // columns = predicted. By hand (F1 = 2TP / (2TP + FP + FN)), H counts only as FP / FN of A–C:
    //   A: TP 4, FP 1 (from B), FN 1 (called H) → 8/10
    //   B: TP 3, FP 0, FN 1 (called A)          → 6/7
    //   C: TP 2, FP 2 (from H), FN 0            → 4/6
    // The other five built-in classes each hold one incident, called right (F1 1), so the mean
    // over the eight is (0.8 + 6/7 + 2/3 + 5) / 8; H's own F1 (5 of 7 right) does not enter.
    const h = CLASSES.length;
    const m: number[][] = Array.from({ length: h + 1 }, (_, r) => Array.from({ length: h + 1 }, (_, c) => (r === c && r >= 3 && r < h ? 1 : 0)));
    m[0][0] = 4; m[0][h] = 1;
    m[1][0] = 1; m[1][1] = 3;
    m[2][2] = 2;
    m[h][2] = 2; m[h][h] = 5;
    const expected = (0.8 + 6 / 7 + 2 / 3 + (h - 3)) / h;
    assert.ok(Math.abs(computeBuiltInMacroF1(m) - expected) < 1e-12);
  });

  it('encodes the held-out kinds with their ALL_KINDS index, and skips them with the built-in list', () => {
    const examples = sampleExamples({ ...describeSplits(5, { trainSystems: 4 }).train, classes: ALL_KINDS, count: 10 });
    const all = encodeExamples(examples, DEFAULT_WINDOW_SPEC, ALL_KINDS);
    assert.deepEqual(all.map((e) => e.label), examples.map((e) => ALL_KINDS.indexOf(e.label)));
    assert.deepEqual(all.map((e) => e.label), [0, 1, 2, 3, 4, 5, 6, 7, 8, 9]);
    assert.equal(encodeExamples(examples, DEFAULT_WINDOW_SPEC).length, CLASSES.length);
  });
});
