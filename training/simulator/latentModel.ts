/**
 * The hidden state of one simulated service, step by step. Faults and benign events act on
 * DRIVERS (causes); OBSERVABLES (what metrics measure) are derived from drivers with simple
 * queueing-style couplings, so side effects arise from the model (a memory leak raises GC and
 * burns CPU, a surge raises CPU and then latency) rather than being painted on one metric.
 */
import type { Random } from './random';
import type { ServiceParams } from './serviceParams';
import { drawAr1, drawBaseTraffic, drawStep, DRAWS_PER_STEP, findStepNeeds, SKIPPABLE, type StepNeeds } from './latentNoise';
import { DRIVER_KEYS, OBSERVABLE_KEYS, borrowScratch, ScratchSlot, createDrivers, copyDrivers, createObservables, type DriverKey, type Drivers, type ObservableKey, type Observables } from './latentState';

export type { ServiceParams } from './serviceParams';

export { drawAr1, drawBaseTraffic } from './latentNoise';
export { DRIVER_KEYS, OBSERVABLE_KEYS, borrowScratch, ScratchSlot, createDrivers, copyDrivers, createObservables, type DriverKey, type Drivers, type ObservableKey, type Observables } from './latentState';

// Reused mask of the steps where a fault changed some driver (grown on demand).
let differsScratch = new Uint8Array(1024);

const clamp = (x: number, lo: number, hi: number): number => (x < lo ? lo : x > hi ? hi : x);

/** Slow noise series shared by every step (drawn once per render). */
interface StepNoise {
  readonly baseTraffic: Float64Array;
  readonly cpu: Float64Array;
  readonly mem: Float64Array;
  readonly disk: Float64Array;
  readonly slow: Float64Array;
}

/**
 * Writes every observable except uptime and restarts (the only ones that carry state across
 * steps) at steps [from, to); step i's draws are r[13·i .. 13·i + 13). The arrays are taken out
 * of their objects once, not at every step.
 */
