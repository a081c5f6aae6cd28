import assert from 'node:assert/strict';
import type { FrameSeries, MetricFrame } from '../../../extension/core/frame/types';
import { computeFrameEffects } from '../../../extension/core/explain/computeFrameEffects';

function makeFrame(columns: Record<string, number[]>): MetricFrame {
  const entries = Object.entries(columns);
  const n = entries[0][1].length;
  const series: FrameSeries[] = entries.map(([id, v]) => ({ id, name: id, labels: {}, family: 'other', kind: 'gauge',
    isConvertedToRate: false, values: Float64Array.from(v), gapFraction: 0 }));
  return { timesMs: Float64Array.from({ length: n }, (_, i) => i * 1000), stepMs: 1000, series, warnings: [], assumptions: [], duplicateCount: 0 };
}

describe('computeFrameEffects', () => {
  // The KS / Cliff worked example of REFERENCE.md §4.3 item 8, laid out as one metric's baseline then incident.
  const a = [1.2, 1.4, 1.9, 2.0, 2.3, 2.5, 2.6, 3.1];
  const b = [2.8, 3.0, 3.3, 3.6, 3.9, 4.1, 4.4, 5.0];
  const frame = makeFrame({
    basket_api_latency: [...a, ...b],
    courier_gateway_flat: [...a, ...a],
  });

  it('computes the worked-example effects over the window slices and ranks the shifted metric first', () => {
    const rows = computeFrameEffects(frame, { startIndex: 0, endIndex: 7 }, { startIndex: 8, endIndex: 15 });
    assert.equal(rows[0].seriesId, 'basket_api_latency');
    assert.ok(Math.abs(rows[0].effect.cliffsDelta - 0.9375) < 1e-12);
    assert.equal(rows[0].effect.ksD, 0.875);
    assert.equal(rows[1].effect.cliffsDelta, 0);
  });

  it('names the window and the valid range when a window is outside the frame', () => {
    assert.throws(() => computeFrameEffects(frame, { startIndex: 0, endIndex: 7 }, { startIndex: 8, endIndex: 16 }),
      /incident window: expected indices 0 ≤ start ≤ end ≤ 15, got 8\.\.16/);
  });
});
