/**
 * The metric catalogue: which observable each metric measures and how the three naming styles
 * spell it (dotted after the OpenTelemetry semantic conventions, snake_case with `_total`
 * after the common host exporter, free text as people type dashboard titles), in which unit.
 * Template fields: {svc} service, {dep} dependency, {host} instance, {q} p99-style quantile
 * name, {qv} quantile value, {dev} device.
 */
import type { Family } from '../../extension/core/frame/types';
import type { ObservableKey, ServiceParams } from './latentModel';
import type { NamingStyle } from './types';

/** One way to write a metric. `scale` converts the observable's base unit to this unit. */
export interface NameForm {
  readonly name: string;
  readonly labels?: Readonly<Record<string, string>>;
  readonly unit?: string;
  readonly kind: 'gauge' | 'counter';
  readonly scale: number;
  /** Counts are whole numbers (requests, packets); counters accumulate rounded increments. */
  readonly isInteger?: boolean;
}

export type CopyKind = 'single' | 'instance' | 'percentile' | 'device';

export interface RoleDef {
  readonly key: string;
  readonly source: ObservableKey;
  readonly trueFamily: Family;
  /** Probability that a system exports this role at all (vantage points). */
  readonly inclusion: number;
  readonly copies: CopyKind;
  /** Base-unit multiplier from service parameters (e.g. memory ratio → bytes). */
  readonly baseScale?: (p: ServiceParams) => number;
  readonly forms: Readonly<Record<NamingStyle, readonly NameForm[]>>;
  /** Irrelevant metric: its own random walk, ignoring the source observable. */
  readonly isIrrelevant?: boolean;
}

const g = (name: string, scale: number, unit?: string, labels?: Record<string, string>): NameForm => ({ name, scale, unit, labels, kind: 'gauge' });
const c = (name: string, scale: number, unit?: string, labels?: Record<string, string>, isInteger = false): NameForm => ({ name, scale, unit, labels, kind: 'counter', isInteger });
const memBytes = (p: ServiceParams): number => p.memLimitBytes;

