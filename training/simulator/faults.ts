/**
 * Fault injection on the drivers of the latent model (REFERENCE.md §5 signatures). Each fault
 * gets a random intensity and onset shape; most carry side effects in other families, and some
 * effects are switched off at random so that partial signatures are common (vantage points).
 */
import type { ServiceParams, Drivers, DriverKey } from './latentModel';
import type { Random } from './random';
import type { SimClass } from './types';

/** Where and how hard one fault acts; indices are inclusive grid indices. */
export interface FaultPlan {
  readonly label: SimClass;
  readonly startIndex: number;
  readonly endIndex: number;
  /** 0..1; weak faults (< 0.4) are deliberately common. */
  readonly intensity: number;
}

/** Envelope 0..1 over the incident: ramp-in of random length, plateau, quick release. */
export function drawEnvelope(rng: Random, n: number, start: number, end: number): Float64Array {
  const env = new Float64Array(n);
  const duration = end - start + 1;
  const rampSteps = rng.chance(0.5) ? 0 : Math.floor(rng.uniform(0, 0.4) * duration);
  for (let i = Math.max(0, start); i <= Math.min(n - 1, end); i += 1) {
    const k = i - start;
    env[i] = rampSteps > 0 && k < rampSteps ? (k + 1) / (rampSteps + 1) : 1;
  }
  // A short tail after the end: recovery is rarely instantaneous.
  const tailSteps = rng.int(0, 3);
  for (let k = 1; k <= tailSteps && end + k < n; k += 1) env[end + k] = Math.max(env[end + k] as number, 1 - k / (tailSteps + 1));
  return env;
}

const add = (d: Drivers, key: DriverKey, env: Float64Array, amount: number): void => {
  const arr = d[key];
  for (let i = 0; i < env.length; i += 1) arr[i] = (arr[i] as number) + (env[i] as number) * amount;
};
const scale = (d: Drivers, key: DriverKey, env: Float64Array, factor: number): void => {
  const arr = d[key];
  for (let i = 0; i < env.length; i += 1) arr[i] = (arr[i] as number) * (1 + (env[i] as number) * (factor - 1));
};

/**
 * A random unrelated change during the incident, so side movements are not themselves a label.
 * It is a coincidence, not part of the fault: it goes into every driver set given, so a
 * counterfactual without the fault still holds it and the fault's evidence never rests on it.
 */
function addSecondaryChange(targets: readonly Drivers[], env: Float64Array, rng: Random): void {
  const choice = rng.int(0, 4);
  const size = rng.uniform(0.05, 0.3);
  const sign = choice === 0 || choice === 3 ? rng.chance(0.5) : true;
  for (const d of targets) {
    if (choice === 0) add(d, 'memExtra', env, size * (sign ? 1 : -0.5));
    else if (choice === 1) add(d, 'cpuExtra', env, size * 0.4);
    else if (choice === 2) add(d, 'diskExtra', env, size * 0.5);
    else if (choice === 3) scale(d, 'trafficScale', env, 1 + size * (sign ? 1 : -0.6));
    else add(d, 'errorExtra', env, size * 0.02);
  }
}

/**
 * Applies one fault to the drivers in place. `counterfactual`, when given, is the same system
 * without the fault: it receives the fault's coincidental secondary change only.
 */
