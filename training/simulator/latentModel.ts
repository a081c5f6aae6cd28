/**
 * The hidden state of one simulated service, step by step. Faults and benign events act on
 * DRIVERS (causes); OBSERVABLES (what metrics measure) are derived from drivers with simple
 * queueing-style couplings, so side effects arise from the model (a memory leak raises GC and
 * burns CPU, a surge raises CPU and then latency) rather than being painted on one metric.
 */
import type { Random } from './random';

/** Physical parameters of one simulated service; drawn once per system. */
export interface ServiceParams {
  readonly requestRatePerS: number;
  readonly dailyAmplitude: number;
  readonly dailyPhaseRad: number;
  readonly trafficNoiseSigma: number;
  readonly cores: number;
  readonly cpuBase: number;
  readonly cpuPerLoad: number;
  readonly cpuNoiseSigma: number;
  readonly memBaseRatio: number;
  readonly memLimitBytes: number;
  readonly memNoiseSigma: number;
  readonly diskBase: number;
  readonly diskPerLoad: number;
  readonly serverLatencyS: number;
  readonly dependencyLatencyS: number;
  /** Share of a request's time spent waiting on the downstream dependency, 0..1. */
  readonly dependencyShare: number;
  /** How much disk slowness reaches request latency, 0..1. */
  readonly persistenceShare: number;
  readonly queueSensitivity: number;
  readonly errorBaseRatio: number;
  readonly poolSize: number;
  readonly poolBaseRatio: number;
  readonly bytesPerRequest: number;
  readonly retransPerRequest: number;
  /** Scale of heavy-tailed latency noise (the "p99 wobbles" of quiet periods). */
  readonly tailSigma: number;
  /** Per-step probability of a harmless heavy-tailed burst. */
  readonly burstProbability: number;
  /** Slow wander over hours (cache churn, tenant mix, neighbours), log scale; 0 = none. */
  readonly slowDriftSigma: number;
  /** Error ratio added per unit of latency beyond 8× normal (0 = timeouts never surface). */
  readonly timeoutSensitivity: number;
  /** Error ratio per unit of packet-loss fraction (most clients retry silently). */
  readonly lossErrorShare: number;
}

export const DRIVER_KEYS = [
  'trafficScale', 'cpuExtra', 'cpuScale', 'steal', 'memExtra', 'memLeak', 'diskExtra',
  'callerDelayS', 'dependencyDelayS', 'lossFraction', 'errorExtra', 'latencyScale',
  'poolHold', 'restart', 'tailExtra',
] as const;
export type DriverKey = (typeof DRIVER_KEYS)[number];
export type Drivers = Record<DriverKey, Float64Array>;

export const OBSERVABLE_KEYS = [
  'traffic', 'cpu', 'steal', 'iowait', 'idle', 'load', 'throttle', 'mem', 'memAvailable', 'gc',
  'diskBusy', 'diskQueue', 'diskLatency', 'diskBytes', 'netBytes', 'retrans', 'drops',
  'serverLatency', 'clientLatency', 'callerLatency', 'tail', 'errorRatio', 'successRatio',
  'errorRate', 'poolUse', 'poolPending', 'poolWait', 'uptime', 'restarts', 'threads', 'inflight',
] as const;
export type ObservableKey = (typeof OBSERVABLE_KEYS)[number];
export type Observables = Record<ObservableKey, Float64Array>;

/** Fresh drivers for `n` steps: scales at 1, extras at 0. */
export function createDrivers(n: number): Drivers {
  const drivers = {} as Record<DriverKey, Float64Array>;
  for (const key of DRIVER_KEYS) {
    const arr = new Float64Array(n);
    if (key === 'trafficScale' || key === 'cpuScale' || key === 'latencyScale' || key === 'poolHold') arr.fill(1);
    drivers[key] = arr;
  }
  return drivers;
}

/** AR(1) noise with stationary standard deviation `sigma` (phi = memory per step). */
export function drawAr1(rng: Random, n: number, phi: number, sigma: number): Float64Array {
  const out = new Float64Array(n);
  const innovation = sigma * Math.sqrt(1 - phi * phi);
  let x = rng.normal() * sigma;
  for (let i = 0; i < n; i += 1) {
    x = phi * x + innovation * rng.normal();
    out[i] = x;
  }
  return out;
}

