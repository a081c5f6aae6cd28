import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { buildFrame } from '../../../extension/core/frame';
import { createExportReader, formatRfc3339Utc, readExportText } from '../../../extension/core/ingest';
import { quoteInt64Fields } from '../../../extension/core/ingest/otlpJsonReader';

const FIXTURES = join(__dirname, '../../fixtures/ingest');
const readFixture = (name: string): string => readFileSync(join(FIXTURES, name), 'utf8');

describe('range-query JSON reader', () => {
  it('reads the API documentation example response for query_range (prometheus docs/querying/api.md)', () => {
    const result = readExportText(readFixture('range-query-doc-example.json'), 'range.json');
    assert.equal(result.format, 'range-query-json');
    assert.deepEqual(result.series.map((s) => s.id), ['up{instance="localhost:9090",job="prometheus"}', 'up{instance="localhost:9091",job="node"}']);
    // The docs' request starts at 2015-07-01T20:10:30.781Z with a 15 s step.
    assert.deepEqual([...result.series[0].timesMs].map(formatRfc3339Utc), ['2015-07-01T20:10:30.781Z', '2015-07-01T20:10:45.781Z', '2015-07-01T20:11:00.781Z']);
    assert.deepEqual([...result.series[1].values], [0, 0, 1]);
    assert.equal(buildFrame(result).stepMs, 15_000);
  });

  it('reads the instant-query example: 1435781451.781 s = 2015-07-01T20:10:51.781Z (same docs page)', () => {
    const result = readExportText(readFixture('instant-query-doc-example.json'), 'instant.json');
    assert.equal(formatRfc3339Utc(result.series[0].timesMs[0]), '2015-07-01T20:10:51.781Z');
    assert.deepEqual(result.series.map((s) => s.values[0]), [1, 0]);
  });

  it('reads "NaN", "+Inf" and "-Inf" strings, and names series that lack __name__ by their labels', () => {
    const text = JSON.stringify({ status: 'success', data: { resultType: 'matrix', result: [
      { metric: { job: 'basket-api' }, values: [[1700000000, 'NaN'], [1700000015, '+Inf'], [1700000030, '-Inf'], [1700000045, '2.5']] },
    ] } });
    const result = readExportText(text, 'r.json');
    const values = [...result.series[0].values];
    assert.ok(Number.isNaN(values[0]));
    assert.deepEqual(values.slice(1), [Infinity, -Infinity, 2.5]);
    assert.equal(result.series[0].name, '{job="basket-api"}');
    assert.match(result.assumptions.join(' '), /no __name__/);
    // OpenMetrics: "NaN MUST NOT be considered a missing value" — so the gap it becomes is stated.
    assert.match(result.assumptions.join(' '), /"NaN" sample values .* shown as gaps/);
  });

  it('turns status "error" into an error carrying the server message', () => {
    const text = '{"status":"error","errorType":"bad_data","error":"invalid parameter \\"query\\""}';
    const result = readExportText(text, 'err.json', 'range-query-json');
    assert.equal(result.issues[0].severity, 'error');
    assert.equal(result.issues[0].message, 'the query failed on the server: bad_data: invalid parameter "query"');
  });

  it('names the line of a JSON syntax error and rejects non-matrix results', () => {
    const broken = readExportText('{\n "status": "success",\n "data": {,\n}', 'b.json', 'range-query-json');
    assert.equal(broken.issues[0].line, 3);
    assert.match(broken.issues[0].message, /^expected one JSON document, got a syntax error/);
    const scalar = readExportText('{"status":"success","data":{"resultType":"scalar","result":[1,"2"]}}', 's.json');
    assert.match(scalar.issues[0].message, /expected resultType "matrix" \(or "vector"\), got "scalar"/);
  });

  it('reports a malformed sample with its series and sample number', () => {
    const text = '{"status":"success","data":{"resultType":"matrix","result":[{"metric":{"__name__":"x"},"values":[[1,"1"],["later","2"],[3]]}]}}';
    const messages = readExportText(text, 'm.json').issues.map((i) => i.message);
    assert.ok(messages.some((m) => /Unix time in seconds at series 1 sample 2, got "later"/.test(m)), messages.join('\n'));
    assert.ok(messages.some((m) => /expected \[<unix seconds>, "<value>"\] at series 1 sample 3/.test(m)), messages.join('\n'));
  });

  it('reports elements of data.result that are not series objects instead of passing over them', () => {
    const text = '{"status":"success","data":{"resultType":"matrix","result":[[1,2],{"metric":{"__name__":"x"},"values":[[1,"1"],[2,"2"]]},"x"]}}';
    const read = readExportText(text, 'r.json');
    assert.deepEqual(read.series.map((x) => x.name), ['x']);
    assert.deepEqual(read.issues.map((i) => i.message), ['expected every element of data.result to be a series object {"metric":{…},"values":[…]}, got 2 other elements, the first [1,2]; skipped']);
  });

  it('describes a value nested 100,000 levels deep without overflowing the stack', () => {
    const deep = `${'['.repeat(100_000)}${']'.repeat(100_000)}`;
    const messages = readExportText(deep, 'deep.json').issues.map((i) => i.message);
    assert.deepEqual(messages, ['expected a JSON object with "status" and "data", got [[[[[[[[…]]]]]]]]']);
    const inResult = readExportText(`{"status":"success","data":{"resultType":"matrix","result":[${deep}]}}`, 'deep.json').issues.map((i) => i.message);
    assert.match(inResult[0], /got 1 other element, the first \[\[\[\[\[\[\[\[…\]\]\]\]\]\]\]\]; skipped$/);
  });
});

