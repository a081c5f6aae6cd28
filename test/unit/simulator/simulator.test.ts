import assert from 'node:assert/strict';
import { inferFamily } from '../../../extension/core/frame/families';
import { CLASSES } from '../../../extension/core/model/types';
import {
  buildFewShotSplits, buildSplits, convertCounterToRates, describeSplits, generateSystem, sampleExamples,
  type TrainingExample,
} from '../../../training/simulator';
import { inverseNormalCdf, createRandom } from '../../../training/simulator/random';

const SYSTEM_SEEDS = Array.from({ length: 40 }, (_, k) => 1000 + k);

function sameFloats(a: Float64Array, b: Float64Array): boolean {
  return Buffer.from(a.buffer, a.byteOffset, a.byteLength).equals(Buffer.from(b.buffer, b.byteOffset, b.byteLength));
}

function sameExamples(a: readonly TrainingExample[], b: readonly TrainingExample[]): boolean {
  return a.length === b.length && a.every((ea, i) => {
    const eb = b[i] as TrainingExample;
    return ea.label === eb.label && ea.systemId === eb.systemId && ea.metrics.length === eb.metrics.length
      && ea.metrics.every((m, k) => {
        const n = eb.metrics[k];
        return n !== undefined && m.id === n.id && m.family === n.family && sameFloats(m.baseline, n.baseline) && sameFloats(m.window, n.window);
      });
  });
}

describe('simulator: determinism and shape', () => {
  it('gives identical examples for the same seed and different ones for another seed', () => {
    const options = { seed: 7, count: 40, systemSeeds: SYSTEM_SEEDS };
    assert.ok(sameExamples(sampleExamples(options), sampleExamples(options)));
    assert.ok(!sameExamples(sampleExamples(options), sampleExamples({ ...options, seed: 8 })));
  });

  it('draws example i from (seed, i) alone, so a smaller count is a prefix of a larger one', () => {
    const small = sampleExamples({ seed: 4, count: 12, systemSeeds: SYSTEM_SEEDS });
    const large = sampleExamples({ seed: 4, count: 30, systemSeeds: SYSTEM_SEEDS });
    assert.ok(sameExamples(small, large.slice(0, 12)));
    assert.deepEqual(sampleExamples({ seed: 4, count: 0, systemSeeds: SYSTEM_SEEDS }), []);
  });

  it('gives an identical system for the same seed and faults', () => {
    const a = generateSystem(42, { faults: ['memory_leak', 'error_storm'] });
    const b = generateSystem(42, { faults: ['memory_leak', 'error_storm'] });
    assert.deepEqual(a.incidents, b.incidents);
    assert.equal(a.series.length, b.series.length);
    a.series.forEach((s, k) => assert.ok(sameFloats(s.values, (b.series[k] as typeof s).values), s.name));
  });

  it('keeps the system structure (names, step) whatever faults are injected', () => {
    const a = generateSystem(5, { faults: ['cpu_saturation'] });
    const b = generateSystem(5, { faults: ['packet_loss'] });
    assert.equal(a.stepMs, b.stepMs);
    assert.deepEqual(a.series.map((s) => s.name), b.series.map((s) => s.name));
  });

  it('balances classes (counts differ by at most one) and returns exactly count examples', () => {
    const examples = sampleExamples({ seed: 1, count: 83, systemSeeds: SYSTEM_SEEDS });
    assert.equal(examples.length, 83);
    const counts = CLASSES.map((c) => examples.filter((e) => e.label === c).length);
    assert.ok(Math.max(...counts) - Math.min(...counts) <= 1, `counts ${counts.join(',')}`);
  });

  it('honours window and baseline length ranges, default and custom', () => {
    for (const e of sampleExamples({ seed: 2, count: 160, systemSeeds: SYSTEM_SEEDS })) {
      for (const m of e.metrics) {
        assert.ok(m.window.length >= 3 && m.window.length <= 64, `window ${m.window.length}`);
        assert.ok(m.baseline.length >= 3 && m.baseline.length <= 720, `baseline ${m.baseline.length}`);
      }
    }
    const custom = sampleExamples({ seed: 2, count: 48, systemSeeds: SYSTEM_SEEDS, windowSteps: [3, 3], baselineSteps: [5, 9] });
    for (const e of custom) for (const m of e.metrics) {
      assert.equal(m.window.length, 3);
      assert.ok(m.baseline.length >= 5 && m.baseline.length <= 9);
    }
  });

  it('gives every metric the family inference would infer from its name, not the true one', () => {
    for (const e of sampleExamples({ seed: 3, count: 40, systemSeeds: SYSTEM_SEEDS })) {
      e.metrics.forEach((m, k) => {
        const truth = e.truth?.[k];
        assert.ok(truth !== undefined);
        assert.ok(m.id.startsWith(truth.name), m.id);
        assert.equal(m.family, inferFamily(truth.name, truth.unit, truth.labels), m.id);
      });
    }
  });

  it('rejects bad options with the expected and actual values', () => {
    assert.throws(() => sampleExamples({ seed: 1, count: 1, systemSeeds: SYSTEM_SEEDS, windowSteps: [2, 10] }), /expected windowSteps .* got \[2, 10\]/);
    assert.throws(() => sampleExamples({ seed: 1, count: 1, systemSeeds: [] }), /expected at least one system seed, got 0/);
    assert.throws(() => generateSystem(1, { lengthSteps: 40, faults: ['cpu_saturation', 'memory_leak', 'packet_loss', 'error_storm'] }), /expected at least 8 steps per fault/);
  });

  it('draws all three naming styles and steps from 1 s to 5 min', () => {
    const systems = Array.from({ length: 60 }, (_, k) => generateSystem(k, { lengthSteps: 64, faults: [] }));
    const styles = new Set(systems.map((s) => s.namingStyle));
    assert.deepEqual([...styles].sort(), ['dotted', 'free_text', 'snake_total']);
    for (const s of systems) assert.ok(s.stepMs >= 1000 && s.stepMs <= 300_000);
    assert.ok(new Set(systems.map((s) => s.stepMs)).size >= 5);
  });
});

