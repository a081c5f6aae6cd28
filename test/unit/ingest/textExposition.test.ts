import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { formatRfc3339Utc, readExportText, sniffFormat } from '../../../extension/core/ingest';
import { parseExpositionLine } from '../../../extension/core/ingest/textExpositionReader';

const FIXTURES = join(__dirname, '../../fixtures/ingest');
const times = (xs: Float64Array): string[] => Array.from(xs, formatRfc3339Utc);

describe('text exposition reader (Prometheus text 0.0.4 and OpenMetrics, REFERENCE.md §1.4)', () => {
  it('reads the exposition-format documentation example: millisecond timestamps, labels, +Inf before the epoch (example from memory)', () => {
    // prometheus.io/docs/instrumenting/exposition_formats: "1395066363000" is
    // 2014-03-17T14:26:03Z in milliseconds; "-3982045" is 3,982.045 s before the epoch.
    const text = readFileSync(join(FIXTURES, 'text-exposition-doc-example.prom'), 'utf8');
    assert.equal(sniffFormat(text, 'metrics.prom').format, 'text-exposition');
    const result = readExportText(text, 'doc.prom');
    const byId = new Map(result.series.map((s) => [s.id, s]));
    const ok = byId.get('http_requests_total{code="200",method="post"}');
    assert.ok(ok, [...byId.keys()].join(', '));
    assert.deepEqual(times(ok.timesMs), ['2014-03-17T14:26:03.000Z']);
    assert.deepEqual(Array.from(ok.values), [1027]);
    assert.equal(ok.kind, 'counter');
    const weird = byId.get('something_weird{problem="division by zero"}');
    assert.ok(weird);
    assert.deepEqual(times(weird.timesMs), ['1969-12-31T22:53:37.955Z']);
    assert.deepEqual(Array.from(weird.values), [Infinity]);
    assert.deepEqual(result.assumptions, ['Prometheus text format: timestamps read as milliseconds, as the format defines']);
    // A single scrape has no timestamps: every such sample is named, none is placed at "now".
    const missing = result.issues.filter((i) => /expected a timestamp after the value/.test(i.message)).map((i) => i.line);
    assert.deepEqual(missing, [7, 10, 18, 19, 20, 21, 22, 23, 24, 25, 30, 31, 32, 33, 34, 35, 36]);
  });

  it('reads OpenMetrics text in seconds (# EOF), with units, exemplars, and _created series left out', () => {
    // OpenMetrics: "Timestamps MUST be Unix Epoch in seconds"; counters end in _total; an exemplar
    // follows " # "; _created carries the counter's start time.
    const text = [
      '# TYPE rpc_requests counter',
      '# UNIT rpc_latency_seconds seconds',
      '# TYPE rpc_latency_seconds gauge',
      'rpc_requests_total{route="/cart"} 10 1700000000',
      'rpc_requests_created{route="/cart"} 1699990000 1700000000',
      'rpc_latency_seconds 0.25 1700000000.5 # {trace_id="abc"} 0.3 1700000000.2',
      'rpc_requests_total{route="/cart"} 16 1700000060',
      'rpc_latency_seconds NaN 1700000060.5',
      '# EOF',
    ].join('\n');
    assert.equal(sniffFormat(text, 'x.txt').format, 'text-exposition');
    const result = readExportText(text, 'om.txt');
    assert.deepEqual(result.issues, []);
    const total = result.series.find((s) => s.name === 'rpc_requests_total');
    const latency = result.series.find((s) => s.name === 'rpc_latency_seconds');
    assert.ok(total && latency);
    assert.equal(total.kind, 'counter');
    assert.deepEqual(times(total.timesMs), ['2023-11-14T22:13:20.000Z', '2023-11-14T22:14:20.000Z']);
    assert.deepEqual(times(latency.timesMs), ['2023-11-14T22:13:20.500Z', '2023-11-14T22:14:20.500Z']);
    assert.equal(latency.unit, 'seconds');
    assert.ok(Number.isNaN(latency.values[1]));
    assert.equal(result.series.some((s) => s.name.endsWith('_created')), false);
    assert.deepEqual(result.assumptions, [
      'OpenMetrics text (ends with # EOF): timestamps read as seconds, as its specification requires',
      "1 samples of _created series (a counter's start time, not a metric) were skipped",
      'NaN sample values are shown as gaps; the file carried them as values',
    ]);
  });

  it('reads stored samples dumped as {__name__="…",labels} value timestamp', () => {
    const text = '{__name__="up", instance="a:9090", job="shop"} 1 1700000000000\n{__name__="up", instance="a:9090", job="shop"} 0 1700000015000\n';
    assert.equal(sniffFormat(text, 'dump.txt').format, 'text-exposition');
    const result = readExportText(text, 'dump.txt');
    assert.deepEqual(result.series.map((s) => [s.id, Array.from(s.values)]), [['up{instance="a:9090",job="shop"}', [1, 0]]]);
  });

  it('names the line and what was expected for malformed samples and anything after # EOF', () => {
    const text = 'a{x="1" 1 1700000000000\nb 1 2 3\nc one 1700000000000\nd 1 later\ne 1 1700000000000\n# EOF\nf 1 1700000000\n';
    const result = readExportText(text, 'bad.prom', 'text-exposition');
    assert.deepEqual(result.issues.map((i) => `${i.line} ${i.message}`), [
      '1 expected a label set {name="value",…} closed by "}"; line skipped',
      '2 expected "<value> [<timestamp>]" after the metric, got 3 fields; line skipped',
      '3 expected a number, NaN, +Inf or -Inf as the value of c, got "one"; line skipped',
      '4 expected a Unix timestamp after the value, got "later"; line skipped',
      '7 expected nothing after "# EOF" (line 6); line skipped',
    ]);
  });

  it('keeps escaped quotes and braces inside label values', () => {
    const parsed = parseExpositionLine('m{path="C:\\\\DIR",msg="a } \\"b\\""} 1 1700000000000');
    assert.ok(typeof parsed !== 'string');
    assert.deepEqual(parsed.labels, { path: 'C:\\DIR', msg: 'a } "b"' });
    assert.equal(parsed.timestamp, '1700000000000');
  });

  it('leaves line protocol and CSV to their own readers', () => {
    assert.equal(sniffFormat('cpu,host=a usage=1 1700000000000000000\n', 'x.txt').format, 'line-protocol');
    assert.equal(sniffFormat('time,cpu\n2026-01-01T00:00:00Z,1\n', 'x.txt').format, 'wide-csv');
    assert.equal(sniffFormat('{"status":"success","data":{"resultType":"matrix","result":[]}}', 'x.json').format, 'range-query-json');
  });
});
