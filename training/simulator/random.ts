/**
 * Seeded random numbers for the simulator: mulberry32 for uniforms (Tommy Ettinger's 32-bit
 * generator, public domain) and a 65,536-point inverse-CDF table for normals. Own PRNG so that every dataset is
 * reproducible from a seed on any Node version (Math.random cannot be seeded).
 */
export interface Random {
  /** Uniform in [0, 1). */
  next(): number;
  /** Standard normal N(0, 1). */
  normal(): number;
  /** Uniform in [lo, hi). */
  uniform(lo: number, hi: number): number;
  /** Log-uniform in [lo, hi): equal weight per decade, for magnitudes spanning orders. */
  logUniform(lo: number, hi: number): number;
  /** Integer uniform in [lo, hi], both inclusive. */
  int(lo: number, hi: number): number;
  /** True with probability p. */
  chance(p: number): boolean;
  /** One element of a non-empty array. */
  pick<T>(items: readonly T[]): T;
  /** Student-t with `dof` degrees of freedom: heavy-tailed noise for bursts. */
  studentT(dof: number): number;
  /** Student-t with 2 degrees of freedom in closed form (one uniform): cheap heavy tails. */
  studentT2(): number;
  /** An independent generator at the same state: it yields the same sequence as this one from here. */
  clone(): Random;
  /** Writes uniforms into `out[start..end)`: exactly what end − start calls of next() return, in one call. */
  fillUniform(out: Float64Array, start: number, end: number): void;
  /** Writes normals into `out[start..end)`: exactly what end − start calls of normal() return, in one call. */
  fillNormal(out: Float64Array, start: number, end: number): void;
}

/** Mixes several integers into one 32-bit seed (splitmix-style avalanche), order-sensitive. */
export function mixSeeds(...parts: readonly number[]): number {
  let h = 0x9e3779b9;
  for (const part of parts) {
    h = Math.imul(h ^ (part | 0), 0x85ebca6b);
    h ^= h >>> 13;
    h = Math.imul(h, 0xc2b2ae35);
    h ^= h >>> 16;
    h = (h + 0x6d2b79f5) | 0;
  }
  return h >>> 0;
}

/** Stable 32-bit hash of a string (FNV-1a), to derive seeds from names. */
export function hashString(text: string): number {
  let h = 0x811c9dc5;
  for (let i = 0; i < text.length; i += 1) {
    h ^= text.charCodeAt(i);
    h = Math.imul(h, 0x01000193);
  }
  return h >>> 0;
}

/**
 * Inverse normal CDF (Acklam's rational approximation, relative error < 1.15e-9), used once to
 * fill a lookup table: a table draw costs one uniform, which keeps rendering fast enough for
 * thousands of examples per second. Tails beyond ±4.2σ are cut; heavy tails come separately.
 */
export function inverseNormalCdf(p: number): number {
  const a = [-3.969683028665376e1, 2.209460984245205e2, -2.759285104469687e2, 1.38357751867269e2, -3.066479806614716e1, 2.506628277459239];
  const b = [-5.447609879822406e1, 1.615858368580409e2, -1.556989798598866e2, 6.680131188771972e1, -1.328068155288572e1];
  const c = [-7.784894002430293e-3, -3.223964580411365e-1, -2.400758277161838, -2.549732539343734, 4.374664141464968, 2.938163982698783];
  const d = [7.784695709041462e-3, 3.224671290700398e-1, 2.445134137142996, 3.754408661907416];
  const poly = (coef: readonly number[], x: number): number => coef.reduce((acc, k) => acc * x + k, 0);
  if (p < 0.02425) {
    const q = Math.sqrt(-2 * Math.log(p));
    return poly(c, q) / (poly(d, q) * q + 1);
  }
  if (p > 1 - 0.02425) {
    const q = Math.sqrt(-2 * Math.log(1 - p));
    return -poly(c, q) / (poly(d, q) * q + 1);
  }
  const q = p - 0.5;
  const r = q * q;
  return (poly(a, r) * q) / (poly(b, r) * r + 1);
}

const NORMAL_TABLE_SIZE = 1 << 16;
const HALF_TABLE_SIZE = NORMAL_TABLE_SIZE >> 1;
let normalTable: Float64Array | undefined;
/**
 * The lower half of the table: entries k < 32,768 (the negative normals). The upper half is its
 * exact mirror (Acklam's formula is odd in p − ½ and 1 − p is exact for these p, so
 * inverseNormalCdf at (65,535 − k + ½)/65,536 is −inverseNormalCdf at (k + ½)/65,536, bit for bit;
 * simulatorGolden.test.ts checks every entry). Half the table, 256 KiB, stays in a core's L2
 * cache where the full 512 KiB did not, and the draw is the same value.
 */
function getNormalTable(): Float64Array {
  if (!normalTable) {
    normalTable = new Float64Array(HALF_TABLE_SIZE);
    for (let k = 0; k < HALF_TABLE_SIZE; k += 1) normalTable[k] = inverseNormalCdf((k + 0.5) / NORMAL_TABLE_SIZE);
  }
  return normalTable;
}

