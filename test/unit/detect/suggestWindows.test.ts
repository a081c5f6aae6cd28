import assert from 'node:assert/strict';
import type { Family, FrameSeries, MetricFrame } from '../../../extension/core/frame/types';
import { suggestWindows } from '../../../extension/core/detect/suggestWindows';
import { computeSeasonalBaseline, chooseSeasonPeriod } from '../../../extension/core/detect/seasonalBaseline';

const STEP_MS = 60_000;
const T0 = Date.UTC(2026, 2, 1);

/** Deterministic noise (mulberry32 + Box–Muller), so the scenarios are reproducible. */
function makeNoise(seed: number): () => number {
  let a = seed >>> 0;
  const uniform = (): number => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  return () => Math.sqrt(-2 * Math.log(1 - uniform())) * Math.cos(2 * Math.PI * uniform());
}

function makeFrame(columns: ReadonlyArray<{ id: string; family: Family; values: Float64Array }>, stepMs = STEP_MS): MetricFrame {
  const n = columns[0]?.values.length ?? 0;
  const series: FrameSeries[] = columns.map((c) => ({ id: c.id, name: c.id, labels: {}, family: c.family, kind: 'gauge',
    isConvertedToRate: false, values: c.values, gapFraction: 0 }));
  return { timesMs: Float64Array.from({ length: n }, (_, i) => T0 + i * stepMs), stepMs, series, warnings: [], assumptions: [], duplicateCount: 0 };
}

/** Larkspur Provisions' basket-api: a level shift in latency and errors over [start, end]. */
function makeShiftScenario(n: number, start: number, end: number): MetricFrame {
  const noise = makeNoise(7);
  const col = (base: number, sd: number, shift: number): Float64Array =>
    Float64Array.from({ length: n }, (_, i) => base + sd * noise() + (i >= start && i <= end ? shift : 0));
  return makeFrame([
    { id: 'basket_api_latency_p99_ms', family: 'latency', values: col(120, 5, 60) },
    { id: 'basket_api_errors_total', family: 'errors', values: col(2, 0.5, 3) },
    { id: 'pantry_db_cpu_utilization', family: 'cpu', values: col(0.4, 0.02, 0) },
  ]);
}

