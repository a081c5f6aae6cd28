import assert from 'node:assert/strict';
import { convertNanosStringToMs, formatRfc3339Utc, inferEpochUnit, parseDateTime, TimeCellReader } from '../../../extension/core/ingest/timestamps';

const iso = (text: string): string => formatRfc3339Utc(parseDateTime(text).timeMs);

describe('timestamps', () => {
  describe('RFC 3339 §5.8 examples (https://datatracker.ietf.org/doc/html/rfc3339#section-5.8)', () => {
    it('reads 1985-04-12T23:20:50.52Z with its fraction of a second', () => {
      assert.equal(iso('1985-04-12T23:20:50.52Z'), '1985-04-12T23:20:50.520Z');
    });
    it('reads 1996-12-19T16:39:57-08:00 as 1996-12-20T00:39:57Z (the RFC states the equivalence)', () => {
      assert.equal(iso('1996-12-19T16:39:57-08:00'), '1996-12-20T00:39:57.000Z');
    });
    it('reads the leap second 1990-12-31T23:59:60Z as the following second, as POSIX time does', () => {
      const parsed = parseDateTime('1990-12-31T23:59:60Z');
      assert.equal(formatRfc3339Utc(parsed.timeMs), '1991-01-01T00:00:00.000Z');
      assert.equal(parsed.isLeapSecond, true);
    });
    it('reads 1990-12-31T15:59:60-08:00 as the same instant as the UTC leap second', () => {
      assert.equal(parseDateTime('1990-12-31T15:59:60-08:00').timeMs, parseDateTime('1990-12-31T23:59:60Z').timeMs);
    });
    it('reads the odd offset 1937-01-01T12:00:27.87+00:20 as 11:40:27.87 UTC', () => {
      assert.equal(iso('1937-01-01T12:00:27.87+00:20'), '1937-01-01T11:40:27.870Z');
    });
  });

  it('agrees with Date.parse (ECMAScript date-time string format) on offset forms', () => {
    // Date.parse implements the ISO 8601 profile of ECMA-262 §21.4.3.2 — an outside reference.
    for (const text of ['2024-02-29T23:59:59.999+05:30', '2001-09-09T01:46:40Z', '2030-01-01T00:00:00-00:00']) {
      assert.equal(parseDateTime(text).timeMs, Date.parse(text), text);
    }
  });

  it('reads years before 100 as written (Date.UTC alone would move 0050 to 1950)', () => {
    assert.equal(iso('0050-06-01T00:00:00Z'), '0050-06-01T00:00:00.000Z');
  });

  it('reads naive date-times as UTC and says so', () => {
    const parsed = parseDateTime('2024-03-01 10:00:00');
    assert.equal(formatRfc3339Utc(parsed.timeMs), '2024-03-01T10:00:00.000Z');
    assert.equal(parsed.isNaive, true);
    const reader = new TimeCellReader();
    reader.readTimeMs('2024-03-01T10:00:00');
    assert.match(reader.describeAssumptions().join(' '), /read as UTC/);
  });

  it('rejects impossible dates and malformed offsets instead of rolling them over', () => {
    for (const text of ['2023-02-31T00:00:00Z', '2024-13-01T00:00:00Z', '2024-01-01T24:00:00Z', '2024-01-01T10:00:00+25:00', 'yesterday', '2024-01-01T10:00:00Zjunk']) {
      assert.ok(Number.isNaN(parseDateTime(text).timeMs), text);
    }
  });

  describe('epoch units by magnitude (REFERENCE.md §1.1 digit counts; check values §4.3 no. 10)', () => {
    it('chooses s, ms, µs and ns from the digit count', () => {
      assert.equal(inferEpochUnit(1435781451.781), 's');
      assert.equal(inferEpochUnit(1544712660300), 'ms');
      assert.equal(inferEpochUnit(1544712660300000), 'us');
      assert.equal(inferEpochUnit(1544712660300000000), 'ns');
    });
    it('reads the OTLP example time 1544712660300000000 ns as 2018-12-13T14:51:00.300Z (opentelemetry-proto examples/metrics.json)', () => {
      assert.equal(formatRfc3339Utc(convertNanosStringToMs('1544712660300000000')), '2018-12-13T14:51:00.300Z');
    });
    it('matches exact BigInt arithmetic for nanosecond strings beyond 2^53', () => {
      // BigInt division (ECMAScript) is the exact reference; JSON.parse would round these digits first.
      for (const digits of ['1544712660300999999', '1700000000123456789', '9223372036854775807', '-1544712660300000000']) {
        const exactMs = Number(BigInt(digits) / 1_000_000n) + Number(BigInt(digits) % 1_000_000n) / 1e6;
        assert.ok(Math.abs(convertNanosStringToMs(digits) - exactMs) < 1e-3, digits);
      }
      assert.ok(Number.isNaN(convertNanosStringToMs('12x')));
    });
    it('reads the query API documentation time 1435781451.781 s as 2015-07-01T20:10:51.781Z', () => {
      const reader = new TimeCellReader();
      assert.equal(formatRfc3339Utc(reader.readTimeMs('1435781451.781')), '2015-07-01T20:10:51.781Z');
      assert.equal(reader.epochUnit, 's');
    });
    it('keeps the unit chosen by the first value for the rest of the file', () => {
      const reader = new TimeCellReader();
      reader.readTimeMs('1700000000000');
      assert.equal(reader.readTimeMs('1700000060000'), 1700000060000);
      assert.match(reader.describeAssumptions()[0], /milliseconds/);
    });
  });
});
