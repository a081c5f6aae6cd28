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
  ['traffic', /(^|_)(requests?|rps|qps|throughput|hits|calls|messages|ops|operations|transactions|sessions|active_requests|arrivals)(_|$)/],
  ['network', /(^|_)(net|network|rx|tx|receive|received|transmit|transmitted|packets?|retrans\w*|tcp|udp|socket|sockstat|bandwidth|dropped|drops?|interface|bytes_(in|out)|network_in|network_out)(_|$)/],
  ['filesystem', /(^|_)(filesystem|fs_(usage|size|avail|free|limit|inodes)|inodes?|avail_bytes|disk_(free|used|usage)|volume|capacity)(_|$)/],
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
 * Family of a metric from its name (and unit, as a fallback hint). Never throws; unknown names
 * give 'other'. "workload" does not match cpu/load because rules match whole tokens.
 */
export function inferFamily(name: string, unit?: string): Family {
  const token = normalizeMetricName(name);
  for (const [family, rule] of RULES) {
    if (rule.test(token)) return family;
  }
  const u = (unit ?? '').toLowerCase();
  if (u === 's' || u === 'ms' || u === 'seconds') return 'latency';
  if (u === 'by' || u === 'bytes') return 'memory';
  return 'other';
}
