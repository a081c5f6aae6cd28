import assert from 'node:assert/strict';
import { buildFrame, inferFamily } from '../../../extension/core/frame';
import { readExportText } from '../../../extension/core/ingest';

describe('inferFamily: status-code labels', () => {
  it('reads a request counter with a 5xx status-code label as errors, and with 2xx as traffic', () => {
    // Prometheus convention: one `http_requests_total` counter split by a `code` label, errors
    // selected with `code=~"5.."` (REFERENCE.md §2, Errors row; Prometheus docs, from memory).
    assert.equal(inferFamily('http_server_requests_total', undefined, { code: '500' }), 'errors');
    assert.equal(inferFamily('http_server_requests_total', undefined, { code: '503', instance: 'basket-1' }), 'errors');
    assert.equal(inferFamily('http_server_requests_total', undefined, { code: '200' }), 'traffic');
    assert.equal(inferFamily('http_server_requests_total', undefined, {}), 'traffic');
    assert.equal(inferFamily('http_server_requests_total'), 'traffic');
  });

  it('reads the OpenTelemetry status attribute on the duration histogram: 5xx → errors, 2xx stays latency', () => {
    // OpenTelemetry semantic conventions for HTTP metrics: `http.server.request.duration` (unit s)
    // carries the attribute `http.response.status_code`; its Prometheus translation uses `_`.
    assert.equal(inferFamily('http.server.request.duration', 's', { 'http.response.status_code': '502' }), 'errors');
    assert.equal(inferFamily('http_server_request_duration_seconds', 's', { http_response_status_code: '504' }), 'errors');
    assert.equal(inferFamily('http.server.request.duration', 's', { 'http.response.status_code': '200' }), 'latency');
    // Pre-1.21 OpenTelemetry HTTP conventions named the attribute `http.status_code` (from memory).
    assert.equal(inferFamily('http.server.duration', 'ms', { 'http.status_code': '500' }), 'errors');
  });

  it('reads gRPC server failures as errors and OK or client-side statuses as what the name says', () => {
    // gRPC status codes (grpc/doc/statuscodes.md, from memory): OK 0, INVALID_ARGUMENT 3, NOT_FOUND 5,
    // DEADLINE_EXCEEDED 4, INTERNAL 13, UNAVAILABLE 14. The common Prometheus gRPC middleware names the
    // label `grpc_code` with the status name; OpenTelemetry uses `rpc.grpc.status_code` with the number.
    assert.equal(inferFamily('grpc_server_handled_total', undefined, { grpc_code: 'Unavailable', grpc_method: 'Get' }), 'errors');
    assert.equal(inferFamily('grpc_server_handled_total', undefined, { grpc_code: 'DeadlineExceeded' }), 'errors');
    assert.equal(inferFamily('rpc.server.call.duration', 's', { 'rpc.grpc.status_code': '13' }), 'errors');
    assert.equal(inferFamily('grpc_server_handled_total', undefined, { grpc_code: 'OK' }), 'traffic');
    assert.equal(inferFamily('grpc_server_handled_total', undefined, { grpc_code: 'NotFound' }), 'traffic');
    assert.equal(inferFamily('rpc.server.call.duration', 's', { 'rpc.grpc.status_code': '0' }), 'latency');
    assert.equal(inferFamily('rpc.server.call.duration', 's', { 'rpc.grpc.status_code': '3' }), 'latency');
  });

  it('accepts the status class spelling 5xx / 5XX and the keys status, status_code, http_status_code', () => {
    // Common practice: load balancer and CDN exports aggregate by class ("5xx").
    assert.equal(inferFamily('lb_responses_total', undefined, { status: '5xx' }), 'errors');
    assert.equal(inferFamily('lb_responses_total', undefined, { status_code: '5XX' }), 'errors');
    assert.equal(inferFamily('lb_responses_total', undefined, { http_status_code: '599' }), 'errors');
  });

  it('keeps 4xx and non-status values out of errors (RFC 9110 §15.5: 4xx is a client error, §15.6: 5xx the server error class)', () => {
    assert.equal(inferFamily('http_server_requests_total', undefined, { code: '404' }), 'traffic');
    assert.equal(inferFamily('http_server_requests_total', undefined, { code: '4xx' }), 'traffic');
    // A 5 followed by more or fewer than two characters is not a status code.
    assert.equal(inferFamily('http_server_requests_total', undefined, { code: '5000' }), 'traffic');
    assert.equal(inferFamily('http_server_requests_total', undefined, { code: '50' }), 'traffic');
    // A 5xx value under a label that is not a status code does not count.
    assert.equal(inferFamily('http_server_requests_total', undefined, { shard: '500' }), 'traffic');
  });

  it('keeps every node exporter CPU mode as cpu: only status-code labels change the family', () => {
    // Prometheus node exporter: `node_cpu_seconds_total{cpu,mode}` with modes idle, iowait, irq,
    // nice, softirq, steal, system, user (REFERENCE.md §2, CPU row).
    for (const mode of ['idle', 'iowait', 'irq', 'nice', 'softirq', 'steal', 'system', 'user']) {
      assert.equal(inferFamily('node_cpu_seconds_total', 's', { cpu: '0', mode }), 'cpu', mode);
    }
  });

  it('gets the labels through buildFrame from a Prometheus range-query export', () => {
    // Prometheus HTTP API `query_range` response (resultType "matrix"); the `code` label splits
    // one counter into success and server-error series.
    const body = JSON.stringify({ status: 'success', data: { resultType: 'matrix', result: [
      { metric: { __name__: 'http_requests_total', code: '500', job: 'basket-api' }, values: [[0, '1'], [60, '7'], [120, '13']] },
      { metric: { __name__: 'http_requests_total', code: '200', job: 'basket-api' }, values: [[0, '1'], [60, '70'], [120, '130']] },
    ] } });
    const ingest = readExportText(body, 'basket.json', 'range-query-json');
    assert.deepEqual(ingest.issues, []);
    const families = buildFrame(ingest).series.map((s) => [s.labels.code, s.family]);
    assert.deepEqual(families.sort(), [['200', 'traffic'], ['500', 'errors']]);
  });
});

