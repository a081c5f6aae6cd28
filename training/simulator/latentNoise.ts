/**
 * The random draws behind one simulated service: AR(1) noise, the base traffic with its daily
 * cycle, and each step's fixed set of draws (latentModel.ts turns them into observables). The
 * number and order of draws never depend on the drivers, so a counterfactual without the fault
 * sees exactly the same noise.
 */
import { normalFromUniform, studentT2FromUniform, type Random } from './random';
import { borrowScratch, ScratchSlot, type ObservableKey } from './latentState';
import type { ServiceParams } from './serviceParams';

/** AR(1) noise with stationary standard deviation `sigma` (phi = memory per step), into `out` (length >= n) when given. */
export function drawAr1(rng: Random, n: number, phi: number, sigma: number, out: Float64Array = new Float64Array(n)): Float64Array {
  const innovation = sigma * Math.sqrt(1 - phi * phi);
  // The n + 1 normals in one call (the start, then one innovation per step), same order as one by one.
  const z = normalScratch(n + 1);
  rng.fillNormal(z, 0, n + 1);
  let x = (z[0] as number) * sigma;
  for (let i = 0; i < n; i += 1) {
    x = phi * x + innovation * (z[i + 1] as number);
    out[i] = x;
  }
  return out;
}

let normalScratchBuffer = new Float64Array(1024);
/** A module-level scratch of at least `length` values (the draws are consumed before any other use). */
function normalScratch(length: number): Float64Array {
  if (normalScratchBuffer.length < length) normalScratchBuffer = new Float64Array(Math.max(length, 2 * normalScratchBuffer.length));
  return normalScratchBuffer;
}

const DAY_MS = 86_400_000;

/**
 * Daily traffic cycle times slow AR noise, before any fault scaling; requests per second. With
 * `intoScratch` the result is a view of a reused buffer, valid until the next render.
 */
export function drawBaseTraffic(p: ServiceParams, rng: Random, timesMs: Float64Array, stepMs: number, intoScratch = false): Float64Array {
  const n = timesMs.length;
  // Noise memory of about 10 minutes whatever the step, so 1 s and 5 min grids both look real.
  const phi = Math.exp(-stepMs / 600_000);
  const scratch = borrowScratch(ScratchSlot.Traffic, 3 * n);
  const ar = drawAr1(rng, n, Math.min(phi, 0.999), p.trafficNoiseSigma, scratch.subarray(0, n));
  const slow = drawAr1(rng, n, Math.min(0.9995, Math.exp(-stepMs / 14_400_000)), p.slowDriftSigma, scratch.subarray(n, 2 * n));
  const out = intoScratch ? scratch.subarray(2 * n, 3 * n) : new Float64Array(n);
  for (let i = 0; i < n; i += 1) {
    const angle = (2 * Math.PI * (timesMs[i] as number)) / DAY_MS + p.dailyPhaseRad;
    const cycle = 1 + p.dailyAmplitude * Math.sin(angle) + 0.3 * p.dailyAmplitude * Math.sin(2 * angle + 1);
    out[i] = p.requestRatePerS * Math.max(0.05, cycle) * Math.exp((ar[i] as number) + (slow[i] as number));
  }
  return out;
}

/** Random draws of one step, in the order the step has always taken them (see drawStep). */
export const DRAWS_PER_STEP = 13;

/**
 * Takes one step's random draws: 13 uniforms in one call (plus one when the 1 % stray-drops
 * chance hits), turned into normals etc. exactly as the generator's own methods turn them. The
 * count and order never depend on the drivers, so a counterfactual without the fault sees exactly
 * the same noise, and the draws can be taken once and used for both. `u` is scratch (13 values);
 * the step's values go to r[b..b + 13).
 */
export function drawStep(rng: Random, u: Float64Array, r: Float64Array, b: number, needs: StepNeeds): void {
  rng.fillUniform(u, 0, DRAWS_PER_STEP);
  // Every uniform is drawn; a normal is looked up only when an observable that is read uses it.
  r[b] = normalFromUniform(u[0] as number); // steal jitter
  r[b + 1] = u[1] as number; // usable share of capacity
  r[b + 2] = u[2] as number; // iowait spread
  r[b + 3] = u[3] as number; // pool wait jitter, drawn always
  r[b + 4] = needs.errors ? normalFromUniform(u[4] as number) : 0; // error ratio noise
  r[b + 5] = u[5] as number; // time since a restart
  r[b + 6] = needs.iowait ? normalFromUniform(u[6] as number) : 0; // load noise
  r[b + 7] = u[7] as number; // throttle spread
  r[b + 8] = needs.retrans ? normalFromUniform(u[8] as number) : 0; // retransmit noise
  r[b + 9] = needs.drops ? normalFromUniform(u[9] as number) : 0; // drop noise
  if ((u[10] as number) < 0.01) {
    // Stray drops: uniform(0, 3) takes the next draw, which shifts the last two by one.
    r[b + 10] = 0 + (3 - 0) * (u[11] as number);
    r[b + 11] = studentT2FromUniform(u[12] as number);
    r[b + 12] = rng.next() < 0.02 ? 1 : 0;
  } else {
    r[b + 10] = 0;
    r[b + 11] = studentT2FromUniform(u[11] as number); // latency tail
    r[b + 12] = (u[12] as number) < 0.02 ? 1 : 0; // stray pending connection
  }
}

/**
 * Which costly observable groups some reader uses. A group nobody reads is not computed (its
 * arrays hold NaN); its draws are still taken, so the generator sequence is unchanged.
 */
export interface StepNeeds {
  /** iowait, idle, load (iowait takes a pow). */
  readonly iowait: boolean;
  /** errorRatio, successRatio, errorRate (an exp, and the server latency). */
  readonly errors: boolean;
  /** serverLatency, callerLatency, inflight, or the error group (an exp). */
  readonly server: boolean;
  readonly retrans: boolean;
  readonly drops: boolean;
}
const ALL_NEEDED: StepNeeds = { iowait: true, errors: true, server: true, retrans: true, drops: true };

/** The groups of observables that `needed` reads; all when `needed` is undefined. */
export function findStepNeeds(needed: ReadonlySet<ObservableKey> | undefined): StepNeeds {
  if (!needed) return ALL_NEEDED;
  const errors = needed.has('errorRatio') || needed.has('successRatio') || needed.has('errorRate');
  return {
    iowait: needed.has('iowait') || needed.has('idle') || needed.has('load'),
    errors,
    server: errors || needed.has('serverLatency') || needed.has('callerLatency') || needed.has('inflight'),
    retrans: needed.has('retrans'),
    drops: needed.has('drops'),
  };
}

/** Observable arrays of the groups `needs` leaves out, which writeStep does not write. */
export const SKIPPABLE: ReadonlyArray<readonly [keyof StepNeeds, readonly ObservableKey[]]> = [
  ['iowait', ['iowait', 'idle', 'load']],
  ['errors', ['errorRatio', 'successRatio', 'errorRate']],
  ['server', ['serverLatency', 'callerLatency', 'inflight']],
  ['retrans', ['retrans']],
  ['drops', ['drops']],
];