describe('range-query JSON reader, streamed', () => {
  const feed = (text: string, size: number) => {
    const reader = createExportReader('range-query-json', 'r.json');
    for (let i = 0; i < text.length; i += size) reader.push(text.slice(i, i + size));
    return reader.finish();
  };

  it('gives the same series in 1-byte chunks as in one piece', () => {
    const text = readFixture('range-query-doc-example.json');
    const whole = readExportText(text, 'r.json');
    for (const size of [1, 3, 64]) {
      assert.deepEqual(feed(text, size).series.map((s) => [s.id, [...s.timesMs], [...s.values]]), whole.series.map((s) => [s.id, [...s.timesMs], [...s.values]]), `chunk ${size}`);
    }
  });

  it('reads the envelope in any key order (status after data) and drops series when status is "error"', () => {
    const later = '{"data":{"result":[{"metric":{"__name__":"up"},"values":[[1,"1"]]}],"resultType":"matrix"},"status":"success"}';
    assert.equal(feed(later, 5).series.length, 1);
    const failed = '{"data":{"resultType":"matrix","result":[{"metric":{"__name__":"up"},"values":[[1,"1"]]}]},"status":"error","errorType":"timeout","error":"query timed out"}';
    const result = feed(failed, 7);
    assert.equal(result.series.length, 0);
    assert.equal(result.issues[0].message, 'the query failed on the server: timeout: query timed out');
  });

  it('reports a file cut inside a series, keeping the series read before it', () => {
    const text = readFixture('range-query-doc-example.json');
    const cut = text.indexOf('localhost:9091');
    const result = feed(text.slice(0, cut), 100);
    assert.equal(result.series.length, 1);
    assert.match(result.issues[0].message, /expected series 2 of data.result to end, got the end of the input/);
  });

  it('names the line of a syntax error inside a series', () => {
    const text = readFixture('range-query-doc-example.json').replace('[ 1435781445.781, "0" ]', '[ 1435781445.781, "0" }');
    const result = feed(text, 50);
    const error = result.issues.find((i) => i.severity === 'error');
    assert.ok(error);
    assert.equal(error.line, 26);
  });
});