/** The normal draw for uniform `u` in [0, 1): what normal() returns when next() gave `u`. */
export function normalFromUniform(u: number): number {
  // Table entry k = ⌊u·65,536⌋, read from the lower half (mirrored and negated when k ≥ 32,768).
  const k = (u * NORMAL_TABLE_SIZE) | 0;
  const upper = k >>> 15;
  return ((normalTable ?? getNormalTable())[(k ^ -upper) & (HALF_TABLE_SIZE - 1)] as number) * (1 - 2 * upper);
}

/** The Student-t(2) draw for uniform `u` in [0, 1): what studentT2() returns when next() gave `u`. */
export function studentT2FromUniform(next: number): number {
  // Inverse CDF of t(2): (2u-1) / sqrt(2u(1-u)), u kept away from 0 and 1.
  const u = 1e-9 + (1 - 2e-9) * next;
  return (2 * u - 1) / Math.sqrt(2 * u * (1 - u));
}

/** The normal table entry `k` (0 ≤ k < 65,536): inverseNormalCdf((k + ½) / 65,536). */
export function readNormalTable(k: number): number {
  const table = getNormalTable();
  const upper = k >>> 15;
  return (table[(k ^ -upper) & (HALF_TABLE_SIZE - 1)] as number) * (1 - 2 * upper);
}

/** Creates a deterministic generator; the same seed always gives the same sequence. */
export function createRandom(seed: number): Random {
  return new Mulberry32(seed >>> 0);
}

/**
 * The generator as a class rather than closures: V8 inlines prototype methods at every call
 * site (one hidden class), while closures made per generator were called, not inlined, and the
 * simulator draws some 17,000 numbers per example. Call the methods on the generator (they use
 * `this`). Every draw consumes exactly one uniform except studentT.
 */
class Mulberry32 implements Random {
  // The 32-bit state in a typed array: as a plain field, every value outside the small-integer
  // range (most of them) was boxed into a fresh heap number on each draw.
  private readonly state = new Int32Array(1);
  private readonly table: Float64Array;

  constructor(initialState: number) {
    this.state[0] = initialState | 0;
    this.table = getNormalTable();
  }

  next(): number {
    const state = ((this.state[0] as number) + 0x6d2b79f5) | 0;
    this.state[0] = state;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  }

  normal(): number {
    // As normalFromUniform, with the table at hand (this is the hottest call of the simulator).
    const k = (this.next() * NORMAL_TABLE_SIZE) | 0;
    const upper = k >>> 15;
    return (this.table[(k ^ -upper) & (HALF_TABLE_SIZE - 1)] as number) * (1 - 2 * upper);
  }

  uniform(lo: number, hi: number): number {
    return lo + (hi - lo) * this.next();
  }

  logUniform(lo: number, hi: number): number {
    return Math.exp(Math.log(lo) + (Math.log(hi) - Math.log(lo)) * this.next());
  }

  int(lo: number, hi: number): number {
    return lo + Math.floor(this.next() * (hi - lo + 1));
  }

  chance(p: number): boolean {
    return this.next() < p;
  }

  pick<T>(items: readonly T[]): T {
    if (items.length === 0) throw new Error('pick: expected a non-empty array, got 0 items');
    return items[Math.floor(this.next() * items.length)] as T;
  }

  studentT2(): number {
    return studentT2FromUniform(this.next());
  }

  studentT(dof: number): number {
    let chi2 = 0;
    for (let k = 0; k < dof; k += 1) {
      const z = this.normal();
      chi2 += z * z;
    }
    return this.normal() / Math.sqrt(chi2 / dof);
  }

  clone(): Random {
    return new Mulberry32(this.state[0] as number);
  }

  fillUniform(out: Float64Array, start: number, end: number): void {
    // next() unrolled over a local state: no call and no boxed result per draw.
    let state = this.state[0] as number;
    for (let k = start; k < end; k += 1) {
      state = (state + 0x6d2b79f5) | 0;
      let t = state;
      t = Math.imul(t ^ (t >>> 15), t | 1);
      t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
      out[k] = ((t ^ (t >>> 14)) >>> 0) / 4294967296;
    }
    this.state[0] = state;
  }

  fillNormal(out: Float64Array, start: number, end: number): void {
    // normal() unrolled the same way.
    const table = this.table;
    let state = this.state[0] as number;
    for (let k = start; k < end; k += 1) {
      state = (state + 0x6d2b79f5) | 0;
      let t = state;
      t = Math.imul(t ^ (t >>> 15), t | 1);
      t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
      const index = ((((t ^ (t >>> 14)) >>> 0) / 4294967296) * NORMAL_TABLE_SIZE) | 0;
      const upper = index >>> 15;
      out[k] = (table[(index ^ -upper) & (HALF_TABLE_SIZE - 1)] as number) * (1 - 2 * upper);
    }
    this.state[0] = state;
  }
}
