import { normalizeMetricName } from './families';

/*
 * Hints the model reads from a metric's name and labels, besides its family: where it is measured
 * from (vantage), which way is "worse" (polarity), and whether it is a tail percentile. Families
 * group metrics; these tell members of one family apart (server, client and gateway latency; CPU
 * busy and CPU idle; p50 and p99).
 */

/**
 * Where a metric is measured from, relative to the service it describes:
 * - `server`: inside the service, on the requests it handles (OpenTelemetry `http.server.*`,
 *   `rpc.server.*`);
 * - `client`: the service's own calls to something else (OpenTelemetry `http.client.*`,
 *   `rpc.client.*`, `db.client.*`, `messaging.client.*`; a `server.address` or `peer.service`
 *   attribute names the peer it calls);
 * - `edge`: in front of the service — a gateway, proxy, load balancer, CDN or synthetic probe
 *   timing the service from outside (common practice: a proxy's "upstream response time");
 * - `unknown`: the name does not say.
 * Comparing vantages is how the trade tells delay on the path from slowness in the service
 * (common practice: client-observed minus server-observed latency is time on the wire or in queues).
 */
export type Vantage = 'server' | 'client' | 'edge' | 'unknown';

/** The vantages the model sees as one-hot slots, in slot order (`unknown` = all slots 0). */
export const VANTAGE_SLOTS: readonly Exclude<Vantage, 'unknown'>[] = ['server', 'client', 'edge'];

const EDGE_TOKENS = /(^|_)(upstream|gateway|ingress|proxy|reverse_proxy|load_balancer|loadbalancer|lb|alb|elb|edge|cdn|synthetic|probe|blackbox|page_load|rum)(_|$)/;
const SERVER_TOKENS = /(^|_)(server|handler|handled|inbound)(_|$)/;
const CLIENT_TOKENS = /(^|_)(client|outbound|egress|outgoing|dependency|dependencies|downstream|call|calls)(_|$)/;
/** Attribute keys that name the peer a client metric calls (OpenTelemetry, and their `_` forms). */
const PEER_KEYS: ReadonlySet<string> = new Set([
  'server.address', 'server_address', 'peer', 'peer.service', 'peer_service', 'net.peer.name', 'net_peer_name',
  'destination', 'destination.address', 'db.system', 'db_system', 'rpc.service', 'rpc_service',
]);

/**
 * Vantage of a metric from its name and labels. Never throws. Edge words win (a gateway's timing
 * of an upstream is a view from in front of that service), then an explicit server or client
 * word in the name, then a peer attribute (client side).
 */
export function inferVantage(name: string, labels?: Readonly<Record<string, string>>): Vantage {
  const n = normalizeMetricName(name);
  if (EDGE_TOKENS.test(n)) return 'edge';
  if (SERVER_TOKENS.test(n)) return 'server';
  if (CLIENT_TOKENS.test(n)) return 'client';
  if (labels) {
    for (const key of Object.keys(labels)) if (PEER_KEYS.has(key.toLowerCase())) return 'client';
  }
  return 'unknown';
}

/**
 * Words of metrics that fall when the resource gets busier or the service gets worse: idle CPU,
 * free or available memory and space, success and availability ratios, remaining headroom
 * (common practice: these are read "upside down"; REFERENCE.md §5 signatures are written for the
 * usage direction).
 */
const INVERTED_TOKENS = /(^|_)(idle|free|available|avail|memavailable|memfree|success|successful|availability|uptime_ratio|remaining|headroom|apdex)(_|$)/;

/**
 * Label keys that split one metric into states: node exporter `mode`, OpenTelemetry `cpu.mode`,
 * `system.cpu.state`, `system.memory.state`, and the generic `state`.
 */
const STATE_KEYS: ReadonlySet<string> = new Set(['mode', 'state', 'cpu.mode', 'cpu_mode', 'system.cpu.state', 'system_cpu_state', 'system.memory.state', 'system_memory_state']);

/**
 * True when a rise of the metric means less load or better service: by its name (see
 * INVERTED_TOKENS), or by a state label such as `node_cpu_seconds_total{mode="idle"}` or
 * `system.memory.usage{system.memory.state="free"}`.
 */
export function isInvertedPolarity(name: string, labels?: Readonly<Record<string, string>>): boolean {
  if (INVERTED_TOKENS.test(normalizeMetricName(name))) return true;
  if (!labels) return false;
  for (const [key, value] of Object.entries(labels)) {
    if (STATE_KEYS.has(key.toLowerCase()) && INVERTED_TOKENS.test(normalizeMetricName(value))) return true;
  }
  return false;
}

/** Tail percentiles in names: p95 and above (Prometheus and OpenTelemetry exporters write p99, 0.99, 99th). */
const TAIL_TOKENS = /(^|_)(p95|p98|p99|p995|p999|p9999|95th|98th|99th|99_9th)(_|$)/;
/** Label keys that carry a quantile (Prometheus summaries use `quantile`, 0..1). */
const QUANTILE_KEYS: ReadonlySet<string> = new Set(['quantile', 'percentile']);

/**
 * True for a tail percentile (p95 or above) of a distribution, by name or by a quantile label
 * (0.95..1, or 95..100 for a percentile written in percent).
 */
export function isTailPercentile(name: string, labels?: Readonly<Record<string, string>>): boolean {
  if (TAIL_TOKENS.test(normalizeMetricName(name))) return true;
  if (!labels) return false;
  for (const [key, value] of Object.entries(labels)) {
    if (!QUANTILE_KEYS.has(key.toLowerCase())) continue;
    const q = Number(value.trim());
    if ((q >= 0.95 && q <= 1) || (q >= 95 && q <= 100)) return true;
  }
  return false;
}

/**
 * Slots of the name hints in a model input row: vantage one-hot (VANTAGE_SLOTS order), inverted
 * polarity, tail percentile.
 */
export const NAME_HINT_SLOT_COUNT = VANTAGE_SLOTS.length + 2;

/** Writes the name hints of a metric into `out` at `offset` (NAME_HINT_SLOT_COUNT values of 0 or 1). */
export function writeNameHints(name: string, labels: Readonly<Record<string, string>> | undefined, out: Float32Array, offset: number): void {
  const vantage = inferVantage(name, labels);
  for (let k = 0; k < VANTAGE_SLOTS.length; k++) out[offset + k] = VANTAGE_SLOTS[k] === vantage ? 1 : 0;
  out[offset + VANTAGE_SLOTS.length] = isInvertedPolarity(name, labels) ? 1 : 0;
  out[offset + VANTAGE_SLOTS.length + 1] = isTailPercentile(name, labels) ? 1 : 0;
}
