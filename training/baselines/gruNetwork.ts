/**
 * The per-metric GRU baseline written out in plain JS with hand-derived backpropagation through
 * time. Measured here: the same network in tfjs-backend-cpu took ~9 s per minibatch of 64 examples
 * (~1,200 metric sequences × 32 steps; small element-wise ops dominate), far over the training
 * budget; plain loops over Float32Array are fast enough. The tfjs version in gruBaseline.ts is the
 * reference its tests compare against.
 *
 * Network (per example): for each unmasked metric, a GRU (Cho et al. 2014; reset gate on U·h as in
 * the cuDNN/PyTorch variant) over its `sequenceLength` samples; node state
 * s = ReLU(h_T + E[family] + slots·S + b_s); mean over unmasked metrics; head
 * logits = W2·ReLU(W1·p + b1) + b2.
 */
import { FAMILIES } from '../../extension/core/frame/types';
import type { NodeBatch } from '../../extension/core/model/types';
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

const sigmoid = (x: number): number => 1 / (1 + Math.exp(-x));

/** acc[k] += Σ_j v[j]·M[j][k] for M [rows, cols] at `offset` in `m`. */
function addVectorMatrix(v: ArrayLike<number>, m: Float32Array, offset: number, rows: number, cols: number, acc: Float64Array): void {
  for (let j = 0; j < rows; j++) {
    const vj = v[j];
    if (vj === 0) continue;
    const base = offset + j * cols;
    for (let k = 0; k < cols; k++) acc[k] += vj * m[base + k];
  }
}

/** acc[j] += Σ_k M[j][k]·d[k] (the transpose product used by backpropagation). */
function addMatrixVector(m: Float32Array, offset: number, rows: number, cols: number, d: ArrayLike<number>, acc: Float64Array): void {
  for (let j = 0; j < rows; j++) {
    const base = offset + j * cols;
    let s = 0;
    for (let k = 0; k < cols; k++) s += m[base + k] * d[k];
    acc[j] += s;
  }
}

/** g[j][k] += u[j]·d[k] (outer-product gradient of a weight block). */
function addOuter(u: ArrayLike<number>, d: ArrayLike<number>, g: Float64Array, offset: number, rows: number, cols: number): void {
  for (let j = 0; j < rows; j++) {
    const uj = u[j];
    if (uj === 0) continue;
    const base = offset + j * cols;
    for (let k = 0; k < cols; k++) g[base + k] += uj * d[k];
  }
}

interface NodeTrace {
  readonly states: Float64Array[]; // h_0..h_T
  readonly gates: { z: Float64Array; r: Float64Array; n: Float64Array; un: Float64Array }[];
  readonly nodeState: Float64Array;
  readonly family: number;
  readonly slots: Float64Array;
  readonly sequence: Float64Array;
}

function runNode(p: GruParameters, batch: NodeBatch, e: number, i: number): NodeTrace {
  const { sequenceLength: w, hiddenSize: h, rowLength } = p.shape;
  const o = p.offsets;
  const v = p.values;
  const rowOffset = (e * batch.nodeCount + i) * rowLength;
  const sequence = new Float64Array(w);
  for (let t = 0; t < w; t++) { const x = batch.values[rowOffset + t]; sequence[t] = Number.isFinite(x) ? x : 0; }
  const slotCount = Math.max(1, rowLength - w);
  const slots = new Float64Array(slotCount);
  for (let s = 0; s < rowLength - w; s++) { const x = batch.values[rowOffset + w + s]; slots[s] = Number.isFinite(x) ? x : 0; }
  const states = [new Float64Array(h)];
  const gates: NodeTrace['gates'] = [];
  for (let t = 0; t < w; t++) {
    const prev = states[t];
    const x = sequence[t];
    const az = new Float64Array(h), ar = new Float64Array(h), un = new Float64Array(h);
    for (let k = 0; k < h; k++) { az[k] = v[o.inputZ + k] * x + v[o.biasZ + k]; ar[k] = v[o.inputR + k] * x + v[o.biasR + k]; }
    addVectorMatrix(prev, v, o.stateZ, h, h, az);
    addVectorMatrix(prev, v, o.stateR, h, h, ar);
    addVectorMatrix(prev, v, o.stateN, h, h, un);
    const z = az.map(sigmoid), r = ar.map(sigmoid), n = new Float64Array(h), next = new Float64Array(h);
    for (let k = 0; k < h; k++) {
      n[k] = Math.tanh(v[o.inputN + k] * x + v[o.biasN + k] + r[k] * un[k]);
      next[k] = n[k] + z[k] * (prev[k] - n[k]);
    }
    gates.push({ z, r, n, un });
    states.push(next);
  }
  const family = Number(batch.families[e * batch.nodeCount + i]);
  const nodeState = Float64Array.from(states[w]);
  for (let k = 0; k < h; k++) nodeState[k] += v[o.family + family * h + k] + v[o.slotBias + k];
  addVectorMatrix(slots, v, o.slots, slotCount, h, nodeState);
  for (let k = 0; k < h; k++) nodeState[k] = Math.max(0, nodeState[k]);
  return { states, gates, nodeState, family, slots, sequence };
}

interface ExampleTrace {
  readonly nodes: readonly NodeTrace[];
  readonly pooled: Float64Array;
  readonly hidden: Float64Array;
  readonly logits: Float64Array;
}