describe('suggestWindows', () => {
  it('finds an injected level shift within one step and puts an equal-length quiet baseline before it', () => {
    const r = suggestWindows(makeShiftScenario(300, 180, 219));
    assert.equal(r.status, 'ok');
    assert.ok(r.incident && r.baseline);
    assert.ok(Math.abs(r.incident.startIndex - 180) <= 1 && Math.abs(r.incident.endIndex - 219) <= 1,
      `incident ${r.incident.startIndex}-${r.incident.endIndex}`);
    assert.equal(r.incident.startMs, T0 + r.incident.startIndex * STEP_MS);
    assert.equal(r.incident.uncertaintyMs, STEP_MS);
    assert.equal(r.baseline.endIndex, r.incident.startIndex - 1);
    assert.equal(r.baseline.endIndex - r.baseline.startIndex, r.incident.endIndex - r.incident.startIndex);
    assert.equal(r.isBaselineAfterIncident, false);
  });

  it('puts CUSUM onsets of the shifted metrics near the start on the timeline, not the flat one', () => {
    const r = suggestWindows(makeShiftScenario(300, 180, 219));
    const cusum = r.changePoints.filter((c) => c.method === 'cusum' && c.direction === 'up' && Math.abs(c.index - 180) <= 2);
    assert.deepEqual([...new Set(cusum.map((c) => c.seriesId))].sort(), ['basket_api_errors_total', 'basket_api_latency_p99_ms']);
    assert.ok(r.changePoints.every((c) => c.seriesId !== 'pantry_db_cpu_utilization' || Math.abs(c.magnitude) < 6));
    assert.ok(cusum.every((c) => c.magnitude > 3), 'shift of ≥ 6σ should read as a large robust z');
  });

  it('takes the baseline after the incident when the incident starts at the first sample', () => {
    const r = suggestWindows(makeShiftScenario(200, 0, 19));
    assert.equal(r.status, 'ok');
    assert.ok(r.baseline && r.incident);
    assert.equal(r.isBaselineAfterIncident, true);
    assert.ok(r.baseline.startIndex > r.incident.endIndex);
  });

  it('does not let a family with many members outvote a lone family (pooling per family)', () => {
    const noise = makeNoise(11);
    const n = 400;
    // ten latency percentiles share one mild bump at 100–119; the lone error ratio jumps at 300–339.
    const cols = Array.from({ length: 10 }, (_, k) => ({ id: `checkout_latency_p${90 + k}`, family: 'latency' as Family,
      values: Float64Array.from({ length: n }, (_, i) => 100 + noise() + (i >= 100 && i < 120 ? 4 : 0)) }));
    cols.push({ id: 'checkout_error_ratio', family: 'errors', values: Float64Array.from({ length: n }, (_, i) => 0.01 * noise() + (i >= 300 && i < 340 ? 0.06 : 0)) });
    const r = suggestWindows(makeFrame(cols));
    assert.ok(r.incident && Math.abs(r.incident.startIndex - 300) <= 1, `incident at ${r.incident?.startIndex}`);
  });

  it('does not flag every daily peak when two previous days exist (seasonal baseline)', () => {
    const noise = makeNoise(3);
    const stepMs = 15 * 60_000; // 96 steps per day, 5 days
    const n = 96 * 5;
    const values = Float64Array.from({ length: n }, (_, i) => 100 + 80 * Math.sin((2 * Math.PI * i) / 96) + 2 * noise() + (i >= 400 && i < 410 ? 30 : 0));
    assert.equal(chooseSeasonPeriod(values, stepMs)?.periodSteps, 96);
    const r = suggestWindows(makeFrame([{ id: 'courier_gateway_requests', family: 'traffic', values }], stepMs));
    assert.equal(r.series[0].referenceMethod, 'seasonal');
    assert.ok(r.incident && r.incident.startIndex >= 399 && r.incident.endIndex <= 410, `incident ${r.incident?.startIndex}-${r.incident?.endIndex}`);
  });

  it('builds the seasonal expectation from the median of the same phase on previous periods', () => {
    const x = [1, 2, 3, 10, 20, 30, 5, 6, 7, 100, 200, 300];
    const e = computeSeasonalBaseline(x, 3);
    assert.equal(e[9], 5); // phase 0 on previous periods: x[6]=5, x[3]=10, x[0]=1 → median 5
    assert.equal(e[4], 4); // only x[1]=2 before, so the next period's x[7]=6 fills in: median 4
  });

  it('reports too-short frames, empty frames and constant series without throwing', () => {
    const short = suggestWindows(makeShiftScenario(7, 3, 4));
    assert.equal(short.status, 'insufficient-data');
    assert.match(short.reason, /expected at least 8 samples.*got 7/);
    assert.equal(suggestWindows(makeFrame([])).status, 'insufficient-data');
    const flat = suggestWindows(makeFrame([{ id: 'pantry_db_connections_used', family: 'saturation', values: new Float64Array(50).fill(4) }]));
    assert.equal(flat.status, 'no-incident');
    assert.ok(Array.from(flat.consensus).every((c) => c === 0));
  });

  it('skips NaN gaps: a gap inside the shift does not split or hide the incident', () => {
    const frame = makeShiftScenario(300, 180, 219);
    for (const s of frame.series) for (let i = 195; i < 198; i++) s.values[i] = Number.NaN;
    const r = suggestWindows(frame);
    assert.ok(r.incident && r.incident.startIndex <= 181 && r.incident.endIndex >= 218, `incident ${r.incident?.startIndex}-${r.incident?.endIndex}`);
  });

  it('names the series and both lengths when a column does not match the grid', () => {
    const frame = makeShiftScenario(50, 20, 30);
    const broken: MetricFrame = { ...frame, series: [...frame.series, { ...frame.series[0], id: 'pantry_db_iops', values: new Float64Array(49) }] };
    const r = suggestWindows(broken);
    assert.equal(r.status, 'insufficient-data');
    assert.match(r.reason, /"pantry_db_iops": expected 50 values.*got 49/);
  });

  it('treats ±Infinity samples as a large deviation and keeps every output finite', () => {
    const frame = makeShiftScenario(120, 200, 200); // no injected shift inside the frame
    frame.series[1].values[60] = Number.POSITIVE_INFINITY;
    frame.series[1].values[61] = Number.POSITIVE_INFINITY;
    const r = suggestWindows(frame);
    assert.ok(r.incident && r.incident.startIndex <= 61 && r.incident.endIndex >= 60, `incident ${r.incident?.startIndex}`);
    assert.ok(Array.from(r.consensus).every(Number.isFinite));
    assert.ok(r.changePoints.every((c) => Number.isFinite(c.magnitude)));
  });

  it('dates a slow ramp (leak-like) from the CUSUM onset, not from where it crosses the |z| threshold', () => {
    const noise = makeNoise(4);
    // pantry-db resident memory climbs 0.2σ per step from step 200 until a restart at 300.
    const values = Float64Array.from({ length: 400 }, (_, i) => 500 + 5 * noise() + (i >= 200 && i < 300 ? i - 200 : 0));
    const r = suggestWindows(makeFrame([{ id: 'pantry_db_resident_memory_bytes', family: 'memory', values }]));
    assert.ok(r.incident && r.incident.startIndex >= 195 && r.incident.startIndex <= 212, `start ${r.incident?.startIndex}`);
    assert.ok(r.baseline && r.baseline.endIndex < r.incident.startIndex);
  });
});