const DAY_MS = 86_400_000;
const clamp = (x: number, lo: number, hi: number): number => (x < lo ? lo : x > hi ? hi : x);

/** Daily traffic cycle times slow AR noise, before any fault scaling; requests per second. */
export function drawBaseTraffic(p: ServiceParams, rng: Random, timesMs: Float64Array, stepMs: number): Float64Array {
  const n = timesMs.length;
  // Noise memory of about 10 minutes whatever the step, so 1 s and 5 min grids both look real.
  const phi = Math.exp(-stepMs / 600_000);
  const ar = drawAr1(rng, n, Math.min(phi, 0.999), p.trafficNoiseSigma);
  const slow = drawAr1(rng, n, Math.min(0.9995, Math.exp(-stepMs / 14_400_000)), p.slowDriftSigma);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i += 1) {
    const angle = (2 * Math.PI * (timesMs[i] as number)) / DAY_MS + p.dailyPhaseRad;
    const cycle = 1 + p.dailyAmplitude * Math.sin(angle) + 0.3 * p.dailyAmplitude * Math.sin(2 * angle + 1);
    out[i] = p.requestRatePerS * Math.max(0.05, cycle) * Math.exp((ar[i] as number) + (slow[i] as number));
  }
  return out;
}

/**
 * Derives every observable from the drivers. Couplings (all deliberately simple):
 * CPU demand = base + per-request work + GC burn; utilisation is capped by what steal leaves;
 * latency grows with CPU and disk utilisation as 1/(1-ρ) beyond a knee; the pool fills with
 * traffic × hold time; errors rise from timeouts when latency explodes.
 */