export const ROLES: readonly RoleDef[] = [
  { key: 'cpuUtil', source: 'cpu', trueFamily: 'cpu', inclusion: 0.9, copies: 'instance', forms: {
    dotted: [g('system.cpu.utilization', 1, '1'), g('process.cpu.utilization', 1, '1'), g('container.cpu.usage', 1, '{cpu}')],
    snake_total: [c('node_cpu_seconds_total', 0.7, 's', { mode: 'user' }), c('process_cpu_seconds_total', 1, 's'), c('container_cpu_usage_seconds_total', 1, 's'), g('instance_cpu_utilization_ratio', 1)],
    free_text: [g('CPU busy % ({host})', 100), g('{svc} cpu usage percent', 100), g('CPU utilisation ({host})', 1)] } },
  { key: 'cpuIdle', source: 'idle', trueFamily: 'cpu', inclusion: 0.35, copies: 'instance', forms: {
    dotted: [c('system.cpu.time', 1, 's', { 'cpu.mode': 'idle' })],
    snake_total: [c('node_cpu_seconds_total', 1, 's', { mode: 'idle' })],
    free_text: [g('CPU idle % ({host})', 100)] } },
  { key: 'cpuIowait', source: 'iowait', trueFamily: 'disk', inclusion: 0.35, copies: 'instance', forms: {
    dotted: [g('system.cpu.utilization', 1, '1', { 'cpu.mode': 'iowait' })],
    snake_total: [c('node_cpu_seconds_total', 1, 's', { mode: 'iowait' })],
    free_text: [g('CPU iowait % ({host})', 100)] } },
  { key: 'cpuSteal', source: 'steal', trueFamily: 'cpu', inclusion: 0.3, copies: 'instance', forms: {
    dotted: [g('system.cpu.utilization', 1, '1', { 'cpu.mode': 'steal' })],
    snake_total: [c('node_cpu_seconds_total', 1, 's', { mode: 'steal' })],
    free_text: [g('CPU steal % ({host})', 100)] } },
  { key: 'load', source: 'load', trueFamily: 'saturation', inclusion: 0.4, copies: 'instance', forms: {
    dotted: [g('system.cpu.load_average.1m', 1)],
    snake_total: [g('node_load1', 1), g('node_procs_running', 1)],
    free_text: [g('Load average ({host})', 1), g('Run queue length ({host})', 1)] } },
  { key: 'throttle', source: 'throttle', trueFamily: 'saturation', inclusion: 0.2, copies: 'single', forms: {
    dotted: [g('container.cpu.throttling.ratio', 1, '1')],
    snake_total: [c('container_cpu_cfs_throttled_seconds_total', 1, 's')],
    free_text: [g('CPU throttled % ({svc})', 100)] } },
  { key: 'memUsed', source: 'mem', trueFamily: 'memory', inclusion: 0.85, copies: 'instance', baseScale: memBytes, forms: {
    dotted: [g('process.memory.usage', 1, 'By'), g('container.memory.working_set', 1, 'By'), g('system.memory.usage', 1, 'By', { 'system.memory.state': 'used' })],
    snake_total: [g('container_memory_working_set_bytes', 1, 'By'), g('process_resident_memory_bytes', 1, 'By'), g('go_memstats_heap_inuse_bytes', 1)],
    free_text: [g('Memory used MB ({host})', 1 / 1048576), g('RSS MiB ({svc})', 1 / 1048576), g('Heap used GB ({svc})', 1 / 1073741824)] } },
  { key: 'memRatio', source: 'mem', trueFamily: 'memory', inclusion: 0.3, copies: 'single', forms: {
    dotted: [g('system.memory.utilization', 1, '1')],
    snake_total: [g('container_memory_usage_ratio', 1)],
    free_text: [g('Memory usage % ({svc})', 100)] } },
  { key: 'memAvailable', source: 'memAvailable', trueFamily: 'memory', inclusion: 0.3, copies: 'instance', baseScale: memBytes, forms: {
    dotted: [g('system.memory.linux.available', 1, 'By')],
    snake_total: [g('node_memory_MemAvailable_bytes', 1, 'By')],
    free_text: [g('Free memory GB ({host})', 1 / 1073741824)] } },
  { key: 'gc', source: 'gc', trueFamily: 'runtime', inclusion: 0.35, copies: 'single', forms: {
    dotted: [g('jvm.gc.collections', 1), c('go.memory.gc.cycles', 1, '{cycle}', undefined, true)],
    snake_total: [c('go_gc_cycles_total', 1, undefined, undefined, true), c('jvm_gc_collections_total', 1, undefined, undefined, true)],
    free_text: [g('GC runs per sec ({svc})', 1)] } },
  { key: 'uptime', source: 'uptime', trueFamily: 'runtime', inclusion: 0.25, copies: 'single', forms: {
    dotted: [g('process.uptime', 1, 's')],
    snake_total: [g('process_uptime_seconds', 1, 's')],
    free_text: [g('Uptime hours ({svc})', 1 / 3600)] } },
  { key: 'restarts', source: 'restarts', trueFamily: 'runtime', inclusion: 0.25, copies: 'single', forms: {
    dotted: [g('k8s.container.restart.count', 1, '{restart}')],
    snake_total: [c('kube_pod_container_status_restarts_total', 1, undefined, { container: '{svc}' }, true)],
    free_text: [g('Restarts ({svc})', 1)] } },
  { key: 'threads', source: 'threads', trueFamily: 'runtime', inclusion: 0.2, copies: 'single', forms: {
    dotted: [g('process.thread.count', 1, '{thread}')],
    snake_total: [g('go_goroutines', 1)],
    free_text: [g('Threads ({svc})', 1)] } },
  { key: 'diskBusy', source: 'diskBusy', trueFamily: 'disk', inclusion: 0.55, copies: 'device', forms: {
    dotted: [c('system.disk.io_time', 1, 's', { device: '{dev}' })],
    snake_total: [c('node_disk_io_time_seconds_total', 1, 's', { device: '{dev}' })],
    free_text: [g('Disk busy % ({dev})', 100), g('{dev} disk utilisation', 1)] } },
  { key: 'diskQueue', source: 'diskQueue', trueFamily: 'disk', inclusion: 0.3, copies: 'device', forms: {
    dotted: [c('system.disk.operation_time', 1, 's', { device: '{dev}' })],
    snake_total: [c('node_disk_io_time_weighted_seconds_total', 1, 's', { device: '{dev}' })],
    free_text: [g('Disk queue depth ({dev})', 1)] } },
  { key: 'diskLatency', source: 'diskLatency', trueFamily: 'disk', inclusion: 0.25, copies: 'device', forms: {
    dotted: [g('system.disk.operation.latency', 1, 's', { device: '{dev}' })],
    snake_total: [g('node_disk_read_latency_seconds', 1, 's', { device: '{dev}' })],
    free_text: [g('Disk await ms ({dev})', 1000)] } },
  { key: 'diskBytes', source: 'diskBytes', trueFamily: 'disk', inclusion: 0.4, copies: 'device', forms: {
    dotted: [c('system.disk.io', 1, 'By', { device: '{dev}', 'disk.io.direction': 'write' })],
    snake_total: [c('node_disk_written_bytes_total', 1, 'By', { device: '{dev}' }, true)],
    free_text: [g('Disk write MB/s ({dev})', 1 / 1048576)] } },
  { key: 'netBytes', source: 'netBytes', trueFamily: 'network', inclusion: 0.5, copies: 'instance', forms: {
    dotted: [c('system.network.io', 1, 'By', { 'network.io.direction': 'transmit' })],
    snake_total: [c('node_network_transmit_bytes_total', 1, 'By', { device: 'eth0' }, true)],
    free_text: [g('Network out MB/s ({host})', 1 / 1048576), g('Bandwidth out kB/s ({host})', 1 / 1024)] } },
  { key: 'retrans', source: 'retrans', trueFamily: 'network', inclusion: 0.6, copies: 'instance', forms: {
    dotted: [c('system.network.tcp.retransmits', 1, '{segment}', undefined, true)],
    snake_total: [c('node_netstat_Tcp_RetransSegs', 1, undefined, undefined, true)],
    free_text: [g('TCP retransmits/s ({host})', 1)] } },
  { key: 'drops', source: 'drops', trueFamily: 'network', inclusion: 0.5, copies: 'instance', forms: {
    dotted: [c('system.network.packet.dropped', 1, '{packet}', undefined, true)],
    snake_total: [c('node_network_receive_drop_total', 1, undefined, { device: 'eth0' }, true)],
    free_text: [g('Dropped packets/s ({host})', 1)] } },
  { key: 'serverLatency', source: 'serverLatency', trueFamily: 'latency', inclusion: 0.85, copies: 'percentile', forms: {
    dotted: [g('http.server.request.duration.{q}', 1, 's'), g('http.server.request.duration.{q}', 1000, 'ms'), g('rpc.server.call.duration.{q}', 1000, 'ms')],
    snake_total: [g('http_server_request_duration_seconds', 1, 's', { quantile: '{qv}' }), g('{svc_}request_latency_seconds', 1, 's', { quantile: '{qv}' })],
    free_text: [g('{q} response time ms ({svc})', 1000), g('{svc} latency {q} (s)', 1)] } },
  { key: 'clientLatency', source: 'clientLatency', trueFamily: 'latency', inclusion: 0.55, copies: 'percentile', forms: {
    dotted: [g('db.client.operation.duration.{q}', 1, 's', { 'server.address': '{dep}' }), g('http.client.request.duration.{q}', 1000, 'ms', { 'server.address': '{dep}' })],
    snake_total: [g('http_client_request_duration_seconds', 1, 's', { peer: '{dep}', quantile: '{qv}' })],
    free_text: [g('{dep} call latency {q} ms', 1000)] } },
  { key: 'callerLatency', source: 'callerLatency', trueFamily: 'latency', inclusion: 0.6, copies: 'percentile', forms: {
    dotted: [g('upstream.response.duration.{q}', 1, 's', { upstream: '{svc}' })],
    snake_total: [g('gateway_upstream_response_seconds', 1, 's', { upstream: '{svc}', quantile: '{qv}' })],
    free_text: [g('courier-gateway → {svc} {q} ms', 1000), g('Checkout page load {q} (s)', 1.2)] } },
  { key: 'requests', source: 'traffic', trueFamily: 'traffic', inclusion: 0.85, copies: 'instance', forms: {
    dotted: [g('http.server.request.rate', 1, '{request}/s'), c('http.server.requests', 1, '{request}', undefined, true)],
    snake_total: [c('http_server_requests_total', 1, undefined, { code: '200' }, true), c('{svc_}requests_total', 1, undefined, undefined, true)],
    free_text: [g('Requests/s ({host})', 1), g('{svc} throughput rpm', 60)] } },
  { key: 'errorRatio', source: 'errorRatio', trueFamily: 'errors', inclusion: 0.55, copies: 'single', forms: {
    dotted: [g('http.server.error_ratio', 1, '1')],
    snake_total: [g('{svc_}request_error_ratio', 1)],
    free_text: [g('Error rate % ({svc})', 100), g('5xx share ({svc})', 1)] } },
  { key: 'successRatio', source: 'successRatio', trueFamily: 'errors', inclusion: 0.3, copies: 'single', forms: {
    dotted: [g('http.server.success_ratio', 1, '1')],
    snake_total: [g('{svc_}availability_ratio', 1)],
    free_text: [g('Success rate % ({svc})', 100)] } },
  { key: 'errorCount', source: 'errorRate', trueFamily: 'errors', inclusion: 0.55, copies: 'instance', forms: {
    dotted: [c('http.server.errors', 1, '{error}', undefined, true), c('app.exceptions', 1, '{exception}', undefined, true)],
    snake_total: [c('http_server_errors_total', 1, undefined, { code: '5xx' }, true), c('{svc_}exceptions_total', 1, undefined, undefined, true), c('http_server_requests_total', 1, undefined, { code: '500' }, true)],
    free_text: [g('Errors/min ({host})', 60), g('Failed checkouts per minute', 60)] } },
  { key: 'poolUse', source: 'poolUse', trueFamily: 'saturation', inclusion: 0.3, copies: 'single', forms: {
    dotted: [g('db.client.connection.pool.usage', 1, '1', { 'pool.name': '{dep}' })],
    snake_total: [g('db_pool_connections_active', 1, undefined, { pool: '{dep}' })],
    free_text: [g('{dep} pool in use %', 100)] } },
  { key: 'poolPending', source: 'poolPending', trueFamily: 'saturation', inclusion: 0.25, copies: 'single', forms: {
    dotted: [g('db.client.connection.pending_requests', 1, '{request}', { 'pool.name': '{dep}' })],
    snake_total: [g('db_pool_pending_requests', 1, undefined, { pool: '{dep}' })],
    free_text: [g('{dep} pool waiters', 1)] } },
  { key: 'poolWait', source: 'poolWait', trueFamily: 'latency', inclusion: 0.2, copies: 'single', forms: {
    dotted: [g('db.client.connection.wait_time', 1, 's', { 'pool.name': '{dep}' })],
    snake_total: [g('db_pool_wait_time_seconds', 1, 's', { pool: '{dep}' })],
    free_text: [g('{dep} pool wait ms', 1000)] } },
  { key: 'inflight', source: 'inflight', trueFamily: 'saturation', inclusion: 0.25, copies: 'single', forms: {
    dotted: [g('http.server.active_requests', 1, '{request}')],
    snake_total: [g('{svc_}inflight_requests', 1)],
    free_text: [g('In-flight requests ({svc})', 1)] } },
];

