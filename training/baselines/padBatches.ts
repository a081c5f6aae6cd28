/** Joining single-example encodings into padded minibatches (mask-0 rows, family 'other'). */
import { FAMILIES } from '../../extension/core/frame/types';
import type { NodeBatch } from '../../extension/core/model/types';

const OTHER_FAMILY = BigInt(FAMILIES.indexOf('other'));

/**
 * Returns one NodeBatch holding `parts` (each of batch size 1) padded to the largest node count,
 * the same padding encodeBatch uses. Throws when the parts disagree on row length or a part is not
 * a single example (programmer error).
 */
export function concatPadded(parts: readonly NodeBatch[]): NodeBatch {
  if (parts.length === 0) throw new Error('expected at least one encoded example, got 0');
  const rowLength = parts[0].windowLength;
  let nodeCount = 0;
  parts.forEach((p, i) => {
    if (p.batchSize !== 1) throw new Error(`expected encoded example ${i} to have batch size 1, got ${p.batchSize}`);
    if (p.windowLength !== rowLength) throw new Error(`expected row length ${rowLength} at example ${i}, got ${p.windowLength}`);
    nodeCount = Math.max(nodeCount, p.nodeCount);
  });
  // A batch of empty examples still needs one (masked) node so tensors have a non-zero axis.
  nodeCount = Math.max(1, nodeCount);
  const values = new Float32Array(parts.length * nodeCount * rowLength);
  const families = new BigInt64Array(parts.length * nodeCount).fill(OTHER_FAMILY);
  const mask = new Float32Array(parts.length * nodeCount);
  parts.forEach((p, b) => {
    values.set(p.values, b * nodeCount * rowLength);
    families.set(p.families, b * nodeCount);
    mask.set(p.mask, b * nodeCount);
  });
  return { batchSize: parts.length, nodeCount, windowLength: rowLength, values, families, mask };
}

/**
 * Groups example indices into minibatches of at most `batchSize`, so that examples with similar
 * node counts share a batch (less padding): the given order is cut into chunks of 8 batches, each
 * chunk is sorted by node count and split. Returns the batches in chunk order.
 */
export function groupBySize(order: readonly number[], nodeCounts: ArrayLike<number>, batchSize: number): number[][] {
  const batches: number[][] = [];
  const chunk = batchSize * 8;
  for (let start = 0; start < order.length; start += chunk) {
    const part = order.slice(start, start + chunk).sort((a, b) => nodeCounts[a] - nodeCounts[b]);
    for (let s = 0; s < part.length; s += batchSize) batches.push(part.slice(s, s + batchSize));
  }
  return batches;
}