export function deriveObservables(p: ServiceParams, d: Drivers, baseTraffic: Float64Array, rng: Random, stepMs: number): Observables {
  const n = baseTraffic.length;
  const o = {} as Record<ObservableKey, Float64Array>;
  for (const key of OBSERVABLE_KEYS) o[key] = new Float64Array(n);
  const phi = Math.min(0.995, Math.exp(-stepMs / 300_000));
  const cpuNoise = drawAr1(rng, n, phi, p.cpuNoiseSigma);
  const memNoise = drawAr1(rng, n, Math.min(0.999, Math.exp(-stepMs / 1_800_000)), p.memNoiseSigma);
  const diskNoise = drawAr1(rng, n, phi, 0.15);
  // Slow wander of per-request cost, independent of traffic: long baselines are not flat.
  const slow = drawAr1(rng, n, Math.min(0.9995, Math.exp(-stepMs / 14_400_000)), p.slowDriftSigma);
  const stepS = stepMs / 1000;
  let uptimeS = rng.uniform(3600, 40 * 86400);
  let restarts = rng.int(0, 6);
  for (let i = 0; i < n; i += 1) {
    const traffic = (baseTraffic[i] as number) * (d.trafficScale[i] as number);
    const loadRatio = traffic / p.requestRatePerS;
    const mem = clamp(p.memBaseRatio * Math.exp(memNoise[i] as number) + (d.memExtra[i] as number) + (d.memLeak[i] as number), 0.02, 0.995);
    const gcPressure = Math.max(0, mem - 0.7) / 0.3;
    const steal = clamp((d.steal[i] as number) + 0.004 * Math.abs(rng.normal()), 0, 0.9);
    const demand = Math.max(0.003, ((p.cpuBase + p.cpuPerLoad * loadRatio) * Math.exp((cpuNoise[i] as number) + (slow[i] as number)) + 0.25 * gcPressure * gcPressure) * (d.cpuScale[i] as number) + (d.cpuExtra[i] as number));
    const capacity = 1 - steal;
    const cpu = Math.min(demand, capacity * (0.97 + 0.025 * rng.next()));
    const rho = demand / capacity;
    const cpuFactor = 1 + p.queueSensitivity * Math.max(0, rho - 0.6) ** 2 / Math.max(0.04, 1 - rho) + 3 * Math.max(0, rho - 1);
    const diskBusy = clamp((p.diskBase + p.diskPerLoad * loadRatio) * Math.exp(diskNoise[i] as number) + (d.diskExtra[i] as number), 0.001, 0.999);
    const diskFactor = 1 / Math.max(0.03, 1 - diskBusy);
    const iowait = clamp(0.002 + 0.35 * diskBusy ** 4 * (0.8 + 0.4 * rng.next()), 0, 1 - cpu);
    const dependency = p.dependencyLatencyS * (1 + 0.2 * gcPressure) + (d.dependencyDelayS[i] as number);
    const poolDemand = p.poolBaseRatio * loadRatio * (dependency / p.dependencyLatencyS) * (d.poolHold[i] as number);
    const poolUse = Math.min(1, poolDemand);
    const overflow = Math.max(0, poolDemand - 1);
    const poolJitter = rng.next(); // drawn always: the draw count must not depend on the drivers
    const poolWait = overflow > 0 ? dependency * overflow * 2 : 0.0005 * poolJitter;
    const client = dependency + poolWait;
    const ownWork = p.serverLatencyS * (1 - p.dependencyShare) * cpuFactor * (1 + p.persistenceShare * (diskFactor - 1) * 0.3) * (1 + 2 * steal);
    const server = (ownWork + p.dependencyShare * client / Math.max(1e-9, p.dependencyLatencyS) * p.serverLatencyS) * (d.latencyScale[i] as number) * Math.exp(0.7 * (slow[i] as number));
    // Timeouts only once requests run far past their usual time (and only in some systems).
    const timeoutErrors = Math.min(0.5, p.timeoutSensitivity * Math.max(0, server / p.serverLatencyS - 8) + 0.3 * p.timeoutSensitivity * 10 * Math.min(1, overflow));
    const errorRatio = clamp(p.errorBaseRatio * Math.exp(0.4 * rng.normal()) + (d.errorExtra[i] as number) + timeoutErrors + p.lossErrorShare * (d.lossFraction[i] as number), 0, 1);
    // Drawn on every step, so the number of draws does not depend on the drivers: a counterfactual
    // run without the fault (same generator state) then sees exactly the same noise.
    const restartDraw = rng.next();
    if ((d.restart[i] as number) > 0) {
      uptimeS = stepS * restartDraw;
      restarts += 1;
    } else {
      uptimeS += stepS;
    }
    o.traffic[i] = traffic;
    o.cpu[i] = cpu;
    o.steal[i] = steal;
    o.iowait[i] = iowait;
    o.idle[i] = Math.max(0, 1 - cpu - iowait - steal);
    o.load[i] = p.cores * (cpu + iowait * 2 + Math.max(0, rho - 0.95) * 4) * (1 + 0.1 * rng.normal() ** 2);
    o.throttle[i] = clamp(Math.max(0, rho - 0.85) * 3, 0, 1) * (0.8 + 0.2 * rng.next());
    o.mem[i] = mem;
    o.memAvailable[i] = 1 - mem;
    o.gc[i] = (0.05 + 0.2 * loadRatio) * (1 + 6 * gcPressure * gcPressure);
    o.diskBusy[i] = diskBusy;
    o.diskQueue[i] = diskBusy * diskFactor;
    o.diskLatency[i] = 0.002 * diskFactor;
    o.diskBytes[i] = 4096 * (200 * diskBusy + 20 * loadRatio);
    o.netBytes[i] = traffic * p.bytesPerRequest * (1 - 3 * (d.lossFraction[i] as number));
    o.retrans[i] = traffic * (p.retransPerRequest * Math.exp(0.5 * rng.normal()) + 20 * (d.lossFraction[i] as number));
    o.drops[i] = traffic * 8 * (d.lossFraction[i] as number) * Math.exp(0.3 * rng.normal()) + (rng.chance(0.01) ? rng.uniform(0, 3) : 0);
    o.serverLatency[i] = server;
    o.clientLatency[i] = client;
    o.callerLatency[i] = server + 0.002 + (d.callerDelayS[i] as number);
    o.tail[i] = 1 + 0.5 * p.tailSigma * Math.abs(rng.studentT2()) + (d.tailExtra[i] as number);
    o.errorRatio[i] = errorRatio;
    o.successRatio[i] = 1 - errorRatio;
    o.errorRate[i] = errorRatio * traffic;
    o.poolUse[i] = poolUse;
    o.poolPending[i] = overflow * p.poolSize * 3 + (rng.chance(0.02) ? 1 : 0);
    o.poolWait[i] = poolWait;
    o.uptime[i] = uptimeS;
    o.restarts[i] = restarts;
    o.threads[i] = 40 + 30 * cpu + 60 * poolUse;
    o.inflight[i] = traffic * server;
  }
  return o;
}