describe('OTLP JSON reader', () => {
  it('reads a document in the shape of opentelemetry-proto examples/metrics.json, with bare-number timeUnixNano', () => {
    const result = readExportText(readFixture('otlp-example-shape.json'), 'metrics.json');
    assert.equal(result.format, 'otlp-jsonl');
    const byName = new Map(result.series.map((s) => [s.name, s]));
    // Values of the example document: sum 5 (delta, monotonic), gauge 10, histogram count 3 / sum 3.
    assert.equal(byName.get('basket.checkouts')?.values[0], 5);
    assert.equal(byName.get('basket.checkouts')?.kind, 'delta');
    assert.equal(byName.get('basket.open_carts')?.values[0], 10);
    assert.equal(byName.get('basket.open_carts')?.kind, 'gauge');
    assert.equal(byName.get('basket.request.duration_count')?.values[0], 3);
    assert.equal(byName.get('basket.request.duration_sum')?.values[0], 3);
    assert.equal(byName.get('basket.request.duration_sum')?.unit, 's');
    // 1544712660300000000 ns = 2018-12-13T14:51:00.300Z (REFERENCE.md §4.3 no. 10, from the example's value).
    assert.equal(formatRfc3339Utc(byName.get('basket.open_carts')?.timesMs[0] ?? NaN), '2018-12-13T14:51:00.300Z');
    assert.deepEqual(byName.get('basket.open_carts')?.labels, { 'service.name': 'basket-api', otel_scope_name: 'larkspur.basket', region: 'north' });
  });

  it('quotes bare int64 fields so JSON.parse cannot round them', () => {
    const quoted = quoteInt64Fields('{"timeUnixNano": 1544712660300000001,"asInt":-5,"count" :3}');
    assert.deepEqual(JSON.parse(quoted), { timeUnixNano: '1544712660300000001', asInt: '-5', count: '3' });
    // Without quoting, JSON.parse rounds to the nearest double (ECMA-262 Number semantics).
    assert.notEqual(String((JSON.parse('{"t":1544712660300000001}') as { t: number }).t), '1544712660300000001');
  });

  it('reads file-exporter JSON lines: string int64s, asInt, a cumulative counter with a reset, flag bit 0 as a gap', () => {
    const result = readExportText(readFixture('otlp-file-exporter.jsonl'), 'metrics.jsonl');
    const counter = result.series.find((s) => s.name === 'http.server.requests');
    assert.ok(counter);
    assert.equal(counter.kind, 'counter');
    assert.deepEqual([...counter.values], [100, 160, 220, 10, 70]);
    const memory = result.series.find((s) => s.name === 'process.memory.usage');
    assert.ok(memory && Number.isNaN(memory.values[2]), 'flags=1 → gap');
    const frame = buildFrame(result);
    const rates = [...frame.series[result.series.indexOf(counter)].values];
    // REFERENCE.md §4.3 check value 9 through the OTLP path.
    assert.deepEqual(rates.map((r) => Math.round(r * 1e4) / 1e4), [NaN, 1, 1, 0.1667, 1]);
  });

  it('treats a later startTimeUnixNano as a counter restart even when the value rose (OTLP reset rule, REFERENCE.md §1.5)', () => {
    const point = (start: string, time: string, value: number) => JSON.stringify({ resourceMetrics: [{ scopeMetrics: [{ metrics: [{ name: 'orders', sum: { aggregationTemporality: 2, isMonotonic: true, dataPoints: [{ asDouble: value, startTimeUnixNano: start, timeUnixNano: time }] } }] }] }] });
    // Process restarted at 120 s and had counted 90 by 180 s: the increase is 90, not 90 − 60.
    const text = [point('0', '60000000000', 30), point('0', '120000000000', 60), point('150000000000', '180000000000', 90)].join('\n');
    const frame = buildFrame(readExportText(text, 'restart.jsonl'));
    assert.deepEqual([...frame.series[0].values].map((r) => Math.round(r * 1e3) / 1e3), [NaN, 0.5, 1.5]);
    assert.match(frame.warnings.join(' '), /1 counter reset/);
  });

  it('reports data points and scopeMetrics entries that are not objects, and number strings that are not decimal', () => {
    // proto3 JSON mapping writes doubles as JSON numbers or as "NaN"/"Infinity"/"-Infinity" strings;
    // "0x10" is none of them (Number() would read 16).
    const doc = { resourceMetrics: [{ scopeMetrics: [7, { metrics: [{ name: 'cpu', gauge: { dataPoints: [
      [1, 2], { timeUnixNano: '60000000000', asDouble: 0.5 }, { timeUnixNano: '120000000000', asDouble: '0x10' }, { timeUnixNano: '180000000000', asDouble: 'Infinity' },
    ] } }] }] }] };
    const read = readExportText(JSON.stringify(doc), 'points.json', 'otlp-jsonl');
    assert.deepEqual(Array.from(read.series[0].values), [0.5, NaN, Infinity]);
    assert.deepEqual(read.issues.map((i) => i.message), [
      'expected each scopeMetrics entry to be an object; skipped',
      'expected each data point of "cpu" to be an object, got [1,2]; point skipped',
      'expected asDouble or asInt on a point of "cpu"; read as a gap',
    ]);
  });

  it('names the line of a broken JSON line and keeps the good lines', () => {
    const lines = readFixture('otlp-file-exporter.jsonl').split('\n');
    lines[1] = lines[1].replace('"resourceMetrics":', '"resourceMetrics"#');
    const result = readExportText(lines.join('\n'), 'm.jsonl', 'otlp-jsonl');
    assert.equal(result.issues.filter((i) => i.severity === 'error')[0].line, 2);
    assert.equal(result.series.find((s) => s.name === 'http.server.requests')?.values.length, 4);
  });

  it('reports a truncated last line and lines that are not MetricsData', () => {
    const text = readFixture('otlp-file-exporter.jsonl');
    const truncated = readExportText(text.slice(0, text.length - 40), 'm.jsonl', 'otlp-jsonl');
    assert.match(truncated.issues.at(-1)?.message ?? '', /unfinished JSON value/);
    const other = readExportText('{"resourceSpans":[]}\nhello\n', 'x.jsonl', 'otlp-jsonl');
    assert.deepEqual(other.issues.map((i) => [i.line, i.message.slice(0, 30)]), [[1, 'expected an object with a "res'], [2, 'expected a JSON object per lin']]);
  });

  it('gives the same series whatever the chunk boundaries', () => {
    const text = readFixture('otlp-example-shape.json');
    const reader = createExportReader('otlp-jsonl', 'm.json');
    for (let i = 0; i < text.length; i += 5) reader.push(text.slice(i, i + 5));
    assert.deepEqual(reader.finish().series.map((s) => s.id), readExportText(text, 'm.json').series.map((s) => s.id));
  });
});
