/**
 * One shard of a GRU training batch: the summed gradient of a contiguous run of the epoch's example
 * order. The same function runs in the training thread and in worker threads (gruWorker.ts), on
 * encodings and weights held in shared memory, so where a shard runs never changes its numbers.
 */
import type { NodeBatch } from '../../extension/core/model/types';
import { accumulateGruGradient, GruWorkspace } from './gruNetwork';
import type { GruBlock, GruShape } from './gruParameters';

/** Single-example encodings packed into shared arrays; example i owns nodes [nodeStart[i], nodeStart[i+1]). */
export interface PackedGruData {
  readonly rowLength: number;
  readonly values: Float32Array;
  readonly families: BigInt64Array;
  readonly mask: Float32Array;
  readonly nodeStart: Int32Array;
  readonly labels: Int32Array;
}

/** What a shard needs: the shared weights, data, epoch order and class weights. */
export interface GruShardContext {
  readonly shape: GruShape;
  readonly offsets: Readonly<Record<GruBlock, number>>;
  /** The parameters, in shared memory so that every thread sees each update. */
  readonly values: Float32Array;
  readonly data: PackedGruData;
  /** Example indices in this epoch's order (shared; the trainer reshuffles it in place). */
  readonly order: Int32Array;
  readonly classWeights: Float32Array;
}

function share<T>(Type: { new (buffer: SharedArrayBuffer): T; readonly BYTES_PER_ELEMENT: number }, length: number): T {
  return new Type(new SharedArrayBuffer(Math.max(1, length) * Type.BYTES_PER_ELEMENT));
}

/**
 * Packs single-example encodings (batch size 1, as encodeBatch returns for one example) and their
 * labels into shared memory. Throws when an encoding holds more than one example (programmer error).
 */
export function packGruData(examples: readonly NodeBatch[], labels: Int32Array): PackedGruData {
  const rowLength = examples.length > 0 ? examples[0].windowLength : 0;
  const nodeStart = share(Int32Array, examples.length + 1);
  examples.forEach((ex, i) => {
    if (ex.batchSize !== 1) throw new Error(`expected encoded example ${i} to have batch size 1, got ${ex.batchSize}`);
    nodeStart[i + 1] = nodeStart[i] + ex.nodeCount;
  });
  const nodeCount = nodeStart[examples.length];
  const data = {
    rowLength, nodeStart, values: share(Float32Array, nodeCount * rowLength), families: share(BigInt64Array, nodeCount),
    mask: share(Float32Array, nodeCount), labels: share(Int32Array, examples.length),
  };
  examples.forEach((ex, i) => {
    data.values.set(ex.values, nodeStart[i] * rowLength);
    data.families.set(ex.families, nodeStart[i]);
    data.mask.set(ex.mask, nodeStart[i]);
    data.labels[i] = labels[i];
  });
  return data;
}

/** Example `i` of packed data as a NodeBatch of one example (views, no copies). */
export function viewGruExample(data: PackedGruData, i: number): NodeBatch {
  const from = data.nodeStart[i];
  const to = data.nodeStart[i + 1];
  return {
    batchSize: 1, nodeCount: to - from, windowLength: data.rowLength,
    values: data.values.subarray(from * data.rowLength, to * data.rowLength),
    families: data.families.subarray(from, to), mask: data.mask.subarray(from, to),
  };
}

/** Per-thread state of shard computation. */
export interface GruShardRunner {
  /** Zeroes `g`, then adds the gradient of order positions [from, to), each example's loss times its class weight and `scale`; returns that summed loss. */
  run(from: number, to: number, scale: number, g: Float64Array): number;
}

export function createGruShardRunner(context: GruShardContext): GruShardRunner {
  const p = { shape: context.shape, offsets: context.offsets, values: context.values };
  const workspace = new GruWorkspace(context.shape);
  const { data, order, classWeights } = context;
  return {
    run(from, to, scale, g) {
      g.fill(0);
      let loss = 0;
      for (let position = from; position < to; position++) {
        const i = order[position];
        const label = data.labels[i];
        loss += accumulateGruGradient(p, viewGruExample(data, i), 0, label, classWeights[label] * scale, g, workspace);
      }
      return loss;
    },
  };
}
