/**
 * Strict reading of a number written as decimal text, for the readers whose formats write only
 * decimals (range-query JSON sample strings, OTLP JSON number strings, line-protocol fields).
 * Number() alone would also read "0x10" as 16, " 5 " as 5 and "1e999" as Infinity.
 */

/** Optional sign, digits with an optional point (or a point and digits), optional exponent. */
const DECIMAL = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;

/** The finite number a decimal literal writes; undefined for anything else or beyond a double's range. */
export function readDecimalText(text: string): number | undefined {
  if (!DECIMAL.test(text)) return undefined;
  const value = Number(text);
  return Number.isFinite(value) ? value : undefined;
}
