/**
 * Timestamp reading shared by every reader: RFC 3339 (with offsets), naive ISO date-times
 * (assumed UTC), and epoch numbers whose unit is chosen by magnitude.
 */

/** Epoch units, with the factor that turns one unit into milliseconds. */
export type EpochUnit = 's' | 'ms' | 'us' | 'ns';
const MS_PER_UNIT: Readonly<Record<EpochUnit, number>> = { s: 1000, ms: 1, us: 1e-3, ns: 1e-6 };

/**
 * Epoch unit implied by a magnitude. For dates 1973–5138 the digit counts are s ≈ 10, ms ≈ 13,
 * µs ≈ 16, ns ≈ 19 (REFERENCE.md §1.1); the cut points sit between those ranges.
 * Returns 's' for small values (0, relative times) and for NaN.
 */
export function inferEpochUnit(value: number): EpochUnit {
  const magnitude = Math.abs(value);
  if (!(magnitude >= 1e11)) return 's';
  if (magnitude < 1e14) return 'ms';
  if (magnitude < 1e17) return 'us';
  return 'ns';
}

/** Milliseconds for `value` expressed in `unit`. NaN stays NaN. */
export function convertEpochToMs(value: number, unit: EpochUnit): number {
  return value * MS_PER_UNIT[unit];
}

/**
 * Epoch nanoseconds written as a decimal string (it exceeds 2^53, so it must not pass through a
 * JS number first) → epoch ms. Exact to the nanosecond up to the float precision of the result
 * (about 0.25 µs today). Returns NaN for anything that is not an optionally signed digit string.
 */
export function convertNanosStringToMs(digits: string): number {
  if (!/^-?\d+$/.test(digits)) return NaN;
  const negative = digits.startsWith('-');
  const body = negative ? digits.slice(1) : digits;
  const whole = body.length > 6 ? Number(body.slice(0, body.length - 6)) : 0;
  const fraction = Number(body.slice(-6)) / 1e6;
  const ms = whole + fraction;
  return negative ? -ms : ms;
}

/** Result of reading one date-time string. */
export interface ParsedDateTime {
  /** Epoch ms UTC; NaN if the text is not a date-time. */
  readonly timeMs: number;
  /** True when the text had no offset and was read as UTC. */
  readonly isNaive: boolean;
  /** True when the seconds field was 60 (leap second), read as the following second. */
  readonly isLeapSecond: boolean;
}

const INVALID: ParsedDateTime = { timeMs: NaN, isNaive: false, isLeapSecond: false };

function readDigits(text: string, start: number, count: number): number {
  let value = 0;
  for (let i = start; i < start + count; i++) {
    const d = text.charCodeAt(i) - 48;
    if (d < 0 || d > 9) return -1;
    value = value * 10 + d;
  }
  return value;
}

/**
 * Reads `YYYY-MM-DD[T| ]hh:mm[:ss[.fraction]][Z|z|±hh:mm|±hhmm]` (RFC 3339 §5.6 plus the common
 * naive and space-separated variants, and a date alone). A missing offset means the text is naive
 * and read as UTC (`isNaive`). A leap second (`:60`) cannot be represented in epoch time (POSIX
 * time has no leap seconds), so it is read as the following second — the same instant POSIX
 * clocks show — and flagged. RFC 3339 `-00:00` ("offset unknown") is read as UTC.
 * Returns `timeMs: NaN` for text that is not a date-time or has out-of-range fields.
 */
export function parseDateTime(text: string): ParsedDateTime {
  const timeMs = parseDateTimeMs(text);
  if (Number.isNaN(timeMs)) return INVALID;
  return { timeMs, isNaive: lastIsNaive, isLeapSecond: lastIsLeapSecond };
}

// Flags of the last parseDateTimeMs call: the hot path reads them instead of allocating a result.
let lastIsNaive = false;
let lastIsLeapSecond = false;