function forwardExample(p: GruParameters, batch: NodeBatch, e: number): ExampleTrace {
  const { hiddenSize: h, classCount: c } = p.shape;
  const o = p.offsets;
  const nodes: NodeTrace[] = [];
  for (let i = 0; i < batch.nodeCount; i++) if (batch.mask[e * batch.nodeCount + i] > 0) nodes.push(runNode(p, batch, e, i));
  const pooled = new Float64Array(h);
  for (const node of nodes) for (let k = 0; k < h; k++) pooled[k] += node.nodeState[k] / nodes.length;
  const hidden = new Float64Array(h);
  for (let k = 0; k < h; k++) hidden[k] = p.values[o.head1Bias + k];
  addVectorMatrix(pooled, p.values, o.head1, h, h, hidden);
  for (let k = 0; k < h; k++) hidden[k] = Math.max(0, hidden[k]);
  const logits = new Float64Array(c);
  for (let k = 0; k < c; k++) logits[k] = p.values[o.head2Bias + k];
  addVectorMatrix(hidden, p.values, o.head2, h, c, logits);
  return { nodes, pooled, hidden, logits };
}

/** Logits [B, C] of a batch (masked nodes are skipped; an all-masked example pools to zeros). */
export function computeGruLogits(p: GruParameters, batch: NodeBatch): Float32Array {
  const c = p.shape.classCount;
  const out = new Float32Array(batch.batchSize * c);
  for (let e = 0; e < batch.batchSize; e++) out.set(forwardExample(p, batch, e).logits, e * c);
  return out;
}

function backwardNode(p: GruParameters, node: NodeTrace, dState: Float64Array, g: Float64Array): void {
  const { hiddenSize: h, sequenceLength: w } = p.shape;
  const o = p.offsets;
  const v = p.values;
  const slotCount = node.slots.length;
  for (let k = 0; k < h; k++) {
    g[o.family + node.family * h + k] += dState[k];
    g[o.slotBias + k] += dState[k];
  }
  addOuter(node.slots, dState, g, o.slots, slotCount, h);
  let dh = Float64Array.from(dState);
  for (let t = w - 1; t >= 0; t--) {
    const { z, r, n, un } = node.gates[t];
    const prev = node.states[t];
    const x = node.sequence[t];
    const dPrev = new Float64Array(h), daz = new Float64Array(h), dar = new Float64Array(h), dan = new Float64Array(h), dun = new Float64Array(h);
    for (let k = 0; k < h; k++) {
      dPrev[k] = dh[k] * z[k];
      dan[k] = dh[k] * (1 - z[k]) * (1 - n[k] * n[k]);
      daz[k] = dh[k] * (prev[k] - n[k]) * z[k] * (1 - z[k]);
      dar[k] = dan[k] * un[k] * r[k] * (1 - r[k]);
      dun[k] = dan[k] * r[k];
      g[o.inputZ + k] += daz[k] * x; g[o.biasZ + k] += daz[k];
      g[o.inputR + k] += dar[k] * x; g[o.biasR + k] += dar[k];
      g[o.inputN + k] += dan[k] * x; g[o.biasN + k] += dan[k];
    }
    addOuter(prev, daz, g, o.stateZ, h, h);
    addOuter(prev, dar, g, o.stateR, h, h);
    addOuter(prev, dun, g, o.stateN, h, h);
    addMatrixVector(v, o.stateZ, h, h, daz, dPrev);
    addMatrixVector(v, o.stateR, h, h, dar, dPrev);
    addMatrixVector(v, o.stateN, h, h, dun, dPrev);
    dh = dPrev;
  }
}

/**
 * Adds to `g` the gradient of weight·CE(softmax(logits), label) for example `e` and returns that
 * weighted loss. CE = −log softmax(logits)[label].
 */
export function accumulateGruGradient(p: GruParameters, batch: NodeBatch, e: number, label: number, weight: number, g: Float64Array): number {
  const { hiddenSize: h, classCount: c } = p.shape;
  const o = p.offsets;
  const trace = forwardExample(p, batch, e);
  const max = Math.max(...trace.logits);
  const exp = trace.logits.map((l) => Math.exp(l - max));
  const total = exp.reduce((a, b) => a + b, 0);
  const dLogits = exp.map((x, k) => weight * (x / total - (k === label ? 1 : 0)));
  for (let k = 0; k < c; k++) g[o.head2Bias + k] += dLogits[k];
  addOuter(trace.hidden, dLogits, g, o.head2, h, c);
  const dHidden = new Float64Array(h);
  addMatrixVector(p.values, o.head2, h, c, dLogits, dHidden);
  for (let k = 0; k < h; k++) { if (trace.hidden[k] <= 0) dHidden[k] = 0; g[o.head1Bias + k] += dHidden[k]; }
  addOuter(trace.pooled, dHidden, g, o.head1, h, h);
  const dPooled = new Float64Array(h);
  addMatrixVector(p.values, o.head1, h, h, dHidden, dPooled);
  for (const node of trace.nodes) {
    const dState = new Float64Array(h);
    for (let k = 0; k < h; k++) dState[k] = node.nodeState[k] > 0 ? dPooled[k] / trace.nodes.length : 0;
    backwardNode(p, node, dState, g);
  }
  return weight * (Math.log(total) + max - trace.logits[label]);
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