function writeSteps(p: ServiceParams, d: Drivers, noise: StepNoise, r: Float64Array, o: Observables, needs: StepNeeds, from: number, to: number): void {
  const dCallerDelayS = d.callerDelayS;
  const dCpuExtra = d.cpuExtra;
  const dCpuScale = d.cpuScale;
  const dDependencyDelayS = d.dependencyDelayS;
  const dDiskExtra = d.diskExtra;
  const dErrorExtra = d.errorExtra;
  const dLatencyScale = d.latencyScale;
  const dLossFraction = d.lossFraction;
  const dMemExtra = d.memExtra;
  const dMemLeak = d.memLeak;
  const dPoolHold = d.poolHold;
  const dSteal = d.steal;
  const dTailExtra = d.tailExtra;
  const dTrafficScale = d.trafficScale;
  const noiseBaseTraffic = noise.baseTraffic;
  const noiseCpu = noise.cpu;
  const noiseDisk = noise.disk;
  const noiseMem = noise.mem;
  const noiseSlow = noise.slow;
  const oCallerLatency = o.callerLatency;
  const oClientLatency = o.clientLatency;
  const oCpu = o.cpu;
  const oDiskBusy = o.diskBusy;
  const oDiskBytes = o.diskBytes;
  const oDiskLatency = o.diskLatency;
  const oDiskQueue = o.diskQueue;
  const oDrops = o.drops;
  const oErrorRate = o.errorRate;
  const oErrorRatio = o.errorRatio;
  const oGc = o.gc;
  const oIdle = o.idle;
  const oInflight = o.inflight;
  const oIowait = o.iowait;
  const oLoad = o.load;
  const oMem = o.mem;
  const oMemAvailable = o.memAvailable;
  const oNetBytes = o.netBytes;
  const oPoolPending = o.poolPending;
  const oPoolUse = o.poolUse;
  const oPoolWait = o.poolWait;
  const oRetrans = o.retrans;
  const oServerLatency = o.serverLatency;
  const oSteal = o.steal;
  const oSuccessRatio = o.successRatio;
  const oTail = o.tail;
  const oThreads = o.threads;
  const oThrottle = o.throttle;
  const oTraffic = o.traffic;
  for (let i = from; i < to; i += 1) {
    const b = DRAWS_PER_STEP * i;
    const traffic = (noiseBaseTraffic[i] as number) * (dTrafficScale[i] as number);
    const loadRatio = traffic / p.requestRatePerS;
    const mem = clamp(p.memBaseRatio * Math.exp(noiseMem[i] as number) + (dMemExtra[i] as number) + (dMemLeak[i] as number), 0.02, 0.995);
    const gcPressure = Math.max(0, mem - 0.7) / 0.3;
    const steal = clamp((dSteal[i] as number) + 0.004 * Math.abs(r[b] as number), 0, 0.9);
    const demand = Math.max(0.003, ((p.cpuBase + p.cpuPerLoad * loadRatio) * Math.exp((noiseCpu[i] as number) + (noiseSlow[i] as number)) + 0.25 * gcPressure * gcPressure) * (dCpuScale[i] as number) + (dCpuExtra[i] as number));
    const capacity = 1 - steal;
    const cpu = Math.min(demand, capacity * (0.97 + 0.025 * (r[b + 1] as number)));
    const rho = demand / capacity;
    const diskBusy = clamp((p.diskBase + p.diskPerLoad * loadRatio) * Math.exp(noiseDisk[i] as number) + (dDiskExtra[i] as number), 0.001, 0.999);
    const diskFactor = 1 / Math.max(0.03, 1 - diskBusy);
    const dependency = p.dependencyLatencyS * (1 + 0.2 * gcPressure) + (dDependencyDelayS[i] as number);
    const poolDemand = p.poolBaseRatio * loadRatio * (dependency / p.dependencyLatencyS) * (dPoolHold[i] as number);
    const poolUse = Math.min(1, poolDemand);
    const overflow = Math.max(0, poolDemand - 1);
    const poolJitter = r[b + 3] as number;
    const poolWait = overflow > 0 ? dependency * overflow * 2 : 0.0005 * poolJitter;
    const client = dependency + poolWait;
    if (needs.iowait) {
      const iowait = clamp(0.002 + 0.35 * diskBusy ** 4 * (0.8 + 0.4 * (r[b + 2] as number)), 0, 1 - cpu);
      oIowait[i] = iowait;
      oIdle[i] = Math.max(0, 1 - cpu - iowait - steal);
      oLoad[i] = p.cores * (cpu + iowait * 2 + Math.max(0, rho - 0.95) * 4) * (1 + 0.1 * (r[b + 6] as number) ** 2);
    }
    if (needs.server) {
      const cpuFactor = 1 + p.queueSensitivity * Math.max(0, rho - 0.6) ** 2 / Math.max(0.04, 1 - rho) + 3 * Math.max(0, rho - 1);
      const ownWork = p.serverLatencyS * (1 - p.dependencyShare) * cpuFactor * (1 + p.persistenceShare * (diskFactor - 1) * 0.3) * (1 + 2 * steal);
      const server = (ownWork + p.dependencyShare * client / Math.max(1e-9, p.dependencyLatencyS) * p.serverLatencyS) * (dLatencyScale[i] as number) * Math.exp(0.7 * (noiseSlow[i] as number));
      oServerLatency[i] = server;
      oCallerLatency[i] = server + 0.002 + (dCallerDelayS[i] as number);
      oInflight[i] = traffic * server;
      if (needs.errors) {
        // Timeouts only once requests run far past their usual time (and only in some systems).
        const timeoutErrors = Math.min(0.5, p.timeoutSensitivity * Math.max(0, server / p.serverLatencyS - 8) + 0.3 * p.timeoutSensitivity * 10 * Math.min(1, overflow));
        const errorRatio = clamp(p.errorBaseRatio * Math.exp(0.4 * (r[b + 4] as number)) + (dErrorExtra[i] as number) + timeoutErrors + p.lossErrorShare * (dLossFraction[i] as number), 0, 1);
        oErrorRatio[i] = errorRatio;
        oSuccessRatio[i] = 1 - errorRatio;
        oErrorRate[i] = errorRatio * traffic;
      }
    }
    oTraffic[i] = traffic;
    oCpu[i] = cpu;
    oSteal[i] = steal;
    oThrottle[i] = clamp(Math.max(0, rho - 0.85) * 3, 0, 1) * (0.8 + 0.2 * (r[b + 7] as number));
    oMem[i] = mem;
    oMemAvailable[i] = 1 - mem;
    oGc[i] = (0.05 + 0.2 * loadRatio) * (1 + 6 * gcPressure * gcPressure);
    oDiskBusy[i] = diskBusy;
    oDiskQueue[i] = diskBusy * diskFactor;
    oDiskLatency[i] = 0.002 * diskFactor;
    oDiskBytes[i] = 4096 * (200 * diskBusy + 20 * loadRatio);
    oNetBytes[i] = traffic * p.bytesPerRequest * (1 - 3 * (dLossFraction[i] as number));
    if (needs.retrans) oRetrans[i] = traffic * (p.retransPerRequest * Math.exp(0.5 * (r[b + 8] as number)) + 20 * (dLossFraction[i] as number));
    if (needs.drops) oDrops[i] = traffic * 8 * (dLossFraction[i] as number) * Math.exp(0.3 * (r[b + 9] as number)) + (r[b + 10] as number);
    oClientLatency[i] = client;
    oTail[i] = 1 + 0.5 * p.tailSigma * Math.abs(r[b + 11] as number) + (dTailExtra[i] as number);
    oPoolUse[i] = poolUse;
    oPoolPending[i] = overflow * p.poolSize * 3 + (r[b + 12] as number);
    oPoolWait[i] = poolWait;
    oThreads[i] = 40 + 30 * cpu + 60 * poolUse;
  }
}

