/**
 * Each fault's signature as the trade knows it (REFERENCE.md §5 symptom → fault table, after
 * Gregg's USE method and Wilkie's RED method) must be present in the examples wherever the key
 * metric exists, and clearly more often than in normal windows; partial signatures are allowed
 * (vantage points, weak faults), so the checks are rates, not every example.
 */
import assert from 'node:assert/strict';
import { sampleExamples, type TrainingExample, type SimClass } from '../../../training/simulator';

function median(values: Float64Array): number {
  const v = [...values].filter((x) => !Number.isNaN(x)).sort((a, b) => a - b);
  if (v.length === 0) return Number.NaN;
  const mid = v.length >> 1;
  return v.length % 2 ? (v[mid] as number) : ((v[mid - 1] as number) + (v[mid] as number)) / 2;
}

/** Robust shift z of window median vs baseline (Iglewicz & Hoaglin: 1.4826·MAD), with a 1 % floor. */
function shiftZ(baseline: Float64Array, window: Float64Array): number {
  const mb = median(baseline);
  const mad = median(Float64Array.from(baseline, (x) => Math.abs(x - mb)));
  return (median(window) - mb) / (1.4826 * mad + 0.01 * Math.abs(mb) + 1e-12);
}

/** Share of examples having a metric of `role` whose shift has the sign of `direction` beyond 3; undefined if none has the role. */
function shareShifted(examples: readonly TrainingExample[], roles: readonly string[], direction: 1 | -1): { share: number; count: number } {
  let hit = 0;
  let count = 0;
  for (const e of examples) {
    const zs = e.metrics.map((m, k) => (roles.includes(e.truth?.[k]?.role ?? '') ? shiftZ(m.baseline, m.window) : Number.NaN)).filter((z) => !Number.isNaN(z));
    if (zs.length === 0) continue;
    count += 1;
    if (zs.some((z) => direction * z > 3)) hit += 1;
  }
  return { share: count === 0 ? 0 : hit / count, count };
}

describe('simulator: fault signatures (REFERENCE.md §5)', () => {
  const byClass = new Map<SimClass, TrainingExample[]>();
  before(function () {
    this.timeout(300_000); // 1,200 examples; the shared 2-core machine can be slow
    const classes: SimClass[] = ['normal', 'cpu_saturation', 'memory_leak', 'disk_io_saturation', 'network_latency', 'packet_loss', 'traffic_surge', 'error_storm', 'connection_pool_exhaustion', 'cpu_steal_noisy_neighbour'];
    const examples = sampleExamples({ seed: 77, count: 1200, systemSeeds: Array.from({ length: 80 }, (_, k) => 500 + k), classes });
    for (const e of examples) byClass.set(e.label, [...(byClass.get(e.label) ?? []), e]);
  });
  const cases: ReadonlyArray<[SimClass, readonly string[], 1 | -1, number, string]> = [
    ['cpu_saturation', ['cpuUtil'], 1, 0.85, 'CPU utilisation → ~100 %'],
    ['cpu_saturation', ['cpuIdle'], -1, 0.8, 'idle time falls (polarity flip)'],
    ['memory_leak', ['memUsed', 'memRatio'], 1, 0.6, 'RSS / working set ramps'],
    ['disk_io_saturation', ['diskBusy'], 1, 0.85, 'io_time rate → 1 s/s'],
    // The delay sits on the caller's path or on ours to the dependency; callers see it either way.
    ['network_latency', ['callerLatency'], 1, 0.85, "callers' (service-level) latency up"],
    ['packet_loss', ['retrans'], 1, 0.8, 'TCP retransmits up'],
    ['traffic_surge', ['requests'], 1, 0.8, 'request rate up first'],
    ['error_storm', ['errorRatio'], 1, 0.85, 'error ratio jumps'],
    ['error_storm', ['successRatio'], -1, 0.85, 'success ratio falls (polarity flip)'],
    ['connection_pool_exhaustion', ['poolUse', 'poolPending'], 1, 0.8, 'pool in use → max, pending up'],
    ['cpu_steal_noisy_neighbour', ['cpuSteal'], 1, 0.8, 'steal up'],
  ];
  for (const [label, roles, direction, minShare, what] of cases) {
    it(`${label}: ${what} in most examples that have the metric, far more than in normal windows`, () => {
      const fault = shareShifted(byClass.get(label) ?? [], roles, direction);
      const normal = shareShifted(byClass.get('normal') ?? [], roles, direction);
      assert.ok(fault.count >= 10, `too few ${label} examples with ${roles.join('/')}: ${fault.count}`);
      assert.ok(fault.share >= minShare, `${label}: ${roles.join('/')} shifted in ${(fault.share * 100).toFixed(0)} %, expected >= ${minShare * 100} %`);
      assert.ok(normal.share <= 0.2 && fault.share > normal.share + 0.5, `normal windows shift ${roles.join('/')} in ${(normal.share * 100).toFixed(0)} %`);
    });
  }

  it('error_storm leaves resources flat: CPU utilisation rarely shifts up', () => {
    assert.ok(shareShifted(byClass.get('error_storm') ?? [], ['cpuUtil'], 1).share < 0.3);
  });

  it('cpu_steal_noisy_neighbour keeps own CPU utilisation flat-ish while steal rises', () => {
    assert.ok(shareShifted(byClass.get('cpu_steal_noisy_neighbour') ?? [], ['cpuUtil'], 1).share < 0.3);
  });

  it('normal windows are noisy: latency percentiles sometimes reach |z| >= 3 at a point', () => {
    const normals = byClass.get('normal') ?? [];
    let withLatency = 0;
    let spiky = 0;
    for (const e of normals) {
      const latency = e.metrics.filter((m) => m.family === 'latency');
      if (latency.length === 0) continue;
      withLatency += 1;
      const isSpiky = latency.some((m) => {
        const mb = median(m.baseline);
        const scale = 1.4826 * median(Float64Array.from(m.baseline, (x) => Math.abs(x - mb))) + 1e-12;
        return [...m.window].some((x) => Math.abs(x - mb) / scale >= 3);
      });
      if (isSpiky) spiky += 1;
    }
    assert.ok(withLatency > 20);
    assert.ok(spiky / withLatency >= 0.2, `only ${(100 * spiky / withLatency).toFixed(0)} % of normal windows have a latency point at |z| >= 3`);
  });
});
