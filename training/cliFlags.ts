/** Flag reading shared by the training measurement commands (experiment, few-shot ceiling). */

/** The value after `flag` in `argv`, undefined when the flag is absent. */
export function readFlag(argv: readonly string[], flag: string): string | undefined {
  const at = argv.indexOf(flag);
  return at >= 0 ? argv[at + 1] : undefined;
}

/** `flag`'s value as a positive integer (or `fallback` when absent); throws naming the flag and what was expected. */
export function readPositiveInteger(argv: readonly string[], flag: string, fallback?: number): number {
  const text = readFlag(argv, flag);
  const value = text === undefined ? fallback : Number(text);
  if (value === undefined || !Number.isInteger(value) || value <= 0) throw new Error(`${flag}: expected a positive integer, got ${JSON.stringify(text ?? '')}`);
  return value;
}
