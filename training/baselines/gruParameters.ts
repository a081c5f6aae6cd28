/**
 * Parameters of the per-metric GRU baseline (gruNetwork.ts): the shape, the named blocks inside one
 * flat Float32Array, their initialisation, and the Adam optimiser that updates them.
 */
import { FAMILIES } from '../../extension/core/frame/types';
import { drawGlorotUniform } from './seededRandom';

/** Sizes of the GRU network. */
export interface GruShape {
  readonly rowLength: number;
  readonly sequenceLength: number;
  readonly hiddenSize: number;
  readonly classCount: number;
}

/** Named parameter blocks (row-major) inside one flat Float32Array. */
export const GRU_BLOCKS = ['inputZ', 'inputR', 'inputN', 'biasZ', 'biasR', 'biasN', 'stateZ', 'stateR', 'stateN',
  'family', 'slots', 'slotBias', 'head1', 'head1Bias', 'head2', 'head2Bias'] as const;
export type GruBlock = (typeof GRU_BLOCKS)[number];

/** Returns the [rows, cols] of every parameter block for a shape. */
export function getGruBlockShapes(shape: GruShape): Record<GruBlock, readonly [number, number]> {
  const h = shape.hiddenSize;
  const slotCount = Math.max(1, shape.rowLength - shape.sequenceLength);
  return {
    inputZ: [1, h], inputR: [1, h], inputN: [1, h], biasZ: [1, h], biasR: [1, h], biasN: [1, h],
    stateZ: [h, h], stateR: [h, h], stateN: [h, h],
    family: [FAMILIES.length, h], slots: [slotCount, h], slotBias: [1, h],
    head1: [h, h], head1Bias: [1, h], head2: [h, shape.classCount], head2Bias: [1, shape.classCount],
  };
}

/** Flat parameters and the offset of each block. */
export interface GruParameters {
  readonly shape: GruShape;
  readonly values: Float32Array;
  readonly offsets: Readonly<Record<GruBlock, number>>;
}

/** Glorot-uniform weights and zero biases, drawn from `random` in GRU_BLOCKS order. */
export function initGruParameters(shape: GruShape, random: () => number): GruParameters {
  const shapes = getGruBlockShapes(shape);
  const offsets = {} as Record<GruBlock, number>;
  let total = 0;
  for (const block of GRU_BLOCKS) { offsets[block] = total; total += shapes[block][0] * shapes[block][1]; }
  const values = new Float32Array(total);
  for (const block of GRU_BLOCKS) {
    if (block.endsWith('Bias') || block.startsWith('bias')) continue;
    const [rows, cols] = shapes[block];
    values.set(drawGlorotUniform(rows, cols, random), offsets[block]);
  }
  return { shape, values, offsets };
}

/** Adam state (Kingma & Ba 2015; β1 0.9, β2 0.999, ε 1e-8, bias-corrected). */
export interface AdamState {
  readonly first: Float64Array;
  readonly second: Float64Array;
  step: number;
}

/** Returns zeroed Adam moments for `size` parameters. */
export function createAdamState(size: number): AdamState {
  return { first: new Float64Array(size), second: new Float64Array(size), step: 0 };
}

/** One Adam update of `values` in place from gradient `g`. */
export function applyAdam(values: Float32Array, g: Float64Array, state: AdamState, learningRate: number): void {
  state.step++;
  const c1 = 1 - 0.9 ** state.step;
  const c2 = 1 - 0.999 ** state.step;
  for (let i = 0; i < values.length; i++) {
    state.first[i] = 0.9 * state.first[i] + 0.1 * g[i];
    state.second[i] = 0.999 * state.second[i] + 0.001 * g[i] * g[i];
    values[i] -= (learningRate * (state.first[i] / c1)) / (Math.sqrt(state.second[i] / c2) + 1e-8);
  }
}
