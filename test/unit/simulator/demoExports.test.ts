import assert from 'node:assert/strict';
import { readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { parse as parseLossless, isLosslessNumber } from 'lossless-json';
import Papa from 'papaparse';
import { convertCounterToRates } from '../../../training/simulator';
import { buildDemoSystem, DEMO_INCIDENT, DEMO_LENGTH_STEPS } from '../../../training/simulator/demoScenario';
import {
  formatRfc3339, quoteCsvField, writeLineProtocol, writeLongCsv, writeOtlpJsonLines, writeRangeQueryJson, writeWideCsv,
} from '../../../training/simulator/demoExports';
import type { SimSystem } from '../../../training/simulator';

const DEMO_DIR = join(__dirname, '..', '..', '..', 'media', 'demo');
// RFC 3339 §5.6 date-time, restricted to the UTC "Z" form we write.
const RFC3339_UTC = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}(\.\d+)?Z$/;

const median = (xs: number[]): number => { const v = xs.filter((x) => !Number.isNaN(x)).sort((a, b) => a - b); return v[v.length >> 1] as number; };

describe('demo exports', () => {
  const system = buildDemoSystem();

  it('quotes CSV fields as RFC 4180 §2 rules 6–7 require', () => {
    assert.equal(quoteCsvField('plain'), 'plain');
    assert.equal(quoteCsvField('a,b'), '"a,b"');
    assert.equal(quoteCsvField('say "hi"'), '"say ""hi"""');
  });

  it('formats times as RFC 3339 UTC (check value from the OTLP example, REFERENCE.md §4.3 item 10)', () => {
    assert.equal(formatRfc3339(1544712660300), '2018-12-13T14:51:00.300Z');
    assert.equal(formatRfc3339(Date.UTC(2026, 2, 14, 8)), '2026-03-14T08:00:00Z');
  });

  it('has about 20 series across families, 360 one-minute steps and cumulative counters with one reset', () => {
    assert.ok(system.series.length >= 18 && system.series.length <= 24);
    assert.equal(system.timesMs.length, DEMO_LENGTH_STEPS);
    assert.equal((system.timesMs[1] as number) - (system.timesMs[0] as number), 60_000);
    assert.ok(new Set(system.series.map((s) => s.trueFamily)).size >= 7);
    const requests = system.series.find((s) => s.name === 'http_server_requests_total');
    assert.ok(requests && requests.kind === 'counter');
    const drops = [...requests.values].filter((v, i) => i > 0 && v < (requests.values[i - 1] as number)).length;
    assert.equal(drops, 1);
  });

  it('shows the injected surge and CPU saturation in the incident window', () => {
    const rate = (name: string, mode?: string): Float64Array => {
      const s = system.series.find((x) => x.name === name && (mode === undefined || x.labels.mode === mode));
      assert.ok(s, name);
      return s.kind === 'counter' ? convertCounterToRates(s.values, system.stepMs) : s.values;
    };
    const before = (xs: Float64Array): number => median([...xs.slice(DEMO_INCIDENT.startIndex - 60, DEMO_INCIDENT.startIndex)]);
    const during = (xs: Float64Array): number => median([...xs.slice(DEMO_INCIDENT.startIndex + 5, DEMO_INCIDENT.endIndex + 1)]);
    const requests = rate('http_server_requests_total');
    assert.ok(during(requests) > 2 * before(requests));
    const idle = rate('node_cpu_seconds_total', 'idle');
    assert.ok(during(idle) < 0.1 * before(idle), 'idle CPU time collapses');
    const p50 = system.series.find((s) => s.labels.quantile === '0.5');
    assert.ok(p50 && during(p50.values) > 5 * before(p50.values));
  });

  it('writes a wide CSV that an RFC 4180 parser (papaparse) reads back exactly', () => {
    const parsed = Papa.parse<string[]>(writeWideCsv(system), { skipEmptyLines: true });
    assert.equal(parsed.errors.length, 0);
    const [header, ...rows] = parsed.data as string[][];
    assert.equal(header?.[0], 'time');
    assert.equal(header?.[1], 'node_cpu_seconds_total{host="basket-1",mode="user"}');
    assert.equal(rows.length, DEMO_LENGTH_STEPS);
    rows.forEach((row, i) => {
      assert.match(row[0] as string, RFC3339_UTC);
      assert.equal(Date.parse(row[0] as string), system.timesMs[i]);
      system.series.forEach((s, k) => {
        const cell = row[k + 1] as string;
        const v = s.values[i] as number;
        if (Number.isNaN(v)) assert.equal(cell, '', 'a gap is an empty cell, never 0');
        else assert.ok(Math.abs(Number(cell) - v) <= 1e-5 * Math.abs(v) + 1e-9, `${s.name} row ${i}`);
      });
    });
  });

  it('writes a long CSV with one row per present sample and sparse label columns', () => {
    const parsed = Papa.parse<Record<string, string>>(writeLongCsv(system), { header: true, skipEmptyLines: true });
    assert.equal(parsed.errors.length, 0);
    const present = system.series.reduce((n, s) => n + [...s.values].filter((v) => !Number.isNaN(v)).length, 0);
    assert.equal(parsed.data.length, present);
    const lag = parsed.data.find((r) => r.metric === 'order_events_consumer_lag');
    assert.equal(lag?.mode, '');
    assert.equal(lag?.topic, 'orders');
  });

  it('writes range-query JSON with string values, float-second times and series sorted by metric', () => {
    const doc = JSON.parse(writeRangeQueryJson(system)) as { status: string; data: { resultType: string; result: Array<{ metric: Record<string, string>; values: Array<[number, string]> }> } };
    assert.equal(doc.status, 'success');
    assert.equal(doc.data.resultType, 'matrix');
    assert.equal(doc.data.result.length, system.series.length);
    const names = doc.data.result.map((r) => r.metric.__name__ as string);
    assert.deepEqual(names, [...names].sort((a, b) => a.localeCompare(b)));
    for (const r of doc.data.result) {
      for (const [t, v] of r.values) {
        assert.equal(typeof v, 'string');
        assert.ok(Number.isFinite(Number(v)));
        assert.equal((t * 1000 - (system.timesMs[0] as number)) % 60_000, 0);
      }
    }
  });

  it('writes OTLP JSON lines with decimal-string nanosecond times and cumulative monotonic sums', () => {
    const lines = writeOtlpJsonLines(system, { 'service.name': 'basket-api' }).trim().split('\n');
    assert.equal(lines.length, 24);
    let points = 0;
    for (const line of lines) {
      const doc = parseLossless(line) as { resourceMetrics: Array<{ scopeMetrics: Array<{ metrics: Array<Record<string, { aggregationTemporality?: unknown; isMonotonic?: boolean; dataPoints: Array<Record<string, unknown>> }>> }> }> };
      for (const metric of doc.resourceMetrics[0]?.scopeMetrics[0]?.metrics ?? []) {
        const sum = metric.sum;
        if (sum) {
          assert.equal(String(sum.aggregationTemporality), '2'); // CUMULATIVE (metrics.proto)
          assert.equal(sum.isMonotonic, true);
        }
        for (const p of (sum ?? metric.gauge)?.dataPoints ?? []) {
          assert.equal(typeof p.timeUnixNano, 'string');
          assert.match(p.timeUnixNano as string, /^\d{19}$/);
          const ms = Number(BigInt(p.timeUnixNano as string) / 1_000_000n);
          assert.ok(system.timesMs.includes(ms));
          assert.ok(p.asInt === undefined || typeof p.asInt === 'string');
          assert.ok(p.asDouble === undefined || isLosslessNumber(p.asDouble));
          points += 1;
        }
      }
    }
    assert.equal(points, system.series.reduce((n, s) => n + [...s.values].filter((v) => !Number.isNaN(v)).length, 0));
  });

  it('writes line protocol with escaped tags, ns timestamps and integer suffixes', () => {
    const tiny: SimSystem = {
      id: 't', seed: 1, namingStyle: 'free_text', stepMs: 1000, timesMs: Float64Array.from([1_700_000_000_000]), incidents: [],
      series: [
        { name: 'disk used', labels: { mount: 'C:\\data, main' }, kind: 'gauge', trueFamily: 'filesystem', values: Float64Array.from([0.5]) },
        { name: 'reqs_total', labels: {}, kind: 'counter', trueFamily: 'traffic', values: Float64Array.from([42]) },
      ],
    };
    // Escaping per the line protocol reference: spaces and commas in measurements; commas, '=' and spaces in tags.
    assert.deepEqual(writeLineProtocol(tiny).trim().split('\n'), [
      'disk\\ used,mount=C:\\\\data\\,\\ main value=0.5 1700000000000000000',
      'reqs_total value=42i 1700000000000000000',
    ]);
  });

  it('keeps the committed demo files identical to a fresh run and each under 2 MB', () => {
    const expected: ReadonlyArray<readonly [string, string]> = [
      ['checkout-incident.csv', writeWideCsv(system)],
      ['checkout-incident-long.csv', writeLongCsv(system)],
      ['checkout-incident.json', writeRangeQueryJson(system)],
      ['checkout-incident.lp', writeLineProtocol(system)],
    ];
    for (const [name, text] of expected) {
      assert.equal(readFileSync(join(DEMO_DIR, name), 'utf8'), text, `${name} is stale: run npm run demo:data`);
    }
    for (const name of ['checkout-incident.csv', 'checkout-incident-long.csv', 'checkout-incident.json', 'checkout-incident.jsonl', 'checkout-incident.lp']) {
      assert.ok(statSync(join(DEMO_DIR, name)).size < 2 * 1024 * 1024, name);
    }
  });
});