describe('inferFamily: disk space is filesystem capacity', () => {
  it('reads space/free/used next to disk or fs as filesystem', () => {
    // Prometheus node exporter names `node_filesystem_avail_bytes`, `node_filesystem_free_bytes`,
    // `node_filesystem_size_bytes` and OpenTelemetry `system.filesystem.usage` are capacity.
    assert.equal(inferFamily('node_filesystem_avail_bytes', 'By', { mountpoint: '/' }), 'filesystem');
    assert.equal(inferFamily('node_filesystem_free_bytes', 'By'), 'filesystem');
    assert.equal(inferFamily('system.filesystem.usage', 'By'), 'filesystem');
    // Common practice: "disk space" on dashboards means capacity of a mounted volume.
    assert.equal(inferFamily('Disk space free GB (/)'), 'filesystem');
    assert.equal(inferFamily('disk_space_free'), 'filesystem');
    assert.equal(inferFamily('disk_space_used'), 'filesystem');
    assert.equal(inferFamily('Free disk space (GB)'), 'filesystem');
    assert.equal(inferFamily('fs_space_used_percent'), 'filesystem');
  });

  it('keeps disk throughput and busy time as disk', () => {
    // Prometheus node exporter disk I/O counters (REFERENCE.md §2, Disk I/O row).
    assert.equal(inferFamily('node_disk_read_bytes_total', 'By'), 'disk');
    assert.equal(inferFamily('node_disk_written_bytes_total', 'By'), 'disk');
    assert.equal(inferFamily('node_disk_io_time_seconds_total', 's'), 'disk');
    assert.equal(inferFamily('system.disk.io', 'By'), 'disk');
    assert.equal(inferFamily('Disk busy % (nvme0n1)'), 'disk');
  });
});

describe('inferFamily: certificate expiry and TTL are not latency', () => {
  it('gives other for expiry/TTL names in seconds instead of the latency unit fallback', () => {
    // Common practice: certificate monitors export seconds until (or the time of) X.509 notAfter
    // (RFC 5280 §4.1.2.5 validity); that is a countdown, not a response time.
    assert.equal(inferFamily('tls.certificate.expiry', 's'), 'other');
    assert.equal(inferFamily('ssl_cert_expiry_seconds', 's'), 'other');
    assert.equal(inferFamily('ssl_certificate_expiry_seconds', 's'), 'other');
    assert.equal(inferFamily('cert_not_after', 's'), 'other');
    assert.equal(inferFamily('certNotAfter', 's'), 'other');
    assert.equal(inferFamily('Cert expiry days'), 'other');
    assert.equal(inferFamily('token_ttl_seconds', 's'), 'other');
    assert.equal(inferFamily('session_ttl_seconds', 'seconds'), 'other');
  });

  it('still uses the unit fallback for other names in seconds or bytes (REFERENCE.md §2 unit hints)', () => {
    assert.equal(inferFamily('checkout_step', 's'), 'latency');
    assert.equal(inferFamily('checkout_step', 'ms'), 'latency');
    assert.equal(inferFamily('basket_snapshot', 'By'), 'memory');
    assert.equal(inferFamily('basket_snapshot'), 'other');
  });

  it('lets a latency name with tls in it stay latency (name rules come before the expiry check)', () => {
    // OpenTelemetry-style handshake duration: the `duration` token decides.
    assert.equal(inferFamily('tls.handshake.duration', 's'), 'latency');
  });
});
