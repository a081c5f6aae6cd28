import assert from 'node:assert/strict';
import type { FrameSeries, MetricFrame } from '../../../extension/core/frame/types';
import type { Finding, MetricContribution } from '../../../extension/core/report/types';
import { buildContributionViews, buildSeriesGroups, buildTimelineView, buildVerdictView, buildViewerModel } from '../../../extension/core/view/buildViewerModel';
import { buildLineChartConfig, dragWindow } from '../../../extension/core/view/buildChartConfig';

const STEP_MS = 60_000;
const T0 = Date.UTC(2026, 0, 5, 12, 0, 0);
const times = Float64Array.from({ length: 60 }, (_, i) => T0 + i * STEP_MS);

function makeSeries(id: string, family: FrameSeries['family'], labels: Record<string, string>, f: (i: number) => number): FrameSeries {
  return { id, name: id.split('{')[0], labels, family, kind: 'gauge', isConvertedToRate: false, values: Float64Array.from(times, (_, i) => f(i)), gapFraction: 0, unit: family === 'latency' ? 'ms' : undefined };
}

const frame: MetricFrame = {
  timesMs: times, stepMs: STEP_MS, warnings: [], assumptions: [], duplicateCount: 0,
  series: [
    makeSeries('cpu_usage{service="basket-api"}', 'cpu', { service: 'basket-api' }, (i) => (i > 40 ? 90 : 20)),
    makeSeries('http_latency_p99{service="basket-api"}', 'latency', { service: 'basket-api' }, (i) => (i > 40 ? 900 : 120)),
    makeSeries('cpu_usage{service="pantry-db"}', 'cpu', { service: 'pantry-db' }, () => 15),
    makeSeries('cpu_usage{service="basket-api",core="1"}', 'cpu', { service: 'basket-api', core: '1' }, (i) => (i === 30 ? NaN : 25)),
  ],
};

function contribution(id: string, shapley: number, family: MetricContribution['family']): MetricContribution {
  return {
    id, name: id.split('{')[0], labels: { service: 'basket-api' }, family, shapley, shapleyCi95: 0.02, unit: family === 'latency' ? 'ms' : undefined,
    effect: { baselineMedian: 120, incidentMedian: 900, robustZ: 8, hodgesLehmann: 780, cliffsDelta: 1, ksD: 1, mannWhitneyP: 0.001 }, trend: [],
  };
}

const finding: Finding = {
  id: 'finding-1', createdMs: T0, stepMs: STEP_MS,
  verdict: {
    className: 'cpu_saturation', probability: 0.81, runnerUp: { className: 'traffic_surge', probability: 0.12 }, isAbstained: false,
    probabilities: { cpu_saturation: 0.81, traffic_surge: 0.12, normal: 0.07 },
  },
  incident: { startIndex: 41, endIndex: 55, startMs: times[41], endMs: times[55] },
  baseline: { startIndex: 10, endIndex: 35, startMs: times[10], endMs: times[35] },
  metrics: [contribution('http_latency_p99{service="basket-api"}', 0.1, 'latency'), contribution('cpu_usage{service="basket-api"}', 0.6, 'cpu')],
  changePoints: [], caveats: ['one gap in cpu_usage core=1'], openQuestions: ['did a deploy happen at 12:40Z?'],
  provenance: { exportFile: 'larkspur-basket.csv', exportSha256: 'ab', modelVersion: '0.3.0', modelSha256: 'cd', settings: {} },
};