/** `parseDateTime` without the result object (one per row adds up): epoch ms or NaN; flags in module state. */
function parseDateTimeMs(text: string): number {
  const s = text.charCodeAt(0) > 32 && text.charCodeAt(text.length - 1) > 32 ? text : text.trim();
  if (s.length < 10 || s.charCodeAt(4) !== 45 || s.charCodeAt(7) !== 45) return NaN;
  const year = readDigits(s, 0, 4);
  const month = readDigits(s, 5, 2);
  const day = readDigits(s, 8, 2);
  // Reject 31 February and the like instead of letting Date.UTC roll them into the next month.
  if (year < 0 || month < 1 || month > 12 || day < 1 || day > daysInMonth(year, month)) return NaN;
  const dayMs = computeDayMs(year, month, day);
  if (s.length === 10) { lastIsNaive = true; lastIsLeapSecond = false; return dayMs; }
  const sep = s.charCodeAt(10);
  if (sep !== 84 && sep !== 116 && sep !== 32) return NaN;
  const hour = readDigits(s, 11, 2);
  const minute = s.charCodeAt(13) === 58 ? readDigits(s, 14, 2) : -1;
  if (hour < 0 || hour > 23 || minute < 0 || minute > 59) return NaN;
  let pos = 16;
  let second = 0;
  let fractionMs = 0;
  if (s.charCodeAt(pos) === 58) {
    second = readDigits(s, pos + 1, 2);
    if (second < 0 || second > 60) return NaN;
    pos += 3;
    const c = s.charCodeAt(pos);
    if (c === 46 || c === 44) {
      let end = pos + 1;
      let scale = 100;
      while (end < s.length) {
        const d = s.charCodeAt(end) - 48;
        if (d < 0 || d > 9) break;
        fractionMs += d * scale;
        scale /= 10;
        end++;
      }
      if (end === pos + 1) return NaN;
      pos = end;
    }
  }
  const offsetMs = readOffsetMs(s, pos);
  if (offsetMs === undefined) return NaN;
  lastIsNaive = offsetMs === null;
  lastIsLeapSecond = second === 60;
  return dayMs + ((hour * 60 + minute) * 60 + second) * 1000 + fractionMs - (offsetMs ?? 0);
}

function daysInMonth(year: number, month: number): number {
  if (month !== 2) return month === 4 || month === 6 || month === 9 || month === 11 ? 30 : 31;
  return (year % 4 === 0 && year % 100 !== 0) || year % 400 === 0 ? 29 : 28;
}

// One-entry cache: consecutive rows of an export almost always fall on the same day.
let cachedDayKey = -1;
let cachedDayMs = 0;

function computeDayMs(year: number, month: number, day: number): number {
  const key = (year * 16 + month) * 32 + day;
  if (key !== cachedDayKey) {
    cachedDayKey = key;
    // Date.UTC reads years 0–99 as 1900–1999; setUTCFullYear takes the year as written.
    cachedDayMs = year >= 100 ? Date.UTC(year, month - 1, day) : new Date(0).setUTCFullYear(year, month - 1, day);
  }
  return cachedDayMs;
}

/** Offset in ms at `pos`; null when absent (naive); undefined when malformed. */
function readOffsetMs(s: string, pos: number): number | null | undefined {
  if (pos === s.length) return null;
  const c = s[pos];
  if ((c === 'Z' || c === 'z') && pos + 1 === s.length) return 0;
  if (c !== '+' && c !== '-') return undefined;
  const rest = s.slice(pos + 1);
  const match = /^(\d{2}):?(\d{2})$/.exec(rest);
  if (!match) return undefined;
  const hours = Number(match[1]);
  const minutes = Number(match[2]);
  if (hours > 23 || minutes > 59) return undefined;
  const sign = c === '-' ? -1 : 1;
  return sign * (hours * 60 + minutes) * 60_000;
}

/** Formats epoch ms as RFC 3339 UTC with millisecond precision; "invalid" for NaN/out of range. */
export function formatRfc3339Utc(timeMs: number): string {
  if (!Number.isFinite(timeMs) || Math.abs(timeMs) > 8.64e15) return 'invalid';
  return new Date(timeMs).toISOString();
}