/** Metrics that move for their own reasons (keyword traps included: "workload" is not CPU). */
export const IRRELEVANT_ROLES: readonly RoleDef[] = [
  ['filesystem', g('system.filesystem.utilization', 1, '1'), g('node_filesystem_avail_bytes', 5e10, 'By', { mountpoint: '/' }), g('Disk space free GB (/)', 50)],
  ['other', g('scheduler.workload.items', 40), g('batch_workload_items', 40), g('Workload items ({svc})', 40)],
  ['other', g('tls.certificate.expiry', 2e6, 's'), g('ssl_certificate_expiry_seconds', 2e6), g('Cert expiry days', 23)],
  ['saturation', g('messaging.consumer.lag', 200, '{message}'), g('order_events_consumer_lag', 200), g('Order events lag ({svc})', 200)],
  ['other', c('app.orders.placed', 3, '{order}', undefined, true), c('orders_placed_total', 3, undefined, undefined, true), g('Orders placed per minute', 180)],
  ['other', g('hw.temperature', 45, 'Cel'), g('node_hwmon_temp_celsius', 45, 'Cel', { chip: 'cpu0' }), g('Rack temperature °C', 24)],
  ['other', c('feature_flag.evaluations', 50, '{evaluation}', undefined, true), c('feature_flag_evaluations_total', 50, undefined, undefined, true), g('Flag checks/s', 50)],
  ['other', g('substitution.suggestions.shown', 8), g('substitution_suggestions_shown', 8), g('Substitutions offered / min', 480)],
].map(([family, dotted, snake, free], k): RoleDef => ({
  key: `irrelevant${k}`, source: 'traffic', trueFamily: family as Family, inclusion: 0.3, copies: 'single', isIrrelevant: true,
  forms: { dotted: [dotted as NameForm], snake_total: [snake as NameForm], free_text: [free as NameForm] },
}));

/** Quantiles with their multiplier over the median and how much the tail noise reaches them. */
export const QUANTILES: ReadonlyArray<{ readonly value: string; readonly short: string; readonly multiplier: number; readonly tailWeight: number }> = [
  { value: '0.5', short: 'p50', multiplier: 1, tailWeight: 0.15 },
  { value: '0.9', short: 'p90', multiplier: 1.7, tailWeight: 0.5 },
  { value: '0.95', short: 'p95', multiplier: 2.1, tailWeight: 0.7 },
  { value: '0.99', short: 'p99', multiplier: 3.2, tailWeight: 1 },
  { value: '0.999', short: 'p999', multiplier: 5, tailWeight: 1.2 },
];
