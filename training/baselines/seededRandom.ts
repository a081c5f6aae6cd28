/**
 * Seeded pseudo-random numbers for the baselines, so that weight init and minibatch order are
 * reproducible from one seed (Math.random is not seedable).
 */

import { createMulberry32 } from '../../extension/core/random';

/** Returns a mulberry32 generator: uniform floats in [0, 1), same sequence for the same seed. */
export const createRandom = createMulberry32;

/** Shuffles `items` in place (Fisher–Yates) with the given generator and returns it. */
export function shuffleInPlace<T>(items: T[], random: () => number): T[] {
  for (let i = items.length - 1; i > 0; i--) {
    const j = Math.floor(random() * (i + 1));
    const tmp = items[i];
    items[i] = items[j];
    items[j] = tmp;
  }
  return items;
}

/**
 * Glorot/Xavier uniform weights (Glorot & Bengio 2010: limit = sqrt(6 / (fanIn + fanOut))),
 * row-major [fanIn, fanOut].
 */
export function drawGlorotUniform(fanIn: number, fanOut: number, random: () => number): Float32Array {
  const limit = Math.sqrt(6 / (fanIn + fanOut));
  const out = new Float32Array(fanIn * fanOut);
  for (let i = 0; i < out.length; i++) out[i] = (random() * 2 - 1) * limit;
  return out;
}