describe('buildViewerModel', () => {
  it('groups small multiples by family, then by service label', () => {
    const groups = buildSeriesGroups(frame);
    assert.deepEqual(groups.map((g) => [g.title, g.series.length]), [
      ['cpu · service=basket-api', 2], ['latency · service=basket-api', 1], ['cpu · service=pantry-db', 1],
    ]);
    const withGap = groups[0].series[1];
    assert.equal(withGap.labelText, 'core=1, service=basket-api');
    assert.equal(withGap.valuesY[30], null, 'gap stays null, never 0');
  });

  it('sorts contribution panels by Shapley value and zooms them on the windows', () => {
    const panels = buildContributionViews(frame, finding);
    assert.deepEqual(panels.map((p) => [p.rank, p.name]), [[1, 'cpu_usage'], [2, 'http_latency_p99']]);
    // union of windows = minutes 10..55 (45 min); padding a quarter each side → 10 − 11.25 … 55 + 11.25 → indices 0..59 clipped
    assert.equal(panels[1].timesMs[0], times[0]);
    assert.equal(panels[1].baselineMedianText, '120 ms');
    assert.equal(panels[1].incidentMedianText, '900 ms');
    assert.equal(panels[0].shapleyText, '+0.600 ± 0.020');
    assert.equal(panels[0].effectText, 'large rise (δ +1.00)');
  });

  it('words the verdict with Kent\'s estimative scale (Kent 1964: probable 75% ± 12) and keeps the caution', () => {
    const view = buildVerdictView(finding.verdict);
    assert.equal(view.title, 'CPU saturation');
    assert.equal(view.probabilityText, '81%');
    assert.equal(view.estimativeWord, 'probable');
    assert.equal(view.runnerUpTitle, 'Traffic surge');
    assert.match(view.caution, /not a root cause/);
    const abstained = buildVerdictView({ ...finding.verdict, isAbstained: true, abstainReason: 'out of distribution' });
    assert.match(abstained.title, /Not sure/);
  });

  it('averages the timeline per bucket and keeps unscored steps as null', () => {
    const view = buildTimelineView({ timesMs: [0, 1, 2, 3], classNames: ['normal', 'cpu_saturation'], probabilities: [1, 0, 0.5, 0.5, NaN, NaN, 0, 1] }, 2);
    assert.deepEqual(view.timesMs, [0, 2]);
    assert.deepEqual(view.probabilities, [[0.75, 0], [0.25, 1]]);
    const gaps = buildTimelineView({ timesMs: [0, 1], classNames: ['normal'], probabilities: [NaN, 0.5] }, 2);
    assert.deepEqual(gaps.probabilities, [[null, 0.5]]);
    assert.throws(() => buildTimelineView({ timesMs: [0], classNames: ['a', 'b'], probabilities: [1] }), /expected 1×2 timeline probabilities, got 1/);
  });

  it('builds a JSON-safe init model (no NaN survives JSON.stringify as null silently)', () => {
    const model = buildViewerModel({ fileName: 'larkspur-basket.csv', isTrusted: true, frame, finding, timeline: { timesMs: [], classNames: [], probabilities: [] } });
    const roundTrip = JSON.parse(JSON.stringify(model));
    assert.deepEqual(roundTrip, model);
    assert.deepEqual(model.rangeMs, { startMs: times[0], endMs: times[59] });
    assert.deepEqual(model.notes, ['one gap in cpu_usage core=1', 'Open question: did a deploy happen at 12:40Z?']);
  });
});

describe('buildLineChartConfig and dragWindow', () => {
  it('builds a chart.js line config on the fast path with gaps unbridged', () => {
    const config = buildLineChartConfig({ label: 'cpu', timesMs: [1, 2], valuesY: [3, null], viewMs: { startMs: 0, endMs: 5 }, colors: { line: 'red', grid: 'gray', text: 'black' }, showTimeTicks: false });
    assert.deepEqual(config.data.datasets[0].data, [{ x: 1, y: 3 }, { x: 2, y: null }]);
    assert.equal(config.data.datasets[0].spanGaps, false);
    assert.equal(config.options.parsing, false);
    assert.equal(config.options.scales.x.min, 0);
    assert.throws(() => buildLineChartConfig({ label: 'x', timesMs: [1], valuesY: [], viewMs: { startMs: 0, endMs: 1 }, colors: { line: '', grid: '', text: '' }, showTimeTicks: false }), /expected as many values as times, got 0 values for 1 times/);
  });

  it('keeps a dragged window inside the export and at least one step wide', () => {
    const bounds = { startMs: 0, endMs: 100 };
    assert.deepEqual(dragWindow({ startMs: 10, endMs: 30 }, 'move', 90, bounds, 1), { startMs: 80, endMs: 100 });
    assert.deepEqual(dragWindow({ startMs: 10, endMs: 30 }, 'move', -50, bounds, 1), { startMs: 0, endMs: 20 });
    assert.deepEqual(dragWindow({ startMs: 10, endMs: 30 }, 'start', 40, bounds, 5), { startMs: 25, endMs: 30 });
    assert.deepEqual(dragWindow({ startMs: 10, endMs: 30 }, 'end', -40, bounds, 5), { startMs: 10, endMs: 15 });
    assert.deepEqual(dragWindow({ startMs: 10, endMs: 30 }, 'end', NaN, bounds, 5), { startMs: 10, endMs: 30 });
  });
});
