/**
 * The state arrays of the latent model: driver and observable keys, their fixed-shape records over
 * one buffer each, and the reusable scratch buffers a render borrows (so thousands of renders do
 * not allocate thousands of arrays).
 */
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

/**
 * Reusable buffers for arrays that live only during one render (the simulator is synchronous and
 * never re-entered): fresh arrays of this size each cost an off-heap allocation, zeroing, and
 * collector work, and land at new addresses that evict the normal table from the cache.
 * Returns a buffer of at least `length` values whose contents are unspecified; `slot` names the
 * use (two uses alive at once must take different slots).
 */
export function borrowScratch(slot: ScratchSlot, length: number): Float64Array {
  let buffer = scratchBuffers[slot];
  if (!buffer || buffer.length < length) {
    buffer = new Float64Array(Math.max(length, 2 * (buffer?.length ?? 0), 1024));
    scratchBuffers[slot] = buffer;
  }
  return buffer;
}
/** Scratch users: each a distinct buffer. */
export const ScratchSlot = { Drivers: 0, QuietDrivers: 1, Traffic: 2, Noise: 3, Faulted: 4, Counterfactual: 5, Series: 6, Times: 7, Uniforms: 8, Draws: 9 } as const;
export type ScratchSlot = (typeof ScratchSlot)[keyof typeof ScratchSlot];
const scratchBuffers: Array<Float64Array | undefined> = [];

/** Fresh drivers for `n` steps: scales at 1, extras at 0 (in the first 15·n values of `buffer` when given). */
export function createDrivers(n: number, buffer?: Float64Array): Drivers {
  const size = DRIVER_KEYS.length * n;
  const store = buffer ? buffer.subarray(0, size) : new Float64Array(size);
  if (buffer) store.fill(0);
  const d = viewDrivers(store, n);
  d.trafficScale.fill(1);
  d.cpuScale.fill(1);
  d.latencyScale.fill(1);
  d.poolHold.fill(1);
  return d;
}

/**
 * Drivers as views of one buffer of DRIVER_KEYS.length × n values. One allocation instead of
 * fifteen (each typed array of this size gets its own off-heap store, costly to make and free),
 * and an object literal, which V8 keeps in fast (hidden-class) mode for the per-step loops.
 */
function viewDrivers(buffer: Float64Array, n: number): Drivers {
  let k = 0;
  const v = (): Float64Array => buffer.subarray(n * k, n * ++k);
  return {
    trafficScale: v(), cpuExtra: v(), cpuScale: v(), steal: v(), memExtra: v(), memLeak: v(), diskExtra: v(),
    callerDelayS: v(), dependencyDelayS: v(), lossFraction: v(), errorExtra: v(), latencyScale: v(),
    poolHold: v(), restart: v(), tailExtra: v(),
  };
}

/** Copies of every driver series (in the first 15·n values of `buffer` when given). */
export function copyDrivers(d: Drivers, buffer?: Float64Array): Drivers {
  const n = d.trafficScale.length;
  const size = DRIVER_KEYS.length * n;
  const out = viewDrivers(buffer ? buffer.subarray(0, size) : new Float64Array(size), n);
  for (const key of DRIVER_KEYS) out[key].set(d[key]);
  return out;
}

/**
 * Zeroed observables for `n` steps, views of one buffer (one allocation instead of 31); with
 * `store`, views of its first 31·n values, not zeroed. An object literal, not keys added in a
 * loop: V8 turns an object grown by more than a dozen computed-key stores into a hash table, and
 * every `o.cpu[i]` in the render loops then becomes a lookup.
 */
export function createObservables(n: number, store?: Float64Array): Observables {
  const buffer = store ?? new Float64Array(OBSERVABLE_KEYS.length * n);
  let k = 0;
  const z = (): Float64Array => buffer.subarray(n * k, n * ++k);
  return {
    traffic: z(), cpu: z(), steal: z(), iowait: z(), idle: z(), load: z(), throttle: z(), mem: z(), memAvailable: z(), gc: z(),
    diskBusy: z(), diskQueue: z(), diskLatency: z(), diskBytes: z(), netBytes: z(), retrans: z(), drops: z(),
    serverLatency: z(), clientLatency: z(), callerLatency: z(), tail: z(), errorRatio: z(), successRatio: z(),
    errorRate: z(), poolUse: z(), poolPending: z(), poolWait: z(), uptime: z(), restarts: z(), threads: z(), inflight: z(),
  };
}