/** Same value bit for bit (so +0 and -0 differ, and NaN is never taken as equal: recomputed). */
const isSameBits = (a: number, b: number): boolean => a === b && (a !== 0 || 1 / a === 1 / b);

/** 1 at every step where any driver of `a` and `b` differs, else 0. */
function markDifferingSteps(a: Drivers, b: Drivers, n: number): Uint8Array {
  if (differsScratch.length < n) differsScratch = new Uint8Array(2 * n);
  const differs = differsScratch.subarray(0, n);
  differs.fill(0);
  for (const key of DRIVER_KEYS) {
    const x = a[key];
    const y = b[key];
    for (let i = 0; i < n; i += 1) if (!isSameBits(x[i] as number, y[i] as number)) differs[i] = 1;
  }
  return differs;
}

/**
 * Derives every observable from the drivers. Couplings (all deliberately simple):
 * CPU demand = base + per-request work + GC burn; utilisation is capped by what steal leaves;
 * latency grows with CPU and disk utilisation as 1/(1-ρ) beyond a knee; the pool fills with
 * traffic × hold time; errors rise from timeouts when latency explodes.
 */
export function deriveObservables(p: ServiceParams, d: Drivers, baseTraffic: Float64Array, rng: Random, stepMs: number, options: DeriveOptions = {}): Observables {
  return deriveBoth(p, d, undefined, baseTraffic, rng, stepMs, options).faulted;
}

/** Savings for a caller that reads the observables at once (renderSystem with reuseBuffers). */
export interface DeriveOptions {
  /** The observables are views of reused buffers, valid until the next render. */
  readonly intoScratch?: boolean;
  /**
   * The only observables anyone reads; groups of others that cost an exp or a pow are then not
   * computed and hold NaN. Every draw is still taken, so the others are unchanged bit for bit.
   */
  readonly needed?: ReadonlySet<ObservableKey>;
  /**
   * Steps [from, to) of the counterfactual that anyone reads; outside them it is left unspecified
   * (only uptime and restarts, which carry state, are always complete).
   */
  readonly counterfactualSteps?: readonly [number, number];
}

/**
 * deriveObservables for `d` (`faulted`) and for `quietDrivers` (`counterfactual`) from the same
 * noise: exactly what two runs from one generator state would give, and the generator ends where
 * the faulted run alone leaves it. The noise is drawn once; the counterfactual is computed only at
 * steps where the drivers differ (elsewhere every observable but uptime and restarts is the same
 * function of the same inputs) and copied from the faulted run at the others.
 */
export function deriveObservablesWithCounterfactual(p: ServiceParams, d: Drivers, quietDrivers: Drivers, baseTraffic: Float64Array, rng: Random, stepMs: number, options: DeriveOptions = {}): { faulted: Observables; counterfactual: Observables } {
  const both = deriveBoth(p, d, quietDrivers, baseTraffic, rng, stepMs, options);
  return { faulted: both.faulted, counterfactual: both.counterfactual as Observables };
}