describe('simulator: family members', () => {
  it('keeps quantile series ordered (a quantile function is non-decreasing) at almost every step', () => {
    let pairs = 0;
    let crossed = 0;
    for (let seed = 0; seed < 40; seed += 1) {
      const system = generateSystem(seed, { lengthSteps: 200, faults: [] });
      const groups = new Map<string, Array<{ q: number; values: Float64Array }>>();
      for (const s of system.series) {
        const q = s.labels.quantile !== undefined ? Number(s.labels.quantile) : /\bp(\d+)\b/.test(s.name) ? Number(`0.${/\bp(\d+)\b/.exec(s.name)?.[1]}`) : Number.NaN;
        if (Number.isNaN(q)) continue;
        const key = s.name.replace(/\bp\d+\b/, 'pQ') + JSON.stringify({ ...s.labels, quantile: '' });
        groups.set(key, [...(groups.get(key) ?? []), { q, values: s.values }]);
      }
      for (const group of groups.values()) {
        group.sort((a, b) => a.q - b.q);
        for (let k = 1; k < group.length; k += 1) {
          const lower = (group[k - 1] as { values: Float64Array }).values;
          const upper = (group[k] as { values: Float64Array }).values;
          lower.forEach((v, i) => {
            if (Number.isNaN(v) || Number.isNaN(upper[i] as number)) return;
            pairs += 1;
            if (v > (upper[i] as number)) crossed += 1;
          });
        }
      }
    }
    assert.ok(pairs > 1000, `expected many quantile pairs, got ${pairs}`);
    assert.ok(crossed / pairs < 0.01, `quantiles crossed at ${((100 * crossed) / pairs).toFixed(2)} % of steps`);
  });
});

