/**
 * Noisy normals checked against real data: quiet stretches of the Numenta Anomaly Benchmark's
 * cloud metrics (open data, MIT; test/fixtures/nab-cloud, labelled anomaly windows excluded)
 * against the simulator's normal windows, with the same window (3–64) and baseline (3–720)
 * length draws. A simulator whose quiet periods are clean would train a model that calls every
 * real wobble a fault (DESIGN.md §6 point 2).
 */
import assert from 'node:assert/strict';
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import Papa from 'papaparse';
import { createRandom, sampleExamples } from '../../../training/simulator';

const NAB_DIR = join(__dirname, '..', '..', 'fixtures', 'nab-cloud');

function median(values: ArrayLike<number>): number {
  const v = Array.from(values).filter((x) => !Number.isNaN(x)).sort((a, b) => a - b);
  if (v.length === 0) return Number.NaN;
  const mid = v.length >> 1;
  return v.length % 2 ? (v[mid] as number) : ((v[mid - 1] as number) + (v[mid] as number)) / 2;
}

/** Robust z (1.4826·MAD of the baseline) of the window median and of the window's largest point. */
function robustZ(baseline: ArrayLike<number>, window: ArrayLike<number>): { zMedian: number; zMax: number } {
  const mb = median(baseline);
  const scale = 1.4826 * median(Array.from(baseline, (x) => Math.abs(x - mb))) + 1e-9 * Math.abs(mb) + 1e-12;
  let zMax = 0;
  for (const x of Array.from(window)) if (!Number.isNaN(x)) zMax = Math.max(zMax, Math.abs(x - mb) / scale);
  return { zMedian: (median(window) - mb) / scale, zMax };
}

interface Shares { readonly median3: number; readonly median5: number; readonly point3: number; readonly point5: number }
function summarise(zs: ReadonlyArray<{ zMedian: number; zMax: number }>): Shares {
  const share = (p: (z: { zMedian: number; zMax: number }) => boolean): number => zs.filter(p).length / zs.length;
  return { median3: share((z) => Math.abs(z.zMedian) > 3), median5: share((z) => Math.abs(z.zMedian) > 5), point3: share((z) => z.zMax >= 3), point5: share((z) => z.zMax >= 5) };
}

function measureNabQuietWindows(): Shares {
  const labels = Papa.parse<Record<string, string>>(readFileSync(join(NAB_DIR, 'labels.csv'), 'utf8'), { header: true, skipEmptyLines: true }).data;
  const rng = createRandom(5);
  const drawLength = (lo: number, hi: number): number => Math.min(hi, Math.floor(rng.chance(0.5) ? rng.logUniform(lo, hi + 1) : rng.uniform(lo, hi + 1)));
  const zs: Array<{ zMedian: number; zMax: number }> = [];
  for (const file of readdirSync(join(NAB_DIR, 'series'))) {
    const rows = Papa.parse<string[]>(readFileSync(join(NAB_DIR, 'series', file), 'utf8'), { skipEmptyLines: true }).data.slice(1);
    const timesMs = rows.map((r) => Date.parse(r[0] as string));
    const values = rows.map((r) => Number(r[1]));
    const faults = labels.filter((l) => l.file === `series/${file}`).map((l) => [Date.parse(l.fault_start as string), Date.parse(l.fault_end as string)] as const);
    for (let k = 0; k < 300; k += 1) {
      const windowSteps = drawLength(3, 64);
      const baselineSteps = drawLength(3, 720);
      const start = rng.int(baselineSteps, values.length - windowSteps);
      const fromMs = timesMs[start - baselineSteps] as number;
      const toMs = timesMs[start + windowSteps - 1] as number;
      if (faults.some(([a, b]) => toMs >= a && fromMs <= b)) continue;
      zs.push(robustZ(values.slice(start - baselineSteps, start), values.slice(start, start + windowSteps)));
    }
  }
  return summarise(zs);
}

describe('simulator: realism against open data', () => {
  it('makes normal windows about as noisy as quiet real cloud metrics (NAB), within a factor of two', function () {
    this.timeout(300_000);
    const real = measureNabQuietWindows();
    const examples = sampleExamples({ seed: 11, count: 300, systemSeeds: Array.from({ length: 60 }, (_, k) => 900 + k), classes: ['normal'] });
    const zs: Array<{ zMedian: number; zMax: number }> = [];
    for (const e of examples) {
      e.metrics.forEach((m, k) => {
        if (!(e.truth?.[k]?.role ?? '').startsWith('irrelevant')) zs.push(robustZ(m.baseline, m.window));
      });
    }
    const simulated = summarise(zs);
    for (const key of ['median3', 'median5', 'point3', 'point5'] as const) {
      const ratio = simulated[key] / real[key];
      assert.ok(ratio >= 0.5 && ratio <= 2, `${key}: simulated ${(simulated[key] * 100).toFixed(1)} % vs real ${(real[key] * 100).toFixed(1)} %`);
    }
  });
});