function deriveBoth(p: ServiceParams, d: Drivers, qd: Drivers | undefined, baseTraffic: Float64Array, rng: Random, stepMs: number, options: DeriveOptions): { faulted: Observables; counterfactual?: Observables } {
  const n = baseTraffic.length;
  const intoScratch = options.intoScratch === true;
  const needs = findStepNeeds(options.needed);
  const observablesSize = OBSERVABLE_KEYS.length * n;
  const o = createObservables(n, intoScratch ? borrowScratch(ScratchSlot.Faulted, observablesSize) : undefined);
  const phi = Math.min(0.995, Math.exp(-stepMs / 300_000));
  const scratch = borrowScratch(ScratchSlot.Noise, 4 * n);
  const cpuNoise = drawAr1(rng, n, phi, p.cpuNoiseSigma, scratch.subarray(0, n));
  const memNoise = drawAr1(rng, n, Math.min(0.999, Math.exp(-stepMs / 1_800_000)), p.memNoiseSigma, scratch.subarray(n, 2 * n));
  const diskNoise = drawAr1(rng, n, phi, 0.15, scratch.subarray(2 * n, 3 * n));
  // Slow wander of per-request cost, independent of traffic: long baselines are not flat.
  const slow = drawAr1(rng, n, Math.min(0.9995, Math.exp(-stepMs / 14_400_000)), p.slowDriftSigma, scratch.subarray(3 * n, 4 * n));
  const noise: StepNoise = { baseTraffic, cpu: cpuNoise, mem: memNoise, disk: diskNoise, slow };
  const stepS = stepMs / 1000;
  let uptimeS = rng.uniform(3600, 40 * 86400);
  let restarts = rng.int(0, 6);
  const q = qd ? createObservables(n, intoScratch ? borrowScratch(ScratchSlot.Counterfactual, observablesSize) : undefined) : undefined;
  const differs = qd ? markDifferingSteps(d, qd, n) : undefined;
  const quietFrom = Math.max(0, options.counterfactualSteps?.[0] ?? 0);
  const quietTo = Math.min(n, options.counterfactualSteps?.[1] ?? n);
  let quietUptimeS = uptimeS;
  let quietRestarts = restarts;
  const r = borrowScratch(ScratchSlot.Draws, DRAWS_PER_STEP * n);
  const u = new Float64Array(DRAWS_PER_STEP);
  for (const [group, keys] of SKIPPABLE) {
    if (needs[group]) continue;
    for (const key of keys) {
      o[key].fill(Number.NaN);
      q?.[key].fill(Number.NaN);
    }
  }
  // All draws first (in step order, as always), then the observables from them.
  for (let i = 0; i < n; i += 1) drawStep(rng, u, r, DRAWS_PER_STEP * i, needs);
  writeSteps(p, d, noise, r, o, needs, 0, n);
  const restartDriver = d.restart;
  const quietRestartDriver = qd?.restart;
  for (let i = 0; i < n; i += 1) {
    // Drawn on every step, so the number of draws does not depend on the drivers: a counterfactual
    // run without the fault (same generator state) then sees exactly the same noise.
    const restartDraw = r[DRAWS_PER_STEP * i + 5] as number;
    if ((restartDriver[i] as number) > 0) {
      uptimeS = stepS * restartDraw;
      restarts += 1;
    } else {
      uptimeS += stepS;
    }
    o.uptime[i] = uptimeS;
    o.restarts[i] = restarts;
    if (q && quietRestartDriver) {
      if ((quietRestartDriver[i] as number) > 0) {
        quietUptimeS = stepS * restartDraw;
        quietRestarts += 1;
      } else {
        quietUptimeS += stepS;
      }
      q.uptime[i] = quietUptimeS;
      q.restarts[i] = quietRestarts;
    }
  }
  if (q && qd && differs) {
    // The counterfactual at the runs of steps (inside its range) where the drivers differ.
    for (let a = quietFrom; a < quietTo;) {
      if (differs[a] === 0) {
        a += 1;
        continue;
      }
      let b = a;
      while (b < quietTo && differs[b] === 1) b += 1;
      writeSteps(p, qd, noise, r, q, needs, a, b);
      a = b;
    }
  }
  if (q && differs) copyUnchangedSteps(o, q, differs, quietFrom, quietTo);
  return q ? { faulted: o, counterfactual: q } : { faulted: o };
}

/** Copies every observable but uptime and restarts from `from` to `to` over the runs of steps in [first, end) where `differs` is 0. */
function copyUnchangedSteps(from: Observables, to: Observables, differs: Uint8Array, first: number, end: number): void {
  const n = end;
  for (let a = first; a < n;) {
    if (differs[a] === 1) {
      a += 1;
      continue;
    }
    let b = a;
    while (b < n && differs[b] === 0) b += 1;
    for (const key of OBSERVABLE_KEYS) {
      if (key === 'uptime' || key === 'restarts') continue;
      to[key].set(from[key].subarray(a, b), a);
    }
    a = b;
  }
}