export function applyFault(d: Drivers, plan: FaultPlan, p: ServiceParams, rng: Random, counterfactual?: Drivers): void {
  const n = d.trafficScale.length;
  const env = drawEnvelope(rng, n, plan.startIndex, plan.endIndex);
  const I = plan.intensity;
  switch (plan.label) {
    case 'normal':
      return;
    case 'cpu_saturation':
      add(d, 'cpuExtra', env, (0.5 + 0.8 * I) * rng.uniform(0.8, 1.2));
      if (rng.chance(0.5)) add(d, 'memExtra', env, rng.uniform(0.01, 0.08)); // stressors allocate too
      break;
    case 'memory_leak':
      applyMemoryLeak(d, plan, p, rng);
      break;
    case 'disk_io_saturation':
      add(d, 'diskExtra', env, 0.4 + 0.8 * I);
      if (rng.chance(0.4)) add(d, 'cpuExtra', env, rng.uniform(0.01, 0.06));
      break;
    case 'network_latency': {
      const delayS = p.serverLatencyS * (1 + 12 * I) * rng.uniform(0.5, 1.5);
      // Vantage point: the delay sits either between callers and us or between us and our dependency.
      if (rng.chance(0.5)) add(d, 'callerDelayS', env, delayS);
      else add(d, 'dependencyDelayS', env, delayS * 0.6);
      if (rng.chance(0.25)) add(d, 'lossFraction', env, rng.uniform(0, 0.002));
      if (rng.chance(0.4)) scale(d, 'cpuScale', env, rng.uniform(0.85, 1));
      break;
    }
    case 'packet_loss': {
      const loss = 0.004 + 0.05 * I * rng.next();
      add(d, 'lossFraction', env, loss);
      const tail = d.tailExtra;
      for (let i = 0; i < n; i += 1) {
        // Retransmission timeouts: intermittent spikes in the tail, not a level shift.
        if ((env[i] as number) > 0 && rng.chance(Math.min(0.9, 0.3 + 10 * loss))) tail[i] = (tail[i] as number) + rng.uniform(1, 6 + 60 * loss);
      }
      if (rng.chance(0.5)) scale(d, 'trafficScale', env, rng.uniform(0.85, 1));
      break;
    }
    case 'traffic_surge':
      applySurge(d, plan, rng);
      break;
    case 'error_storm':
      applyErrorStorm(d, plan, env, rng);
      break;
    case 'connection_pool_exhaustion':
      scale(d, 'poolHold', env, (1 / Math.max(0.05, p.poolBaseRatio)) * (1.2 + 1.5 * I));
      if (rng.chance(0.6)) scale(d, 'cpuScale', env, rng.uniform(0.7, 0.95));
      add(d, 'dependencyDelayS', env, p.dependencyLatencyS * rng.uniform(0, 2));
      break;
    case 'cpu_steal_noisy_neighbour':
      add(d, 'steal', env, 0.08 + 0.35 * I);
      break;
  }
  if (rng.chance(0.45)) addSecondaryChange(counterfactual ? [d, counterfactual] : [d], env, rng);
}

function applyMemoryLeak(d: Drivers, plan: FaultPlan, p: ServiceParams, rng: Random): void {
  const n = d.memLeak.length;
  const headroom = 0.99 - p.memBaseRatio;
  const peak = headroom * (0.5 + 0.5 * plan.intensity);
  const duration = plan.endIndex - plan.startIndex + 1;
  // Sawtooth: collections free part of the heap, but the floor keeps rising.
  const cycleSteps = Math.max(2, Math.floor(duration / rng.int(2, 8)));
  const freed = rng.uniform(0, 0.5) * peak / Math.max(1, duration / cycleSteps);
  const endsInOom = rng.chance(0.75);
  for (let i = plan.startIndex; i <= plan.endIndex && i < n; i += 1) {
    const k = i - plan.startIndex;
    const floor = (peak * (k + 1)) / duration;
    d.memLeak[i] = (d.memLeak[i] as number) + floor - ((k % cycleSteps) === cycleSteps - 1 ? freed : 0);
  }
  if (endsInOom && plan.endIndex + 1 < n) {
    d.restart[plan.endIndex + 1] = 1;
    for (let k = 1; k <= 3 && plan.endIndex + k < n; k += 1) d.errorExtra[plan.endIndex + k] = (d.errorExtra[plan.endIndex + k] as number) + 0.2 / k;
  }
}

function applySurge(d: Drivers, plan: FaultPlan, rng: Random): void {
  const n = d.trafficScale.length;
  const factor = 1.6 + 3 * plan.intensity * rng.uniform(0.6, 1.2);
  const duration = plan.endIndex - plan.startIndex + 1;
  const rampSteps = Math.floor(duration * rng.uniform(0, 0.5));
  for (let i = plan.startIndex; i <= plan.endIndex && i < n; i += 1) {
    const k = i - plan.startIndex;
    const e = rampSteps > 0 && k < rampSteps ? (k + 1) / (rampSteps + 1) : 1;
    d.trafficScale[i] = (d.trafficScale[i] as number) * (1 + e * (factor - 1));
  }
}

function applyErrorStorm(d: Drivers, plan: FaultPlan, env: Float64Array, rng: Random): void {
  const n = d.restart.length;
  // Typically right after a deploy: the new version starts, then fails fast.
  const deployAt = plan.startIndex - rng.int(0, 2);
  if (deployAt >= 0 && deployAt < n && rng.chance(0.7)) d.restart[deployAt] = 1;
  const errorShare = 0.03 + 0.6 * plan.intensity * Math.sqrt(rng.next());
  add(d, 'errorExtra', env, errorShare);
  // Failed requests return fast, so the latency of all requests often drops.
  if (rng.chance(0.6)) scale(d, 'latencyScale', env, Math.max(0.2, 1 - 1.5 * errorShare * rng.uniform(0.5, 1)));
  if (rng.chance(0.5)) scale(d, 'trafficScale', env, 1 + errorShare * rng.uniform(0.2, 1.2)); // retries
  if (rng.chance(0.3)) scale(d, 'cpuScale', env, rng.uniform(0.85, 1.05));
}
