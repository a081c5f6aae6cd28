import assert from 'node:assert/strict';
import type { Finding } from '../../../extension/core/report/types';
import { buildLibraryView } from '../../../extension/core/view/buildLibraryView';

const T0 = Date.UTC(2026, 1, 3, 8, 30, 0);

/** A finding of the invented Larkspur Provisions shop; only the verdict and library fields vary. */
function makeFinding(extra: Partial<Pick<Finding, 'nearestIncidents'>>, libraryMatch?: { label: string; exampleCount: number }): Finding {
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
});
