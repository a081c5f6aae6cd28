/**
 * Complementary error function and the standard normal tail, accurate to about 1e-13 relative
 * (Taylor series for |x| < 2, a continued fraction beyond), enough for indicative p-values.
 */

const TWO_OVER_SQRT_PI = 2 / Math.sqrt(Math.PI);

/** erfc(x) = 1 − erf(x). NaN in, NaN out; erfc(±∞) = 0 / 2. */
export function computeErfc(x: number): number {
  if (Number.isNaN(x)) return Number.NaN;
  if (x < 0) return 2 - computeErfc(-x);
  if (x < 2) {
    let term = x, sum = x;
    const x2 = x * x;
    for (let k = 1; k < 100; k++) {
      term *= -x2 / k;
      const add = term / (2 * k + 1);
      sum += add;
      if (Math.abs(add) < 1e-17 * Math.abs(sum)) break;
    }
    return 1 - TWO_OVER_SQRT_PI * sum;
  }
  if (x > 27) return 0;
  // erfc(x) = e^{−x²}/√π · 1/(x + (1/2)/(x + 1/(x + (3/2)/(x + …)))), evaluated from the tail.
  let tail = x;
  for (let k = 60; k >= 1; k--) tail = x + k / 2 / tail;
  return Math.exp(-x * x) / Math.sqrt(Math.PI) / tail;
}

/** Upper tail P(Z > z) of the standard normal distribution. */
export function computeNormalSf(z: number): number {
  return 0.5 * computeErfc(z / Math.SQRT2);
}
