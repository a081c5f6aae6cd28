import { strict as assert } from 'node:assert';
import { inferVantage, isInvertedPolarity, isTailPercentile, NAME_HINT_SLOT_COUNT, writeNameHints } from '../../../extension/core/frame/nameHints';
import { formatSeriesId, parseSeriesId } from '../../../extension/core/ingest/seriesAccumulator';

describe('name hints: vantage, polarity, tail percentile', () => {
  it('reads server and client side from OpenTelemetry semantic-convention names (REFERENCE.md §2, latency row)', () => {
    assert.equal(inferVantage('http.server.request.duration'), 'server');
    assert.equal(inferVantage('rpc.server.call.duration'), 'server');
    assert.equal(inferVantage('http.client.request.duration'), 'client');
    assert.equal(inferVantage('rpc.client.call.duration'), 'client');
    assert.equal(inferVantage('db.client.operation.duration'), 'client');
    assert.equal(inferVantage('messaging.client.operation.duration'), 'client');
    // Their Prometheus translations (OpenTelemetry → Prometheus: dots become underscores, unit suffix).
    assert.equal(inferVantage('http_server_request_duration_seconds'), 'server');
    assert.equal(inferVantage('http_client_request_duration_seconds'), 'client');
  });

  it('reads the client side from a peer attribute when the name does not say (server.address, peer.service)', () => {
    assert.equal(inferVantage('request_duration_seconds', { 'server.address': 'payments' }), 'client');
    assert.equal(inferVantage('request_duration_seconds', { 'peer.service': 'payments' }), 'client');
    assert.equal(inferVantage('request_duration_seconds', { route: '/cart' }), 'unknown');
    // The server word in the name wins over the attribute key that also contains "server".
    assert.equal(inferVantage('http.server.request.duration', { 'server.address': 'shop' }), 'server');
  });

  it('reads gateways, proxies and probes as a view from in front of the service (common practice)', () => {
    assert.equal(inferVantage('gateway_upstream_response_seconds', { upstream: 'cart' }), 'edge');
    assert.equal(inferVantage('nginx upstream response time'), 'edge'); // nginx $upstream_response_time (from memory)
    assert.equal(inferVantage('probe_duration_seconds'), 'edge'); // blackbox exporter metric name (from memory)
    assert.equal(inferVantage('Checkout page load p99 (s)'), 'edge');
  });

  it('does not guess: names without a side are unknown', () => {
    for (const name of ['request_latency_seconds', 'p99 response time ms', 'node_load1', 'workload_errors_total']) assert.equal(inferVantage(name), 'unknown', name);
  });

  it('flags metrics that fall when load rises, by name or by a state label (REFERENCE.md §2 CPU and memory rows)', () => {
    assert.equal(isInvertedPolarity('node_cpu_seconds_total', { cpu: '0', mode: 'idle' }), true);
    assert.equal(isInvertedPolarity('node_cpu_seconds_total', { cpu: '0', mode: 'user' }), false);
    assert.equal(isInvertedPolarity('system.cpu.time', { 'cpu.mode': 'idle' }), true);
    assert.equal(isInvertedPolarity('system.memory.usage', { 'system.memory.state': 'free' }), true);
    assert.equal(isInvertedPolarity('system.memory.usage', { 'system.memory.state': 'used' }), false);
    assert.equal(isInvertedPolarity('node_memory_MemAvailable_bytes'), true);
    assert.equal(isInvertedPolarity('system.memory.linux.available'), true);
    assert.equal(isInvertedPolarity('http.server.success_ratio'), true);
    assert.equal(isInvertedPolarity('CPU idle % (host-1)'), true);
    assert.equal(isInvertedPolarity('container_memory_working_set_bytes'), false);
    // A label that is not a state does not flip the metric.
    assert.equal(isInvertedPolarity('http_requests_total', { handler: 'free-shipping' }), false);
  });

  it('flags tail percentiles by name or by the summary quantile label (REFERENCE.md §2: summaries use {quantile=...})', () => {
    assert.equal(isTailPercentile('http.server.request.duration.p99'), true);
    assert.equal(isTailPercentile('p95 response time ms'), true);
    assert.equal(isTailPercentile('http.server.request.duration.p50'), false);
    assert.equal(isTailPercentile('rpc_duration_seconds', { quantile: '0.99' }), true);
    assert.equal(isTailPercentile('rpc_duration_seconds', { quantile: '0.5' }), false);
    assert.equal(isTailPercentile('rpc_duration_seconds', { percentile: '99' }), true);
    assert.equal(isTailPercentile('rpc_duration_seconds', { quantile: 'not a number' }), false);
  });

  it('writes the hints as 0/1 slots: vantage one-hot, inverted, tail', () => {
    const out = new Float32Array(2 + NAME_HINT_SLOT_COUNT).fill(9);
    writeNameHints('http.client.request.duration', { quantile: '0.99' }, out, 2);
    assert.deepEqual(Array.from(out), [9, 9, 0, 1, 0, 0, 1]);
    writeNameHints('queue depth', undefined, out, 2);
    assert.deepEqual(Array.from(out), [9, 9, 0, 0, 0, 0, 0]);
  });

  it('parses series ids back into name and labels (inverse of formatSeriesId)', () => {
    const labels = { mode: 'idle', path: 'say "hi" \\ bye', 'server.address': 'db-1' };
    const id = formatSeriesId('node_cpu_seconds_total', labels);
    assert.deepEqual(parseSeriesId(id), { name: 'node_cpu_seconds_total', labels });
    assert.deepEqual(parseSeriesId('CPU busy % (host-1)'), { name: 'CPU busy % (host-1)', labels: {} });
    assert.deepEqual(parseSeriesId('odd{not labels}'), { name: 'odd{not labels}', labels: {} });
  });
});
