import { strict as assert } from 'node:assert';
import { chooseTimelineBaseline, gatherRanges } from '../../../extension/core/model/timelineBaseline';

describe('timeline baseline that skips a known incident', () => {
  it('is the plain trailing baseline when no excluded range reaches it', () => {
    assert.deepEqual(chooseTimelineBaseline(100, 20, [{ startIndex: 40, endIndex: 60 }], 3), [{ startIndex: 80, endIndex: 99 }]);
    assert.deepEqual(chooseTimelineBaseline(10, 20, [], 3), [{ startIndex: 0, endIndex: 9 }]);
  });

  it('reaches back past the incident for a window right after it (worked by hand)', () => {
    // Window starts at 70, incident 50..65: kept steps 66..69 (4), then 34..49 (16) just before the incident: 20 in all.
    assert.deepEqual(chooseTimelineBaseline(70, 20, [{ startIndex: 50, endIndex: 65 }], 3), [{ startIndex: 34, endIndex: 49 }, { startIndex: 66, endIndex: 69 }]);
    // A window inside the incident (starts at 55) is compared with the 20 steps before the incident.
    assert.deepEqual(chooseTimelineBaseline(55, 20, [{ startIndex: 50, endIndex: 65 }], 3), [{ startIndex: 30, endIndex: 49 }]);
  });

  it('skips several excluded ranges and stops at the start of the grid', () => {
    const exclude = [{ startIndex: 2, endIndex: 4 }, { startIndex: 8, endIndex: 9 }];
    // Before 12: 10..11 (2), skip 8..9, 5..7 (3), skip 2..4, 0..1 (2): 7 steps, fewer than the 20 asked for.
    assert.deepEqual(chooseTimelineBaseline(12, 20, exclude, 3), [{ startIndex: 0, endIndex: 1 }, { startIndex: 5, endIndex: 7 }, { startIndex: 10, endIndex: 11 }]);
  });

  it('falls back to the trailing baseline when too few steps are left outside the incident', () => {
    assert.deepEqual(chooseTimelineBaseline(12, 10, [{ startIndex: 1, endIndex: 10 }], 3), [{ startIndex: 2, endIndex: 11 }]);
  });

  it('gathers the values of the ranges in order, as a view when there is one range', () => {
    const values = Float64Array.from({ length: 12 }, (_, i) => i * 10);
    assert.deepEqual(Array.from(gatherRanges(values, [{ startIndex: 0, endIndex: 1 }, { startIndex: 5, endIndex: 6 }])), [0, 10, 50, 60]);
    const view = gatherRanges(values, [{ startIndex: 3, endIndex: 4 }]);
    assert.equal(view.buffer, values.buffer);
  });
});
