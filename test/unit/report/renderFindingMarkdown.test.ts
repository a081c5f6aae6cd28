import * as assert from 'node:assert/strict';
import { describeProbability } from '../../../extension/core/report/estimativeWords';
import { renderFindingMarkdown, formatUtc } from '../../../extension/core/report/renderFindingMarkdown';
import { renderSparkline } from '../../../extension/core/report/sparkline';
import type { Finding } from '../../../extension/core/report/types';

const finding: Finding = {
  id: 'demo-1',
  createdMs: Date.UTC(2026, 0, 5, 12, 0, 0),
  verdict: {
    className: 'cpu_saturation', probability: 0.78, isAbstained: false,
    runnerUp: { className: 'traffic_surge', probability: 0.12 },
    probabilities: { cpu_saturation: 0.78, traffic_surge: 0.12, normal: 0.1 },
  },
  incident: { startIndex: 60, endIndex: 84, startMs: Date.UTC(2026, 0, 5, 10, 0), endMs: Date.UTC(2026, 0, 5, 10, 24) },
  baseline: { startIndex: 30, endIndex: 59, startMs: Date.UTC(2026, 0, 5, 9, 30), endMs: Date.UTC(2026, 0, 5, 9, 59) },
  stepMs: 60_000,
  metrics: [{
    id: 'cpu', name: 'system.cpu.utilization', labels: { host: 'basket-1' }, unit: '1', family: 'cpu',
    shapley: 1.2, shapleyCi95: 0, trend: [0.2, 0.21, 0.2, 0.9, 0.95],
    effect: { baselineMedian: 0.2, incidentMedian: 0.93, robustZ: 14.2, hodgesLehmann: 0.72, cliffsDelta: 1, ksD: 1, mannWhitneyP: 0.001 },
  }],
  changePoints: [{ timeMs: Date.UTC(2026, 0, 5, 10, 0), seriesId: 'cpu', description: 'level shift up (robust z 14.2, CUSUM)' }],
  caveats: ['Naive timestamps were read as UTC.'],
  openQuestions: ['Did a deploy or a batch job start near 10:00Z?'],
  provenance: { exportFile: 'checkout.csv', exportSha256: 'ab'.repeat(32), modelVersion: '1', modelSha256: 'cd'.repeat(32), settings: { windowSteps: 25 } },
};

describe('findings markdown', () => {
  it('maps probabilities to Kent\'s words of estimative probability (Kent 1964 table: 93/75/50/30/7 %)', () => {
    // Source: Sherman Kent, "Words of Estimative Probability" (1964), band centres as published.
    assert.equal(describeProbability(0.93), 'almost certain');
    assert.equal(describeProbability(0.75), 'probable');
    assert.equal(describeProbability(0.5), 'chances about even');
    assert.equal(describeProbability(0.3), 'probably not');
    assert.equal(describeProbability(0.07), 'almost certainly not');
    assert.equal(describeProbability(0.87), 'almost certain');
    assert.equal(describeProbability(0.62), 'chances about even');
  });

  it('renders RFC 3339 UTC times without zero milliseconds (RFC 3339 §5.6 grammar)', () => {
    assert.equal(formatUtc(Date.UTC(2026, 0, 5, 10, 0)), '2026-01-05T10:00:00Z');
    assert.equal(formatUtc(1435781451781), '2015-07-01T20:10:51.781Z');
  });

  it('states the caution and the estimate, never a root cause', () => {
    const md = renderFindingMarkdown(finding);
    assert.match(md, /Decision aid, not a root cause/);
    assert.match(md, /it is \*probable\* \(78 %, calibrated\)/);
    assert.doesNotMatch(md, /root cause (is|was)/i);
    assert.match(md, /2026-01-05T10:00:00Z → 2026-01-05T10:24:00Z \(25 min/);
    assert.match(md, /\| `system.cpu.utilization` \(host=basket-1\) \| cpu \|/);
    assert.match(md, /```mermaid\nxychart-beta/);
  });

  it('names a library match and the metrics that moved alike, as something to check, not a cause', () => {
    const md = renderFindingMarkdown({ ...finding, verdict: { ...finding.verdict, className: 'pantry_pool_exhaustion', probability: 0.8,
      libraryMatch: { label: 'pantry_pool_exhaustion', exampleCount: 3, movedAlike: [{ id: 'db_pool_connections_active{pool="pantry-db"}', direction: 'up' }, { id: 'rps', direction: 'down' }] } } });
    assert.match(md, /matches your past incident \*\*pantry_pool_exhaustion\*\* \(3 examples\)/);
    assert.match(md, /Moved alike here and in those incidents \(check them\): `db_pool_connections_active\{pool="pantry-db"\}` ↑, `rps` ↓\./);
    assert.doesNotMatch(md, /root cause (is|was)/i);
    const plain = renderFindingMarkdown({ ...finding, verdict: { ...finding.verdict, libraryMatch: { label: 'x', exampleCount: 1 } } });
    assert.doesNotMatch(plain, /Moved alike/);
  });

  it('writes caveats that quote an export as plain text: link and HTML syntax escaped, code spans kept (CommonMark backslash escapes)', () => {
    const quoting = { ...finding, caveats: ['a.csv:3: expected a number, got "[site](https://example.invalid) <b>x</b>"; read as a gap', 'worst: `rss [pod-1]`'] };
    const md = renderFindingMarkdown(quoting);
    assert.ok(md.includes('- a.csv:3: expected a number, got "\\[site\\](https://example.invalid) &lt;b>x&lt;/b>"; read as a gap'), md);
    assert.ok(md.includes('- worst: `rss [pod-1]`'), md);
  });

  it('says "no call" when the classifier abstains', () => {
    const md = renderFindingMarkdown({ ...finding, verdict: { ...finding.verdict, isAbstained: true, abstainReason: 'confidence 0.41 below 0.5' } });
    assert.match(md, /no call — confidence 0.41 below 0.5/);
  });

  it('draws a sparkline with gaps as spaces and a rising series rising', () => {
    assert.equal(renderSparkline([0, 1, 2, 3, 4, 5, 6, 7]), '▁▂▃▄▅▆▇█');
    assert.equal(renderSparkline([1, NaN, 1]), '▁ ▁');
    assert.equal(renderSparkline([]), '');
  });
});