/**
 * Reads time cells whose kind (date-time text or epoch number) and epoch unit are fixed by the
 * first valid cell of the file, so one file never mixes units silently. Collects the assumptions
 * to show the user (epoch unit chosen, naive times read as UTC, leap seconds).
 */
export class TimeCellReader {
  #epochUnit: EpochUnit | undefined;
  #hasNaive = false;
  #hasLeap = false;
  #hasOffset = false;
  #isUnitDocumented = false;

  /** Epoch ms for one cell, or NaN when it is neither a date-time nor a number. */
  readTimeMs(cell: string): number {
    // Date-shaped cells ("2024-…") skip the Number() attempt, which would only give NaN.
    if (cell.length >= 10 && cell.charCodeAt(4) === 45 && cell.charCodeAt(0) > 32) return this.#readDateTime(cell);
    const trimmed = cell.charCodeAt(0) > 32 && cell.charCodeAt(cell.length - 1) > 32 ? cell : cell.trim();
    if (trimmed.length === 0) return NaN;
    // Number() accepts plain decimals and exponents; date-times always give NaN here.
    const numeric = Number(trimmed);
    if (!Number.isNaN(numeric)) return this.readEpoch(numeric);
    return this.#readDateTime(trimmed);
  }

  #readDateTime(text: string): number {
    const timeMs = parseDateTimeMs(text);
    if (Number.isNaN(timeMs)) return NaN;
    if (lastIsNaive) this.#hasNaive = true; else this.#hasOffset = true;
    if (lastIsLeapSecond) this.#hasLeap = true;
    return timeMs;
  }

  /**
   * What the last epoch number should have been when readEpoch refused it ('' otherwise), for the
   * caller's message: "an epoch time in seconds like the first one, not milliseconds by its size".
   */
  epochProblem = '';

  /**
   * Epoch ms for a number whose unit is inferred once (from the first value) and then kept. A later
   * number whose size says another unit gives NaN: read in the first one's unit it would land
   * decades away (one time in seconds among nanoseconds would stretch the export back to 1970).
   */
  readEpoch(value: number): number {
    this.epochProblem = '';
    if (!Number.isFinite(value)) return NaN;
    const unit = inferEpochUnit(value);
    if (this.#epochUnit === undefined) this.#epochUnit = unit;
    else if (!this.#isUnitDocumented && unit !== this.#epochUnit) {
      this.epochProblem = `an epoch time in ${UNIT_NAMES[this.#epochUnit]} like the first one, not ${UNIT_NAMES[unit]} by its size`;
      return NaN;
    }
    return convertEpochToMs(value, this.#epochUnit);
  }

  /** Fixes the epoch unit (e.g. seconds for the range-query API, which documents it). */
  setEpochUnit(unit: EpochUnit): void {
    this.#epochUnit = unit;
    this.#isUnitDocumented = true;
  }

  /** Unit chosen for epoch numbers, if any were read. */
  get epochUnit(): EpochUnit | undefined {
    return this.#epochUnit;
  }

  /** Human-readable assumptions made so far. */
  describeAssumptions(): string[] {
    const out: string[] = [];
    if (this.#epochUnit !== undefined && !this.#isUnitDocumented) {
      out.push(`epoch timestamps read as ${UNIT_NAMES[this.#epochUnit]} (chosen by magnitude)`);
    }
    if (this.#hasNaive) out.push(this.#hasOffset ? 'some timestamps had no UTC offset and were read as UTC' : 'timestamps had no UTC offset and were read as UTC');
    if (this.#hasLeap) out.push('leap seconds (:60) read as the following second, as POSIX time does');
    return out;
  }
}

const UNIT_NAMES: Readonly<Record<EpochUnit, string>> = {
  s: 'seconds', ms: 'milliseconds', us: 'microseconds', ns: 'nanoseconds',
};
