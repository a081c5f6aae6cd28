/** Exact powers of ten as doubles (10^0 … 10^22 are exactly representable). */
export const POWERS_OF_TEN = Array.from({ length: 23 }, (_, i) => 10 ** i);

/**
 * Reads `[+-]digits[<point>digits]` from `text[start, end)` without creating a substring.
 * Exact (correctly rounded, same as Number()) because at most 15 significant digits are
 * accumulated as an integer and divided once by an exact power of ten (Clinger's fast path).
 * Returns NaN when the range is anything else (exponents, spaces, units, more digits, empty) —
 * callers then fall back to the general cell reader.
 * @param pointCode char code of the decimal separator (46 '.', or 44 ',' for decimal-comma files)
 */
export function parseDecimalRange(text: string, start: number, end: number, pointCode = 46): number {
  let i = start;
  let isNegative = false;
  let c = text.charCodeAt(i);
  if (c === 45 || c === 43) { isNegative = c === 45; i++; }
  let mantissa = 0;
  let digits = 0;
  let fractionDigits = 0;
  let isInFraction = false;
  for (; i < end; i++) {
    c = text.charCodeAt(i);
    if (c >= 48 && c <= 57) {
      if (digits > 0 || c !== 48) digits++;
      mantissa = mantissa * 10 + (c - 48);
      if (isInFraction) fractionDigits++;
    } else if (c === pointCode && !isInFraction) {
      isInFraction = true;
    } else {
      return NaN;
    }
  }
  const hasDigits = i > start + (isNegative || text.charCodeAt(start) === 43 ? 1 : 0) + (isInFraction ? 1 : 0);
  if (!hasDigits || digits > 15 || fractionDigits > 22) return NaN;
  const value = fractionDigits === 0 ? mantissa : mantissa / POWERS_OF_TEN[fractionDigits];
  return isNegative ? -value : value;
}
