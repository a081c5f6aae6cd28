import assert from 'node:assert/strict';
import { createHash, type Hash } from 'node:crypto';
import { CLASSES } from '../../../extension/core/model/types';
import { generateSystem, HELD_OUT_CLASSES, sampleExamples, type SimSystem, type TrainingExample } from '../../../training/simulator';
import { inverseNormalCdf, readNormalTable } from '../../../training/simulator/random';

// Golden hashes of the simulator output. The bundled model is trained from this simulator, so
// `npm run train` must reproduce the same examples bit for bit: performance work on the simulator
// may change how values are computed, never which values come out. The expected hashes were
// computed from the simulator at commit f64165e (before any throughput work); a change here means
// the training data changed, and the model card and bundled model must follow deliberately.
// Families come from inferFamily and counter rates from the frame's converter (extension/core):
// a change there changes the training data too, and shows here as well.
//
// The hash is SHA-256 (FIPS 180-4, via node:crypto) over every Float64 value's 8 little-endian
// bytes plus every id, family, label and evidence value. NaN is hashed as one canonical pattern:
// its payload bits carry nothing the encoder or the trainer reads, and V8 may produce either sign.

const CANONICAL_NAN = Buffer.from([0, 0, 0, 0, 0, 0, 0xf8, 0x7f]);

function updateValues(hash: Hash, values: ArrayLike<number>): void {
  const bytes = Buffer.alloc(8 * values.length);
  for (let i = 0; i < values.length; i += 1) {
    const v = values[i] as number;
    if (Number.isNaN(v)) CANONICAL_NAN.copy(bytes, 8 * i);
    else bytes.writeDoubleLE(v, 8 * i);
  }
  hash.update(`#${values.length}:`);
  hash.update(bytes);
}

function updateText(hash: Hash, text: string | undefined): void {
  hash.update(`${text === undefined ? '\u0001' : text}\u0000`);
}

function hashExamples(examples: readonly TrainingExample[]): string {
  const hash = createHash('sha256');
  hash.update(`examples:${examples.length}\u0000`);
  for (const e of examples) {
    updateText(hash, e.label);
    updateText(hash, e.systemId);
    updateText(hash, e.namingStyle);
    updateValues(hash, [e.stepMs ?? Number.NaN, e.faultEvidence ?? Number.NaN]);
    updateText(hash, e.faultEvidence === undefined ? 'no-evidence' : 'evidence');
    updateText(hash, String(e.metrics.length));
    e.metrics.forEach((m, k) => {
      updateText(hash, m.id);
      updateText(hash, m.family);
      updateValues(hash, m.baseline);
      updateValues(hash, m.window);
      const t = e.truth?.[k];
      updateText(hash, t === undefined ? undefined : JSON.stringify([t.role, t.trueFamily, t.isCounter, t.name, t.unit ?? null, t.labels ?? null]));
    });
  }
  return hash.digest('hex');
}

function hashSystem(system: SimSystem): string {
  const hash = createHash('sha256');
  updateText(hash, JSON.stringify([system.id, system.seed, system.namingStyle, system.stepMs, system.incidents]));
  updateValues(hash, system.timesMs);
  for (const s of system.series) {
    updateText(hash, JSON.stringify([s.name, s.labels, s.unit ?? null, s.kind, s.trueFamily, s.role ?? null]));
    updateValues(hash, s.values);
  }
  return hash.digest('hex');
}

/** Fixed sets; together they reach every class, both evidence paths (checked and unchecked) and several grids. */
const SAMPLE_CASES = [
  {
    name: 'built-in classes, default ranges and difficulty (the training recipe)',
    options: { seed: 7, count: 240, systemSeeds: Array.from({ length: 30 }, (_, k) => 1 + k) },
    expected: 'd51f03460e18a422ab208e87b70b3af5bac8a32882d6bb900472ce9b0267eda6',
  },
  {
    name: 'built-in and held-out classes, other systems',
    options: { seed: 31, count: 160, systemSeeds: Array.from({ length: 25 }, (_, k) => 500 + 7 * k), classes: [...CLASSES, ...HELD_OUT_CLASSES] },
    expected: '8b9801706ee5879753e51c8f7d576bf0a948d5d48e1a37de005721bf94ca1360',
  },
  {
    name: 'held-out classes only, no evidence check, custom ranges and difficulty',
    options: {
      seed: 99, count: 80, systemSeeds: [3, 44, 1234, 98765], classes: HELD_OUT_CLASSES,
      windowSteps: [5, 30] as const, baselineSteps: [10, 200] as const,
      difficulty: { minFaultEvidence: 0, weakFaultShare: 0.6, keyMetricDropProbability: 0.3, randomDropProbability: 0.5 },
    },
    expected: '9e507242b280a4d8ce99cd1970082362bfe0989553029d17ec70c511bf40b8e1',
  },
] as const;

const SYSTEM_CASES = [
  { name: 'generateSystem(3), default faults and grid', seed: 3, options: {}, expected: 'e78af2475c39cf750e67ecd660cdc8f9931dd71a25ae1a92a02c694ea1df46e2' },
  { name: 'generateSystem(17) with three named faults on 900 steps', seed: 17, options: { faults: ['memory_leak', 'connection_pool_exhaustion', 'packet_loss'] as const, lengthSteps: 900 }, expected: '2bb3aabf06bbfcb86e415a9f0bc8ac1c4bbaca4c54acd85a490d2a4d7390dac2' },
] as const;

describe('simulator output is bit-identical to the golden hashes (training reproducibility)', () => {
  for (const c of SAMPLE_CASES) {
    it(`sampleExamples: ${c.name}`, () => {
      const examples = sampleExamples(c.options);
      assert.equal(examples.length, c.options.count);
      assert.equal(hashExamples(examples), c.expected);
    });
  }
  for (const c of SYSTEM_CASES) {
    it(c.name, () => {
      assert.equal(hashSystem(generateSystem(c.seed, c.options)), c.expected);
    });
  }

  it('the half normal table mirrored gives every entry of the full table, inverseNormalCdf((k + ½) / 65,536), bit for bit', () => {
    // The generator keeps only the lower half of its 65,536-entry table; the upper half must be
    // the exact negation of the mirrored entry, or every normal draw above the median would move.
    let mismatches = 0;
    for (let k = 0; k < 65_536; k += 1) {
      if (!Object.is(readNormalTable(k), inverseNormalCdf((k + 0.5) / 65_536))) mismatches += 1;
    }
    assert.equal(mismatches, 0);
    // Acklam's approximation at the quartiles: ±0.6744897501960817 (standard normal table, from memory, to 1.15e-9).
    assert.ok(Math.abs(inverseNormalCdf(0.75) - 0.6744897501960817) < 1e-8);
  });

  it('the hash sees a single-bit change in one value (so a golden match means equality)', () => {
    const examples = sampleExamples({ seed: 5, count: 4, systemSeeds: [8] });
    const before = hashExamples(examples);
    const metric = examples[0]?.metrics[0];
    assert.ok(metric);
    const k = metric.window.findIndex((v) => Number.isFinite(v) && v !== 0);
    assert.ok(k >= 0, 'expected a finite non-zero window value');
    const bits = new Float64Array([metric.window[k] as number]);
    new BigUint64Array(bits.buffer)[0] ^= 1n; // flip the last mantissa bit
    (metric.window as Float64Array)[k] = bits[0] as number;
    assert.notEqual(hashExamples(examples), before);
  });
});
