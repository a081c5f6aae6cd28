/**
 * The demo incident (invented): "Larkspur Provisions checkout slowdown". basket-api, 6 hours at
 * 1-minute steps; a lunchtime promotion surges traffic from 11:20 UTC for about 25 minutes, CPU
 * saturates behind it and checkout latency climbs. A deploy at 09:10 restarts the service, so
 * the cumulative counters reset once, as real exports do.
 */
import { ROLES, type NameForm, type RoleDef } from './catalogue';
import type { ServiceParams } from './latentModel';
import { createRandom } from './random';
import { renderSystem } from './renderSystem';
import { formatSeriesId, type SeriesSpec, type SystemSpec } from './systemSpec';
import type { SimSystem } from './types';

export const DEMO_START_MS = Date.UTC(2026, 2, 14, 8, 0, 0);
export const DEMO_STEP_MS = 60_000;
export const DEMO_LENGTH_STEPS = 360;
/** Inclusive grid indices of the injected incident (11:20–11:44 UTC). */
export const DEMO_INCIDENT = { startIndex: 200, endIndex: 224 } as const;

const PARAMS: ServiceParams = {
  requestRatePerS: 140, dailyAmplitude: 0.35, dailyPhaseRad: -1.2, trafficNoiseSigma: 0.05,
  cores: 4, cpuBase: 0.05, cpuPerLoad: 0.3, cpuNoiseSigma: 0.04,
  memBaseRatio: 0.42, memLimitBytes: 2048 * 1048576, memNoiseSigma: 0.01,
  diskBase: 0.03, diskPerLoad: 0.04, serverLatencyS: 0.085, dependencyLatencyS: 0.02,
  dependencyShare: 0.3, persistenceShare: 0.2, queueSensitivity: 2.5, errorBaseRatio: 0.002,
  poolSize: 20, poolBaseRatio: 0.25, bytesPerRequest: 9000, retransPerRequest: 0.004,
  tailSigma: 0.2, burstProbability: 0.004, slowDriftSigma: 0.05, timeoutSensitivity: 0.0015, lossErrorShare: 0,
};

type Row = readonly [roleKey: string, name: string, labels: Record<string, string>, unit: string | undefined, kind: 'gauge' | 'counter', factor: number, tailWeight: number, isInteger?: boolean];

const H = { host: 'basket-1' };
const ROWS: readonly Row[] = [
  ['cpuUtil', 'node_cpu_seconds_total', { ...H, mode: 'user' }, 's', 'counter', 4 * 0.75, 0],
  ['cpuUtil', 'node_cpu_seconds_total', { ...H, mode: 'system' }, 's', 'counter', 4 * 0.25, 0],
  ['cpuIdle', 'node_cpu_seconds_total', { ...H, mode: 'idle' }, 's', 'counter', 4, 0],
  ['cpuIowait', 'node_cpu_seconds_total', { ...H, mode: 'iowait' }, 's', 'counter', 4, 0],
  ['load', 'node_load1', H, undefined, 'gauge', 1, 0],
  ['throttle', 'container_cpu_cfs_throttled_seconds_total', { container: 'basket-api' }, 's', 'counter', 1, 0],
  ['memUsed', 'container_memory_working_set_bytes', { container: 'basket-api' }, 'By', 'gauge', PARAMS.memLimitBytes, 0],
  ['threads', 'go_goroutines', { service: 'basket-api' }, undefined, 'gauge', 1, 0],
  ['diskBusy', 'node_disk_io_time_seconds_total', { ...H, device: 'nvme0n1' }, 's', 'counter', 1, 0],
  ['netBytes', 'node_network_transmit_bytes_total', { ...H, device: 'eth0' }, 'By', 'counter', 1, 0, true],
  ['retrans', 'node_netstat_Tcp_RetransSegs', H, undefined, 'counter', 1, 0, true],
  ['requests', 'http_server_requests_total', { service: 'basket-api', code: '200' }, undefined, 'counter', 1, 0, true],
  ['errorCount', 'http_server_errors_total', { service: 'basket-api' }, undefined, 'counter', 1, 0, true],
  ['serverLatency', 'http_server_request_duration_seconds', { service: 'basket-api', quantile: '0.5' }, 's', 'gauge', 1, 0.15],
  ['serverLatency', 'http_server_request_duration_seconds', { service: 'basket-api', quantile: '0.95' }, 's', 'gauge', 2.1, 0.7],
  ['serverLatency', 'http_server_request_duration_seconds', { service: 'basket-api', quantile: '0.99' }, 's', 'gauge', 3.2, 1],
  ['clientLatency', 'http_client_request_duration_seconds', { service: 'basket-api', peer: 'pantry-db', quantile: '0.95' }, 's', 'gauge', 2.1, 0.7],
  ['poolUse', 'db_pool_connections_active', { service: 'basket-api', pool: 'pantry-db' }, undefined, 'gauge', 20, 0],
  ['inflight', 'basket_api_inflight_requests', {}, undefined, 'gauge', 1, 0],
  ['irrelevant3', 'order_events_consumer_lag', { topic: 'orders', group: 'stock-sync' }, undefined, 'gauge', 200, 0],
  ['irrelevant0', 'node_filesystem_avail_bytes', { ...H, mountpoint: '/' }, 'By', 'gauge', 5.2e10, 0],
];

function findRole(key: string): RoleDef {
  const role = ROLES.find((r) => r.key === key);
  if (role) return role;
  // Irrelevant metrics wander on their own; a minimal role keeps them out of the fault model.
  return { key, source: 'traffic', trueFamily: key === 'irrelevant0' ? 'filesystem' : 'saturation', inclusion: 1, copies: 'single', isIrrelevant: true, forms: { dotted: [], snake_total: [], free_text: [] } };
}

/** The demo system (deterministic): about 20 series, counters cumulative with one reset. */
export function buildDemoSystem(): SimSystem {
  const series: SeriesSpec[] = ROWS.map(([roleKey, name, labels, unit, kind, factor, tailWeight, isInteger]) => {
    const form: NameForm = { name, labels, unit, kind, scale: factor, isInteger };
    return {
      id: formatSeriesId(name, labels), name, labels, unit, kind, trueFamily: findRole(roleKey).trueFamily, role: findRole(roleKey), form,
      factor, tailWeight, noiseSigma: tailWeight > 0 ? 0.06 : 0.03, gapProbability: 0, resetProbability: 0, significantDigits: 0,
    };
  });
  const spec: SystemSpec = { id: 'demo-basket-api', seed: 20260314, service: 'basket-api', dependency: 'pantry-db', namingStyle: 'snake_total', stepMs: DEMO_STEP_MS, params: PARAMS, series };
  const rng = createRandom(20260314);
  const system = renderSystem(spec, {
    lengthSteps: DEMO_LENGTH_STEPS, startMs: DEMO_START_MS, benignPerStep: 0,
    benignEvents: [{ kind: 'deploy', at: 70 }, { kind: 'cron', at: 120 }, { kind: 'latencyBurst', at: 285 }],
    faults: [{ label: 'traffic_surge', ...DEMO_INCIDENT, intensity: 0.55 }],
  }, rng);
  // Two short scrape gaps, as real exports have; gaps stay gaps in every format.
  const gapped = system.series.map((s, k) => {
    if (k !== 14 && k !== 9) return s;
    const values = Float64Array.from(s.values);
    for (let i = k === 14 ? 150 : 300; i < (k === 14 ? 153 : 302); i += 1) values[i] = Number.NaN;
    return { ...s, values };
  });
  return { ...system, series: gapped };
}