describe('simulator: splits', () => {
  it('uses disjoint systems for train, calibration and test', () => {
    const splits = buildSplits(9, { trainCount: 200, calibrationCount: 80, testCount: 80, trainSystems: 30, calibrationSystems: 10, testSystems: 10 });
    const ids = (xs: readonly TrainingExample[]): Set<string> => new Set(xs.map((e) => e.systemId));
    const [train, cal, test] = [ids(splits.train), ids(splits.calibration), ids(splits.test)];
    for (const id of cal) assert.ok(!train.has(id) && !test.has(id), id);
    for (const id of test) assert.ok(!train.has(id), id);
    assert.ok(splits.train.every((e) => (CLASSES as readonly string[]).includes(e.label)));
  });

  it('draws a split in chunks (firstIndex) exactly as in one call', () => {
    const described = describeSplits(9, { trainCount: 50, trainSystems: 12 });
    const whole = sampleExamples(described.train);
    const chunks = [0, 17, 34].flatMap((first) => sampleExamples({ ...described.train, firstIndex: first, count: Math.min(17, 50 - first) }));
    const summary = (xs: readonly TrainingExample[]): unknown[] => xs.map((e) => [e.label, e.systemId, e.metrics.map((m) => [m.id, Array.from(m.baseline), Array.from(m.window)])]);
    assert.deepEqual(summary(chunks), summary(whole));
    assert.deepEqual(summary(buildSplits(9, { trainCount: 50, trainSystems: 12, calibrationCount: 0, testCount: 0 }).train), summary(whole));
    assert.throws(() => sampleExamples({ ...described.train, firstIndex: -1 }), /firstIndex as a non-negative integer, got -1/);
  });

  it('gives few-shot support and query of the held-out classes from disjoint systems', () => {
    const few = buildFewShotSplits(9, { supportPerClass: 3, queryPerClass: 10 });
    assert.equal(few.support.length, 6);
    assert.equal(few.query.length, 20);
    const support = new Set(few.support.map((e) => e.systemId));
    for (const e of few.query) assert.ok(!support.has(e.systemId));
    assert.deepEqual([...new Set(few.query.map((e) => e.label))].sort(), ['connection_pool_exhaustion', 'cpu_steal_noisy_neighbour']);
  });
});

describe('simulator: counters', () => {
  it('converts a counter with a reset as PromQL rate() does (REFERENCE.md §4.3 check 9)', () => {
    // v = [100, 160, 220, 10, 70] at 60 s → rates [1, 1, 10/60, 1]; the drop to 10 is a reset.
    const rates = convertCounterToRates(Float64Array.from([100, 160, 220, 10, 70]), 60_000);
    assert.ok(Number.isNaN(rates[0] as number));
    assert.deepEqual([...rates.slice(1)].map((r) => Number(r.toFixed(4))), [1, 1, 0.1667, 1]);
  });

  it('exports counters cumulative: never decreasing except at resets, and resets happen', () => {
    let resets = 0;
    let counters = 0;
    for (let seed = 0; seed < 40; seed += 1) {
      const system = generateSystem(seed, { faults: ['memory_leak', 'error_storm'], lengthSteps: 600 });
      for (const s of system.series.filter((x) => x.kind === 'counter')) {
        counters += 1;
        let prev = Number.NaN;
        let maxIncrease = 0;
        const afterDrops: number[] = [];
        for (const v of s.values) {
          if (Number.isNaN(v)) continue;
          assert.ok(v >= 0, `${s.name} negative`);
          if (!Number.isNaN(prev) && v < prev) afterDrops.push(v);
          else if (!Number.isNaN(prev)) maxIncrease = Math.max(maxIncrease, v - prev);
          prev = v;
        }
        resets += afterDrops.length;
        // A reset restarts from zero, so right after it the counter holds at most a few steps of increase
        // (one step, or up to the 6-step gap runs the simulator punches).
        for (const v of afterDrops) assert.ok(v <= 8 * maxIncrease + 1, `${s.name}: a drop must restart near zero, got ${v} (largest step increase ${maxIncrease})`);
      }
    }
    assert.ok(counters > 20, `expected many counters, got ${counters}`);
    assert.ok(resets > 0, 'expected at least one counter reset (restarts after OOM or deploy)');
  });
});

describe('simulator: random numbers', () => {
  it('inverts the normal CDF to standard normal table values (from memory)', () => {
    assert.ok(Math.abs(inverseNormalCdf(0.975) - 1.959964) < 1e-5);
    assert.ok(Math.abs(inverseNormalCdf(0.5)) < 1e-12);
    assert.ok(Math.abs(inverseNormalCdf(0.001) + 3.090232) < 1e-5);
    assert.ok(Math.abs(inverseNormalCdf(0.8413447) - 1) < 1e-5);
  });

  it('draws normals with mean 0 and standard deviation 1', () => {
    const rng = createRandom(123);
    let sum = 0;
    let sumSq = 0;
    const n = 200_000;
    for (let i = 0; i < n; i += 1) {
      const z = rng.normal();
      sum += z;
      sumSq += z * z;
    }
    const mean = sum / n;
    assert.ok(Math.abs(mean) < 0.01, `mean ${mean}`);
    assert.ok(Math.abs(Math.sqrt(sumSq / n - mean * mean) - 1) < 0.01);
  });
});
