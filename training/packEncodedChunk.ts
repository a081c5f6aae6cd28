/**
 * Encoded examples as a few flat arrays: to move a chunk between threads without copying each
 * example's arrays (transferable), or to share a dataset with worker threads (shared memory).
 * Unpacking gives views into them.
 */
import { NODE_FEATURE_COUNT } from '../extension/core/model/temporalFeatures';
import type { EncodedExample } from './buildDataset';

export interface PackedChunk {
  readonly featureCount: number;
  readonly features: Float32Array;
  readonly familyIds: Int32Array;
  readonly mask: Float32Array;
  /** Example i owns nodes [nodeStart[i], nodeStart[i + 1]). */
  readonly nodeStart: Int32Array;
  readonly labels: Int32Array;
  readonly systemIds: readonly string[];
}

function allocate<T extends Float32Array | Int32Array>(Type: { new (length: number): T; new (buffer: SharedArrayBuffer): T; readonly BYTES_PER_ELEMENT: number }, length: number, isShared: boolean): T {
  return isShared ? new Type(new SharedArrayBuffer(length * Type.BYTES_PER_ELEMENT)) : new Type(length);
}

/** Packs `examples` (`featureCount` features per node) into fresh arrays, in shared memory when `isShared`. */
export function packEncodedChunk(examples: readonly EncodedExample[], isShared = false, featureCount = NODE_FEATURE_COUNT): PackedChunk {
  const nodeStart = allocate(Int32Array, examples.length + 1, isShared);
  examples.forEach((ex, i) => { nodeStart[i + 1] = nodeStart[i] + ex.mask.length; });
  const nodeCount = nodeStart[examples.length];
  const features = allocate(Float32Array, nodeCount * featureCount, isShared);
  const familyIds = allocate(Int32Array, nodeCount, isShared);
  const mask = allocate(Float32Array, nodeCount, isShared);
  const labels = allocate(Int32Array, examples.length, isShared);
  examples.forEach((ex, i) => {
    if (ex.features.length !== ex.mask.length * featureCount) {
      throw new Error(`packEncodedChunk: expected ${featureCount} features per node, example ${i} has ${ex.features.length} for ${ex.mask.length} nodes`);
    }
    features.set(ex.features, nodeStart[i] * featureCount);
    familyIds.set(ex.familyIds, nodeStart[i]);
    mask.set(ex.mask, nodeStart[i]);
    labels[i] = ex.label;
  });
  return { featureCount, features, familyIds, mask, nodeStart, labels, systemIds: examples.map((e) => e.systemId) };
}

/** Example `i` of a packed chunk, as views into its arrays. */
export function viewPackedExample(chunk: PackedChunk, i: number): EncodedExample {
  const f = chunk.featureCount;
  const from = chunk.nodeStart[i];
  const to = chunk.nodeStart[i + 1];
  return {
    features: chunk.features.subarray(from * f, to * f),
    familyIds: chunk.familyIds.subarray(from, to),
    mask: chunk.mask.subarray(from, to),
    label: chunk.labels[i],
    systemId: chunk.systemIds[i],
  };
}

export function unpackEncodedChunk(chunk: PackedChunk): EncodedExample[] {
  return chunk.systemIds.map((_, i) => viewPackedExample(chunk, i));
}
