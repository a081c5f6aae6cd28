/**
 * Seeded pseudo-random numbers for the baselines, so that weight init and minibatch order are
 * reproducible from one seed (Math.random is not seedable).
 */

/** Returns a mulberry32 generator: uniform floats in [0, 1), same sequence for the same seed. */
export function createRandom(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

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
