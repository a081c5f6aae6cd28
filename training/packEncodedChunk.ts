/**
 * Encoded examples as a few flat arrays, to move a chunk between threads without copying each
 * example's arrays; unpacking gives views into them.
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

export function packEncodedChunk(examples: readonly EncodedExample[]): PackedChunk {
  const nodeStart = new Int32Array(examples.length + 1);
  examples.forEach((ex, i) => { nodeStart[i + 1] = nodeStart[i] + ex.mask.length; });
  const nodeCount = nodeStart[examples.length];
  const featureCount = NODE_FEATURE_COUNT;
  const features = new Float32Array(nodeCount * featureCount);
  const familyIds = new Int32Array(nodeCount);
  const mask = new Float32Array(nodeCount);
  examples.forEach((ex, i) => {
    if (ex.features.length !== ex.mask.length * featureCount) {
      throw new Error(`packEncodedChunk: expected ${featureCount} features per node, example ${i} has ${ex.features.length} for ${ex.mask.length} nodes`);
    }
    features.set(ex.features, nodeStart[i] * featureCount);
    familyIds.set(ex.familyIds, nodeStart[i]);
    mask.set(ex.mask, nodeStart[i]);
  });
  return { featureCount, features, familyIds, mask, nodeStart, labels: Int32Array.from(examples, (e) => e.label), systemIds: examples.map((e) => e.systemId) };
}

export function unpackEncodedChunk(chunk: PackedChunk): EncodedExample[] {
  const f = chunk.featureCount;
  return chunk.systemIds.map((systemId, i) => {
    const from = chunk.nodeStart[i];
    const to = chunk.nodeStart[i + 1];
    return {
      features: chunk.features.subarray(from * f, to * f),
      familyIds: chunk.familyIds.subarray(from, to),
      mask: chunk.mask.subarray(from, to),
      label: chunk.labels[i],
      systemId,
    };
  });
}
