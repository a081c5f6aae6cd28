/**
 * Reading numeric cells as exports write them: plain numbers (fast path), missing-data markers,
 * ±Inf, thousands separators, decimal commas, and values carrying a unit (`12.5%`, `1.2 GB`).
 */

/** Outcome of the last `ValueCellReader.read` call. */
export enum CellStatus { Ok = 0, Missing = 1, Invalid = 2 }

/** Markers exports use for "no value" (REFERENCE.md §1.1); compared lowercased. */
const MISSING_MARKERS = new Set(['', 'nan', '-nan', 'null', 'none', '-', '--', 'n/a', 'na', 'undefined', '?', 'nil']);

/** Units converted to a base unit, so that a column mixing MB and GB stays comparable. */
const UNIT_SCALES: ReadonlyMap<string, readonly [string, number]> = new Map<string, readonly [string, number]>([
  ['b', ['By', 1]], ['byte', ['By', 1]], ['bytes', ['By', 1]],
  ['kb', ['By', 1e3]], ['mb', ['By', 1e6]], ['gb', ['By', 1e9]], ['tb', ['By', 1e12]],
  ['kib', ['By', 1024]], ['mib', ['By', 1024 ** 2]], ['gib', ['By', 1024 ** 3]], ['tib', ['By', 1024 ** 4]],
  ['ns', ['s', 1e-9]], ['us', ['s', 1e-6]], ['µs', ['s', 1e-6]], ['ms', ['s', 1e-3]],
  ['s', ['s', 1]], ['sec', ['s', 1]], ['secs', ['s', 1]], ['min', ['s', 60]], ['h', ['s', 3600]],
  ['%', ['%', 1]],
]);

/** 0x…, 0b…, 0o… literals (with an optional sign). */
const RADIX_PREFIX = /^[+-]?0[xXbBoO]/;

/** Cheap pre-check on the hot path: only cells starting "0", "+0" or "-0" go to RADIX_PREFIX. */
function mayHaveRadixPrefix(cell: string, first: number): boolean {
  const zeroAt = first === 43 || first === 45 ? 1 : 0;
  return cell.charCodeAt(zeroAt) === 48 && cell.length > zeroAt + 1 && RADIX_PREFIX.test(cell);
}

const NUMBER_WITH_SUFFIX = /^([+-]?(?:\d[\d.,' ]*)?\d(?:[eE][+-]?\d+)?|[+-]?\.\d+)\s*([A-Za-zµ%/][A-Za-z0-9µ%/._]*)?$/;
const COMMA_THOUSANDS = /^[+-]?\d{1,3}(,\d{3})+(\.\d*)?$/;
const DOT_THOUSANDS_DECIMAL_COMMA = /^[+-]?\d{1,3}(\.\d{3})+(,\d*)?$/;
const DECIMAL_COMMA = /^[+-]?\d+(,\d+)?$/;

/**
 * Stateful, allocation-free cell reader: `read()` returns the value and sets `status` and `unit`
 * (the unit written after the number, converted to a base unit when known). One instance per
 * file; callers keep per-column unit bookkeeping themselves.
 */
export class ValueCellReader {
  /** Status of the last read. */
  status: CellStatus = CellStatus.Ok;
  /** Unit of the last read ('' when the cell was a bare number). */
  unit = '';
  /** True after any value was converted from a unit like MB to its base unit. */
  hasConvertedUnits = false;

  /** @param isDecimalComma read `1,5` as 1.5 and `1.234,5` as 1234.5 (`;`-delimited locales). */
  constructor(readonly isDecimalComma: boolean) {}

  /**
   * Value of one cell. Missing markers → NaN with status Missing; unreadable text → NaN with
   * status Invalid; `+Inf`/`-Inf`/`Infinity` → ±Infinity. Hexadecimal, binary and octal literals
   * (`0x10`, which Number() reads as 16) and decimals beyond the range of a double (`1e309`, which
   * Number() reads as Infinity) are Invalid: an export writes decimal numbers.
   */
  read(cell: string): number {
    this.unit = '';
    // Fast path: most cells are plain finite decimals. Number('') and Number(' ') are 0, and
    // Number reads 0x/0b/0o literals and overflows to Infinity, so guard all of these.
    const fast = Number(cell);
    const first = cell.charCodeAt(0);
    if (Number.isFinite(fast) && first > 32 && cell.charCodeAt(cell.length - 1) > 32 && !mayHaveRadixPrefix(cell, first)) {
      this.status = CellStatus.Ok;
      return fast;
    }
    return this.#readSlow(cell.trim());
  }

  #readSlow(text: string): number {
    const lower = text.toLowerCase();
    if (MISSING_MARKERS.has(lower)) { this.status = CellStatus.Missing; return NaN; }
    if (lower === '+inf' || lower === 'inf' || lower === 'infinity' || lower === '+infinity') { this.status = CellStatus.Ok; return Infinity; }
    if (lower === '-inf' || lower === '-infinity') { this.status = CellStatus.Ok; return -Infinity; }
    if (RADIX_PREFIX.test(text)) { this.status = CellStatus.Invalid; return NaN; }
    const match = NUMBER_WITH_SUFFIX.exec(text);
    if (match === null) { this.status = CellStatus.Invalid; return NaN; }
    const value = this.#readGrouped(match[1].replace(/[ ']/g, ''));
    if (!Number.isFinite(value)) { this.status = CellStatus.Invalid; return NaN; }
    this.status = CellStatus.Ok;
    const suffix = match[2];
    if (suffix === undefined) return value;
    const scale = UNIT_SCALES.get(suffix.toLowerCase());
    if (scale === undefined) { this.unit = suffix; return value; }
    this.unit = scale[0];
    if (scale[1] !== 1) this.hasConvertedUnits = true;
    return value * scale[1];
  }

  /** Numbers with grouping separators; NaN when the separators are ambiguous or misplaced. */
  #readGrouped(digits: string): number {
    if (this.isDecimalComma) {
      if (DOT_THOUSANDS_DECIMAL_COMMA.test(digits)) return Number(digits.replace(/\./g, '').replace(',', '.'));
      if (DECIMAL_COMMA.test(digits)) return Number(digits.replace(',', '.'));
      return digits.includes(',') ? NaN : Number(digits);
    }
    if (COMMA_THOUSANDS.test(digits)) return Number(digits.replace(/,/g, ''));
    return digits.includes(',') ? NaN : Number(digits);
  }
}
