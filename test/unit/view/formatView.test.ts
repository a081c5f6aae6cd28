import assert from 'node:assert/strict';
import { describeCliffsDelta, formatClassTitle, formatLabels, formatPercent, formatRfc3339, formatValue } from '../../../extension/core/view/formatView';

describe('formatView', () => {
  it('writes RFC 3339 UTC times (RFC 3339 §5.8 example 1985-04-12T23:20:50.52Z)', () => {
    assert.equal(formatRfc3339(Date.UTC(1985, 3, 12, 23, 20, 50, 520)), '1985-04-12T23:20:50.520Z');
    assert.equal(formatRfc3339(Date.UTC(1985, 3, 12, 23, 20, 50)), '1985-04-12T23:20:50Z');
    assert.equal(formatRfc3339(NaN), 'invalid time');
  });

  it('uses SI prefixes for large values (BIPM SI Brochure 9th ed., table 7: k=10^3, M=10^6, G=10^9)', () => {
    assert.equal(formatValue(1234.5, 'ms'), '1.23k ms');
    assert.equal(formatValue(2.5e6, 'B'), '2.5M B');
    assert.equal(formatValue(7e9), '7G');
    assert.equal(formatValue(0.000123, 's'), '0.000123 s');
    assert.equal(formatValue(NaN, 'ms'), 'gap');
    assert.equal(formatValue(-Infinity), '−∞');
  });

  it('words Cliff\'s delta with the Romano et al. (2006) thresholds 0.147 / 0.33 / 0.474 (from memory)', () => {
    assert.equal(describeCliffsDelta(0.1), 'negligible (δ +0.10)');
    assert.equal(describeCliffsDelta(0.2), 'small rise (δ +0.20)');
    assert.equal(describeCliffsDelta(-0.4), 'medium drop (δ −0.40)');
    assert.equal(describeCliffsDelta(0.9), 'large rise (δ +0.90)');
    assert.equal(describeCliffsDelta(NaN), 'not computable');
  });

  it('prints probabilities as whole percents and labels in sorted order', () => {
    assert.equal(formatPercent(0.873), '87%');
    assert.equal(formatPercent(0.004), '0.4%');
    assert.equal(formatPercent(NaN), 'n/a');
    assert.equal(formatLabels({ service: 'basket-api', host: 'a' }), 'host=a, service=basket-api');
    assert.equal(formatClassTitle('disk_io_saturation'), 'Disk I/O saturation');
    assert.equal(formatClassTitle('pantry_db_lock_wait'), 'pantry db lock wait');
  });
});
