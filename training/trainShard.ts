/**
 * One shard of a training batch: the summed gradient of a contiguous run of the epoch's example
 * order. The same function runs in the training thread and in worker threads, on a dataset and
 * weights held in shared memory, so where a shard runs never changes its numbers.
 */
import type { EncodedExample } from './buildDataset';
import { createRandom, type SetModelShape, type SetModelWeights } from './setModel';
import { accumulateExampleGradient, GradientWorkspace, PARAM_NAMES, type GradSet, type ParamSet } from './setModelGradient';
import { mixSeeds } from './simulator/random';

/** Encoded examples packed into a few (shared) arrays; example i owns nodes [nodeStart[i], nodeStart[i+1]). */
export interface PackedDataset {
  readonly featureCount: number;
  readonly features: Float32Array;
  readonly familyIds: Int32Array;
  readonly mask: Float32Array;
  readonly nodeStart: Int32Array;
  readonly labels: Int32Array;
}

function allocate<T extends Float32Array | Int32Array>(Type: { new (buffer: SharedArrayBuffer): T; readonly BYTES_PER_ELEMENT: number }, length: number): T {
  return new Type(new SharedArrayBuffer(Math.max(1, length) * Type.BYTES_PER_ELEMENT));
}

export function packDataset(examples: readonly EncodedExample[], featureCount: number): PackedDataset {
  const nodeStart = allocate(Int32Array, examples.length + 1);
  examples.forEach((ex, i) => { nodeStart[i + 1] = nodeStart[i] + ex.mask.length; });
  const nodeCount = nodeStart[examples.length];
  const features = allocate(Float32Array, nodeCount * featureCount);
  const familyIds = allocate(Int32Array, nodeCount);
  const mask = allocate(Float32Array, nodeCount);
  const labels = allocate(Int32Array, examples.length);
  examples.forEach((ex, i) => {
    features.set(ex.features, nodeStart[i] * featureCount);
    familyIds.set(ex.familyIds, nodeStart[i]);
    mask.set(ex.mask, nodeStart[i]);
    labels[i] = ex.label;
  });
  return { featureCount, features, familyIds, mask, nodeStart, labels };
}

function unpackExample(data: PackedDataset, i: number): EncodedExample {
  const from = data.nodeStart[i];
  const to = data.nodeStart[i + 1];
  return {
    features: data.features.subarray(from * data.featureCount, to * data.featureCount),
    familyIds: data.familyIds.subarray(from, to),
    mask: data.mask.subarray(from, to),
    label: data.labels[i],
    systemId: '',
  };
}

/** Everything a shard needs; plain data and shared arrays, so it can be posted to a worker. */
export interface ShardContext {
  readonly shape: SetModelShape;
  readonly featureMean: Float32Array;
  readonly featureStd: Float32Array;
  /** The live weights (shared memory when workers run shards). */
  readonly params: ParamSet;
  readonly data: PackedDataset;
  /** The current epoch's order of example indices (shared). */
  readonly order: Int32Array;
  readonly seed: number;
  readonly nodeDropoutRate: number;
  readonly classWeights?: Float64Array;
}

/**
 * Random metric dropout for one example at one place of one epoch: with probability `rate`, keep
 * each usable metric with a probability drawn from [0.2, 1), and always keep at least one so the
 * label still has evidence behind it. Seeded per (seed, epoch, position), so shards agree wherever
 * they run.
 */
export function thinMask(mask: Float32Array, random: () => number, rate: number, out: Float32Array): Float32Array {
  if (random() >= rate) return mask;
  const keep = 0.2 + 0.8 * random();
  let kept = 0;
  let usable = 0;
  for (let n = 0; n < mask.length; n++) {
    out[n] = mask[n] > 0 && random() < keep ? 1 : 0;
    kept += out[n];
    if (mask[n] > 0) usable++;
  }
  if (kept === 0 && usable > 0) {
    let pick = Math.floor(random() * usable);
    for (let n = 0; n < mask.length; n++) if (mask[n] > 0 && pick-- === 0) out[n] = 1;
  }
  return out;
}

/** Per-thread state of shard computation. */
export interface ShardRunner {
  /** Zero `g`, then add the gradient of order positions [from, to) scaled by `scale`; returns the summed loss. */
  run(epoch: number, from: number, to: number, scale: number, g: GradSet): number;
}

export function createShardRunner(context: ShardContext): ShardRunner {
  const weights: SetModelWeights = { shape: context.shape, featureMean: context.featureMean, featureStd: context.featureStd, ...context.params };
  const workspace = new GradientWorkspace(context.shape);
  let thinned = new Float32Array(0);
  return {
    run(epoch, from, to, scale, g) {
      for (const name of PARAM_NAMES) g[name].fill(0);
      let loss = 0;
      for (let position = from; position < to; position++) {
        const index = context.order[position];
        const ex = unpackExample(context.data, index);
        if (thinned.length < ex.mask.length) thinned = new Float32Array(2 * ex.mask.length);
        const random = createRandom(mixSeeds(context.seed, epoch, position, 0x7d1));
        const mask = thinMask(ex.mask, random, context.nodeDropoutRate, thinned.subarray(0, ex.mask.length));
        const weight = context.classWeights ? context.classWeights[ex.label] : 1;
        loss += accumulateExampleGradient(weights, ex, mask, g, scale, weight, workspace);
      }
      return loss;
    },
  };
}
