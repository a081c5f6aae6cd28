/**
 * One shard of a training batch: the summed gradient of a contiguous run of the epoch's example
 * order. The same function runs in the training thread and in worker threads, on a dataset and
 * weights held in shared memory, so where a shard runs never changes its numbers.
 */
import { createRandom, type SetModelShape, type SetModelWeights } from './setModel';
import { accumulateExampleGradient, GradientWorkspace, PARAM_NAMES, type GradSet, type ParamSet } from './setModelGradient';
import { mixSeeds } from './simulator/random';
import { viewPackedExample, type PackedChunk } from './packEncodedChunk';

/** Everything a shard needs; plain data and shared arrays, so it can be posted to a worker. */
export interface ShardContext {
  readonly shape: SetModelShape;
  readonly featureMean: Float32Array;
  readonly featureStd: Float32Array;
  /** The live weights (shared memory when workers run shards). */
  readonly params: ParamSet;
  readonly data: PackedChunk;
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
        const ex = viewPackedExample(context.data, index);
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
