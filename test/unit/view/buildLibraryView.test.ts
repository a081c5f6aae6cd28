import assert from 'node:assert/strict';
import type { Finding } from '../../../extension/core/report/types';
import type { NearestIncident } from '../../../extension/core/model/libraryVerdict';
import { buildLibraryView, buildNearestIncidentLink } from '../../../extension/core/view/buildLibraryView';

const T0 = Date.UTC(2026, 1, 3, 8, 30, 0);

/** A finding of the invented Larkspur Provisions shop; only the verdict and library fields vary. */
function makeFinding(extra: Partial<Pick<Finding, 'nearestIncidents'>>, libraryMatch?: NonNullable<Finding['verdict']['libraryMatch']>): Finding {
  return {
    id: 'finding-lib', createdMs: T0, stepMs: 60_000,
    verdict: {
      className: libraryMatch?.label ?? 'cpu_saturation', probability: 0.9, runnerUp: { className: 'traffic_surge', probability: 0.05 }, isAbstained: false,
      probabilities: { cpu_saturation: 0.9, traffic_surge: 0.05, normal: 0.05 }, ...(libraryMatch ? { libraryMatch } : {}),
    },
    incident: { startIndex: 150, endIndex: 195, startMs: T0, endMs: T0 + 45 * 60_000 },
    baseline: { startIndex: 100, endIndex: 149, startMs: T0 - 50 * 60_000, endMs: T0 - 60_000 },
    metrics: [], changePoints: [], caveats: [], openQuestions: [],
    provenance: { exportFile: 'basket-api-cpu-incident-2026-02-03.csv', exportSha256: 'ab', modelVersion: '0.3.0', modelSha256: 'cd', settings: {} },
    ...extra,
  };
}

describe('buildLibraryView', () => {
  it('is absent when the finding was made without an incident library', () => {
    assert.equal(buildLibraryView(makeFinding({})), undefined);
  });

  it('words a library win as a match with its example count, singular and plural (English grammar, common practice)', () => {
    const one = buildLibraryView(makeFinding({ nearestIncidents: [] }, { label: 'basket_cpu_starvation', exampleCount: 1 }));
    assert.equal(one?.matchText, 'Matches your past incident basket_cpu_starvation (1 example)');
    const three = buildLibraryView(makeFinding({ nearestIncidents: [] }, { label: 'basket_cpu_starvation', exampleCount: 3 }));
    assert.equal(three?.matchText, 'Matches your past incident basket_cpu_starvation (3 examples)');
    assert.equal(three?.movedAlikeText, '');
  });

  it('lists the metrics that moved alike under a match, each with its direction', () => {
    const view = buildLibraryView(makeFinding({ nearestIncidents: [] }, { label: 'basket_cpu_starvation', exampleCount: 2, movedAlike: [{ id: 'node_cpu_seconds_total{mode="steal"}', direction: 'up' }, { id: 'node_cpu_seconds_total{mode="idle"}', direction: 'down' }] }));
    assert.equal(view?.movedAlikeText, 'Moved alike here and in those incidents: node_cpu_seconds_total{mode="steal"} ↑, node_cpu_seconds_total{mode="idle"} ↓');
  });

  it('lists nearest incidents in the given order with 3 significant digits and their postmortems', () => {
    const view = buildLibraryView(makeFinding({
      nearestIncidents: [
        { label: 'basket_cpu_starvation', similarity: 0.99312, postmortem: 'postmortems/2026-01-14-basket-checkout-slow.md' },
        { label: 'pantry_pool_exhaustion', similarity: 0.41 },
      ],
    }));
    assert.ok(view);
    assert.equal(view.matchText, '', 'nearest without a win is no match claim');
    // 3 significant digits as ECMA-262 Number.prototype.toPrecision(3) prints them: 0.99312 → "0.993", 0.41 → "0.410".
    assert.deepEqual(view.nearest, [
      { label: 'basket_cpu_starvation', similarityText: '0.993', postmortem: 'postmortems/2026-01-14-basket-checkout-slow.md' },
      { label: 'pantry_pool_exhaustion', similarityText: '0.410', postmortem: '' },
    ]);
  });

  it('shows a non-finite similarity as n/a, never NaN', () => {
    const view = buildLibraryView(makeFinding({ nearestIncidents: [{ label: 'basket_cpu_starvation', similarity: Number.NaN }] }));
    assert.equal(view?.nearest[0].similarityText, 'n/a');
  });

  describe('with the nearest entries the host re-blended (links)', () => {
    const nearest: NearestIncident[] = [
      { id: '20260114T130000Z-3f9a1c', label: 'basket_cpu_starvation', squaredDistance: 0.01, cosineSimilarity: 0.99312, exportFile: 'basket-api-cpu-incident.csv',
        window: { startMs: T0, endMs: T0 + 60_000 }, postmortem: 'postmortems/2026-01-14-basket-checkout-slow.md' },
      { id: '20260120T080000Z-0b1c2d', label: 'pantry_pool_exhaustion', squaredDistance: 0.4, cosineSimilarity: 0.41, exportFile: 'exports/pantry-db-2026-01-20.csv',
        window: { startMs: T0, endMs: T0 + 60_000 } },
    ];

    it('links each incident to its postmortem, or to its export when none was recorded, keeping the order', () => {
      const view = buildLibraryView(makeFinding({ nearestIncidents: [] }), nearest);
      assert.ok(view);
      assert.deepEqual(view.nearest, [
        { label: 'basket_cpu_starvation', similarityText: '0.993', postmortem: 'postmortems/2026-01-14-basket-checkout-slow.md',
          entryId: '20260114T130000Z-3f9a1c', opensKind: 'postmortem', opensPath: 'postmortems/2026-01-14-basket-checkout-slow.md' },
        { label: 'pantry_pool_exhaustion', similarityText: '0.410', postmortem: '',
          entryId: '20260120T080000Z-0b1c2d', opensKind: 'export', opensPath: 'exports/pantry-db-2026-01-20.csv' },
      ]);
    });

    it('takes the linked list over the finding\'s plain one, and shows an empty library as an empty list', () => {
      const finding = makeFinding({ nearestIncidents: [{ label: 'stale_label', similarity: 0.5 }] });
      assert.deepEqual(buildLibraryView(finding, [])?.nearest, []);
      assert.equal(buildLibraryView(makeFinding({}), [])?.matchText, '');
    });

    it('treats an empty postmortem string as none and links the export (JSON cannot tell them apart in old files)', () => {
      const link = buildNearestIncidentLink({ ...nearest[0], postmortem: '' });
      assert.equal(link.opensKind, 'export');
      assert.equal(link.opensPath, 'basket-api-cpu-incident.csv');
    });

    it('shows a NaN similarity as n/a in links too', () => {
      assert.equal(buildNearestIncidentLink({ ...nearest[0], cosineSimilarity: Number.NaN }).similarityText, 'n/a');
    });
  });
});
