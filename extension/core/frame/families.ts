import type { Family } from './types';

/**
 * Family lexicon (REFERENCE.md §2): token rules derived from the OpenTelemetry semantic conventions
 * and the common host exporter names. Rules are tried in order; the first match wins, so more
 * specific meanings (errors, latency, saturation) come before resource names. Unknown → 'other'.
 */
const RULES: ReadonlyArray<readonly [Family, RegExp]> = [
  ['errors', /(^|_)(errors?|errs|fail(ed|ures?)?|5xx|exceptions?|timeouts?|oom_kill|rejected|faults?_total)(_|$)|error_(ratio|rate)|success_(ratio|rate)|availability/],
  ['latency', /(^|_)(latency|duration|response_time|rtt|p50|p75|p90|p95|p99|p999|delay|wait_time|elapsed)(_|$)|_ms$|quantile/],
  ['saturation', /(^|_)(queue|queued|backlog|pending|inflight|in_flight|in_progress|lag|saturation|pressure|throttl\w*|run_queue|procs_blocked|procs_running|load1|load5|load15|load|pool|connections?_(used|active|waiting)|conntrack)(_|$)/],
  ['runtime', /(^|_)(gc|goroutines?|eventloop|event_loop|threads?|heap_objects|jvm|fds|file_descriptors?|uptime|restarts?)(_|$)/],
  ['traffic', /(^|_)(requests?|rps|qps|throughput|hits|calls|handled|messages|ops|operations|transactions|sessions|active_requests|arrivals)(_|$)/],
  ['network', /(^|_)(net|network|rx|tx|receive|received|transmit|transmitted|packets?|retrans\w*|tcp|udp|socket|sockstat|bandwidth|dropped|drops?|interface|bytes_(in|out)|network_in|network_out)(_|$)/],
  // Space/free/used next to disk or fs is capacity, not I/O ("Disk space free GB (/)", "free_disk_space").
  ['filesystem', /(^|_)(filesystem|fs_(usage|size|avail|free|limit|inodes)|inodes?|avail_bytes|disk_(free|used|usage)|(disk|fs)_(space|free|used|avail|available)|(space|free|used|avail|available)_(disk|fs)|volume|capacity)(_|$)/],
  ['disk', /(^|_)(disk|io|iops|iowait|io_wait|io_time|read_bytes|written_bytes|write_bytes|reads|writes|blkio|block|nvme|sda|ebs)(_|$)/],
  ['memory', /(^|_)(mem|memory|rss|heap|working_set|swap|pgmajfault|page_faults?|paging|cache|cached|buffers|memavailable|memfree|oom)(_|$)/],
  ['cpu', /(^|_)(cpu|cpus|steal|user|system|idle|softirq|irq|nice|utilization|utilisation|usage_percent|cores)(_|$)/],
];

/** Lowercase and turn `.`, `-`, spaces, `/` and camelCase humps into `_` so rules see tokens. */
export function normalizeMetricName(name: string): string {
  return name
    .replace(/([a-z0-9])([A-Z])/g, '$1_$2')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '_')
    .replace(/^_+|_+$/g, '');
}

/**
 * Label keys that carry an HTTP status code: OpenTelemetry `http.response.status_code` (and the
 * pre-1.21 `http.status_code`), their Prometheus translations with `_`, and the common short keys.
 */
const STATUS_CODE_LABELS: ReadonlySet<string> = new Set([
  'code', 'status', 'status_code', 'http_status_code', 'http.status_code',
  'http.response.status_code', 'http_response_status_code',
]);

/** A server-error status value: `500`…`599`, or a class written as `5xx` / `5XX`. */
const SERVER_ERROR_STATUS = /^5([0-9]{2}|xx)$/i;

/**
 * Time-to-expiry tokens (certificates, TTLs). Their values are in seconds but they are not
 * response times, so the unit fallback must not turn them into latency.
 */
const EXPIRY_TOKENS = /(^|_)(cert|certs|certificate|certificates|x509|expiry|expiration|expires|expire|expired|not_after|not_before|ttl)(_|$)/;

/**
 * Label keys that carry a gRPC status: the common Prometheus gRPC middleware's `grpc_code`, and
 * OpenTelemetry's `rpc.grpc.status_code` with its `_` form.
 */
const GRPC_STATUS_LABELS: ReadonlySet<string> = new Set(['grpc_code', 'grpc.code', 'grpc_status', 'rpc.grpc.status_code', 'rpc_grpc_status_code']);

/**
 * gRPC statuses that are the server's failure (the OpenTelemetry semantic conventions mark these
 * as errors on the server side; from memory): UNKNOWN 2, DEADLINE_EXCEEDED 4, UNIMPLEMENTED 12,
 * INTERNAL 13, UNAVAILABLE 14, DATA_LOSS 15 — by number or by name in any case, with or without `_`.
 */
const GRPC_SERVER_ERRORS: ReadonlySet<string> = new Set(['2', '4', '12', '13', '14', '15', 'unknown', 'deadlineexceeded', 'unimplemented', 'internal', 'unavailable', 'dataloss']);

/** True when some status-code label holds a 5xx value or a gRPC status is a server failure; other labels are ignored. */
function hasServerErrorStatus(labels: Readonly<Record<string, string>>): boolean {
  for (const [key, value] of Object.entries(labels)) {
    const k = key.toLowerCase();
    if (STATUS_CODE_LABELS.has(k) && SERVER_ERROR_STATUS.test(value.trim())) return true;
    if (GRPC_STATUS_LABELS.has(k) && GRPC_SERVER_ERRORS.has(value.trim().toLowerCase().replace(/_/g, ''))) return true;
  }
  return false;
}

/**
 * Family of a metric from its name, its labels and its unit. Never throws; unknown names give
 * 'other'. Rules match whole tokens, so "workload" does not match cpu/load.
 * - A status-code label (`code`, `status`, `status_code`, `http_status_code`, `http.status_code`,
 *   `http.response.status_code`, `http_response_status_code`) holding `5..` or `5xx` gives
 *   'errors' whatever the name: `http_server_requests_total{code="500"}` is errors, with
 *   `code="200"` it stays traffic. A gRPC status label (`grpc_code`, `rpc.grpc.status_code`) holding a
 *   server failure (UNKNOWN, DEADLINE_EXCEEDED, UNIMPLEMENTED, INTERNAL, UNAVAILABLE, DATA_LOSS, by
 *   name or number) gives 'errors' too. Other labels (e.g. `mode` of `node_cpu_seconds_total`) do not
 *   change the family.
 * - The unit is only a fallback when no name rule matches: `s`/`ms`/`seconds` → 'latency',
 *   `By`/`bytes` → 'memory' — except for certificate/expiry/TTL names, which give 'other'.
 * @param name metric name as exported (dotted, snake_case or free text)
 * @param unit unit as written by the source; undefined or empty when unknown
 * @param labels series labels / attributes; absent or empty means the name alone decides
 * @returns one of FAMILIES
 */
export function inferFamily(name: string, unit?: string, labels?: Readonly<Record<string, string>>): Family {
  if (labels !== undefined && hasServerErrorStatus(labels)) return 'errors';
  const token = normalizeMetricName(name);
  for (const [family, rule] of RULES) {
    if (rule.test(token)) return family;
  }
  if (EXPIRY_TOKENS.test(token)) return 'other';
  const u = (unit ?? '').toLowerCase();
  if (u === 's' || u === 'ms' || u === 'seconds') return 'latency';
  if (u === 'by' || u === 'bytes') return 'memory';
  return 'other';
}
