import assert from 'node:assert/strict';
import { buildSystemSpec, createRandom, sampleExamples } from '../../../training/simulator';
import { measureFaultEvidence } from '../../../training/simulator/faultEvidence';
import { applyFault } from '../../../training/simulator/faults';
import { copyDrivers, createDrivers, DRIVER_KEYS, OBSERVABLE_KEYS, type Observables } from '../../../training/simulator/latentModel';
import { renderSystem } from '../../../training/simulator/renderSystem';

function flatObservables(n: number, level: number): Observables {
  const o = {} as Record<(typeof OBSERVABLE_KEYS)[number], Float64Array>;
  for (const key of OBSERVABLE_KEYS) o[key] = new Float64Array(n).fill(key === 'tail' ? 1 : level);
  return o;
}

describe('fault evidence (counterfactual rendering)', () => {
  const spec = buildSystemSpec(4242);

  it('derives identical observables when the counterfactual has no fault to remove', () => {
    const system = renderSystem(spec, { lengthSteps: 200, startMs: Date.UTC(2026, 0, 5), faults: [], benignPerStep: 1 / 50, keepCounterfactual: true }, createRandom(7));
    assert.ok(system.observables);
    for (const key of OBSERVABLE_KEYS) assert.deepEqual(system.observables.counterfactual[key], system.observables.faulted[key], key);
  });

  it('replays the same noise: outside the fault and its tail, faulted and quiet observables agree exactly', () => {
    const fault = { label: 'disk_io_saturation' as const, startIndex: 120, endIndex: 150, intensity: 0.8 };
    const system = renderSystem(spec, { lengthSteps: 200, startMs: Date.UTC(2026, 0, 5), faults: [fault], benignPerStep: 0, keepCounterfactual: true }, createRandom(9));
    const { faulted, counterfactual } = system.observables!;
    for (let i = 0; i < 120; i++) assert.equal(faulted.diskBusy[i], counterfactual.diskBusy[i]);
    assert.ok((faulted.diskBusy[140] as number) > (counterfactual.diskBusy[140] as number) + 0.3);
  });

  it('puts a fault\'s coincidental secondary change into the counterfactual too, so it is never the evidence', () => {
    // network_latency itself only touches the delays, loss and the CPU scale; any other driver that
    // moves is the coincidental change, and it must move the same in the run without the fault.
    const own = new Set(['callerDelayS', 'dependencyDelayS', 'lossFraction', 'cpuScale']);
    let coincidences = 0;
    for (let seed = 1; seed <= 40; seed++) {
      const faulted = createDrivers(60);
      const untouched = copyDrivers(faulted);
      const counterfactual = copyDrivers(faulted);
      applyFault(faulted, { label: 'network_latency', startIndex: 20, endIndex: 50, intensity: 0.7 }, spec.params, createRandom(seed), counterfactual);
      let isCoincidence = false;
      for (const key of DRIVER_KEYS) {
        if (own.has(key)) {
          assert.deepEqual(counterfactual[key], untouched[key], `seed ${seed}: the fault's own ${key} stays out of the counterfactual`);
          continue;
        }
        assert.deepEqual(faulted[key], counterfactual[key], `seed ${seed}: ${key}`);
        if (faulted[key].some((v, i) => v !== untouched[key][i])) isCoincidence = true;
      }
      if (isCoincidence) coincidences++;
    }
    // A coincidental change comes with 45 % of faults: 40 draws hold some, but not all.
    assert.ok(coincidences > 5 && coincidences < 35, `coincidences ${coincidences}`);
  });

  it('measures the effect in units of the baseline robust scale, 1.4826·MAD (Iglewicz & Hoaglin 1993)', () => {
    // Baseline 1..5: median 3, MAD 1, so the scale is 1.4826; a shift of 3 scales is 4.4478.
    const quiet = flatObservables(10, 3);
    const faulted = flatObservables(10, 3);
    for (let i = 6; i < 10; i++) faulted.cpu[i] = 3 + 4.4478;
    const cpuSpec = spec.series.find((s) => s.role.source === 'cpu' && s.tailWeight === 0)!;
    const metric = { spec: { ...cpuSpec, factor: 1 }, baseline: [1, 2, 3, 4, 5] };
    assert.ok(Math.abs(measureFaultEvidence([metric], { faulted, counterfactual: quiet }, 6, 4) - 3) < 1e-9);
    // A spike on one step of four is below the 75th percentile: intermittent noise is not evidence.
    const spike = flatObservables(10, 3);
    spike.cpu[7] = 100;
    assert.equal(measureFaultEvidence([metric], { faulted: spike, counterfactual: quiet }, 6, 4), 0);
  });

  it('gives every default fault example at least 3 noise units of evidence, and none to normal examples', () => {
    const examples = sampleExamples({ seed: 31, count: 64, systemSeeds: [11, 12, 13, 14] });
    for (const e of examples) {
      if (e.label === 'normal') assert.equal(e.faultEvidence, undefined);
      else assert.ok((e.faultEvidence as number) >= 3, `${e.label}: ${e.faultEvidence}`);
    }
    const unchecked = sampleExamples({ seed: 31, count: 64, systemSeeds: [11, 12, 13, 14], difficulty: { minFaultEvidence: 0 } });
    assert.ok(unchecked.every((e) => e.faultEvidence === undefined));
  });
});
