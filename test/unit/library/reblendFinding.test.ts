import assert from 'node:assert/strict';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createClassifier } from '../../../extension/core/model/classifier';
import { createLibraryEntry, formatLibraryModelVersion } from '../../../extension/core/model/libraryEntry';
import type { LibraryEntry } from '../../../extension/core/model/libraryTypes';
import { reblendFinding, toBaseVerdict, type BaseVerdict } from '../../../extension/host/reblendFinding';
import { analyzeExport, type AnalysisResult } from '../../../extension/node/analyze';
import { updateLibraryFile } from '../../../extension/node/libraryStore';
import { applyLibraryChange } from '../../../extension/core/model/librarySerialize';
import { loadClassifierModel, type LoadedClassifier } from '../../../extension/runtime/onnxRunner';

const ROOT = join(__dirname, '..', '..', '..');
const MODEL_DIR = join(ROOT, 'media', 'model');
// Real open data: Numenta Anomaly Benchmark cloud series (MIT licence, LICENSE.txt beside it).
const EXPORT = join(ROOT, 'test', 'fixtures', 'nab-cloud', 'series', 'realAWSCloudwatch__ec2_cpu_utilization_24ae8d.csv');
const NOW_MS = Date.UTC(2026, 0, 1);
const STALE_CAVEAT = /incident-library entries were embedded by another model version/;

/** A library entry of the invented Larkspur Provisions shop, cut from the analysed window. */
function makeEntryFrom(result: AnalysisResult, embedding: readonly number[], options: { id: string; label: string; modelVersion: string; postmortem?: string }): LibraryEntry {
  const { frame, finding } = result;
  const cut = (values: Float64Array, w: { startIndex: number; endIndex: number }): Float64Array => values.subarray(w.startIndex, w.endIndex + 1);
  return createLibraryEntry({
    id: options.id, label: options.label, window: { startMs: finding.incident.startMs, endMs: finding.incident.endMs },
    baseline: { startMs: finding.baseline.startMs, endMs: finding.baseline.endMs }, exportSha256: finding.provenance.exportSha256,
    exportFile: finding.provenance.exportFile, createdMs: NOW_MS, modelVersion: options.modelVersion, embedding,
    ...(options.postmortem !== undefined ? { postmortem: options.postmortem } : {}),
    metrics: frame.series.map((s) => ({ id: s.id, name: s.name, family: s.family, baseline: cut(s.values, finding.baseline), window: cut(s.values, finding.incident) })),
  });
}

function sum(values: Readonly<Record<string, number>>): number {
  return Object.values(values).reduce((a, b) => a + b, 0);
}

describe('reblendFinding (real bundled model, real labelled cloud series)', function () {
  this.timeout(120_000);
  let model: LoadedClassifier;
  let plain: AnalysisResult;
  let base: BaseVerdict;
  let modelVersion: string;
  let dir: string;

  before(async () => {
    dir = mkdtempSync(join(tmpdir(), 'reblend-'));
    model = await loadClassifierModel(MODEL_DIR);
    modelVersion = formatLibraryModelVersion(model.spec.version, model.sha256);
    plain = await analyzeExport(EXPORT, { modelDir: MODEL_DIR, nowMs: NOW_MS, shapleyBudgetMs: 200 });
    const abstainThreshold = plain.finding.provenance.settings.abstainThreshold;
    assert.equal(typeof abstainThreshold, 'number');
    const verdict = await createClassifier(model.runner, model.spec).classifyWindow(plain.frame, plain.finding.incident, plain.finding.baseline, { abstainThreshold: abstainThreshold as number });
    base = toBaseVerdict(verdict, model.spec.classes, modelVersion, abstainThreshold as number);
  });

  after(async () => {
    await model?.runner.release();
    rmSync(dir, { recursive: true, force: true });
  });

  it('states the base verdict exactly as an analysis without a library does', () => {
    assert.deepEqual(base.summary, plain.finding.verdict);
  });

  it('gives the same verdict, nearest incidents, caveats and questions as a full re-analysis with the new library', async () => {
    const libraryPath = join(dir, 'incident-library.json');
    const entry = makeEntryFrom(plain, Array.from(base.embedding), { id: '20260101T000000Z-aaaaaa', label: 'ec2_cpu_runaway', modelVersion, postmortem: 'postmortems/ec2-cpu.md' });
    const stale = makeEntryFrom(plain, [1, 2, 3], { id: '20260101T000000Z-bbbbbb', label: 'pantry_db_lock_wait', modelVersion: 'older-model' });
    const saved = await updateLibraryFile(libraryPath, (doc) => applyLibraryChange(doc, { upsert: [entry, stale] }));
    const reanalysed = await analyzeExport(EXPORT, { modelDir: MODEL_DIR, nowMs: NOW_MS, shapleyBudgetMs: 200, libraryPath });

    const reblended = reblendFinding(plain.frame, plain.finding, base, saved.entries);
    assert.deepEqual(reblended.finding.verdict, reanalysed.finding.verdict);
    assert.deepEqual(reblended.finding.nearestIncidents, reanalysed.finding.nearestIncidents);
    assert.deepEqual(reblended.finding.caveats, reanalysed.finding.caveats);
    assert.deepEqual(reblended.finding.openQuestions, reanalysed.finding.openQuestions);
    assert.equal(reblended.finding.id, plain.finding.id, 'same window, same finding id');
    assert.equal(reblended.staleEntryCount, 1);
    // The nearest entry keeps its id and export for the viewer's link.
    assert.equal(reblended.nearest[0].id, entry.id);
    assert.equal(reblended.nearest[0].exportFile, 'realAWSCloudwatch__ec2_cpu_utilization_24ae8d.csv');
    // Cosine similarity of a vector with itself is 1 (equality case of Cauchy–Schwarz).
    assert.ok(Math.abs(reblended.nearest[0].cosineSimilarity - 1) < 1e-6, `similarity ${reblended.nearest[0].cosineSimilarity}`);
    // A mixture of two probability distributions is one (Kolmogorov's axioms): the blend sums to 1.
    assert.ok(Math.abs(sum(reblended.finding.verdict.probabilities) - 1) < 1e-6);
  });

  it('returns to the base verdict and drops the stale-entry caveat when the entries are removed', () => {
    const stale = makeEntryFrom(plain, [1, 2, 3], { id: '20260101T000000Z-bbbbbb', label: 'pantry_db_lock_wait', modelVersion: 'older-model' });
    const withStale = reblendFinding(plain.frame, plain.finding, base, [stale]);
    assert.equal(withStale.finding.caveats.filter((c) => STALE_CAVEAT.test(c)).length, 1);
    const emptied = reblendFinding(plain.frame, withStale.finding, base, []);
    assert.deepEqual(emptied.finding.verdict, plain.finding.verdict);
    assert.deepEqual(emptied.finding.nearestIncidents, []);
    assert.deepEqual(emptied.finding.caveats, plain.finding.caveats);
    assert.deepEqual(emptied.finding.openQuestions, plain.finding.openQuestions);
  });

  it('removes the nearest incidents entirely when the library file is gone, as an analysis without one', () => {
    const entry = makeEntryFrom(plain, Array.from(base.embedding), { id: '20260101T000000Z-aaaaaa', label: 'ec2_cpu_runaway', modelVersion });
    const withEntry = reblendFinding(plain.frame, plain.finding, base, [entry]);
    const gone = reblendFinding(plain.frame, withEntry.finding, base, undefined);
    assert.equal(gone.finding.nearestIncidents, undefined);
    assert.deepEqual(gone.finding.verdict, plain.finding.verdict);
    assert.deepEqual(gone.nearest, []);
  });

  it('keeps windows, metrics, provenance and Shapley values untouched', () => {
    const entry = makeEntryFrom(plain, Array.from(base.embedding), { id: '20260101T000000Z-aaaaaa', label: 'ec2_cpu_runaway', modelVersion });
    const { finding } = reblendFinding(plain.frame, plain.finding, base, [entry]);
    assert.equal(finding.metrics, plain.finding.metrics);
    assert.equal(finding.incident, plain.finding.incident);
    assert.equal(finding.baseline, plain.finding.baseline);
    assert.equal(finding.provenance, plain.finding.provenance);
  });

  it('refuses a verdict whose probabilities do not match the class list', () => {
    const verdict = { classIndex: 0, className: 'normal', probability: 1, runnerUp: { classIndex: 1, className: 'cpu_saturation', probability: 0 },
      probabilities: Float64Array.of(1, 0), isAbstained: false, isOutOfDistribution: false, centroidDistance: 0, embedding: new Float32Array(2), usedMetricCount: 1, skippedMetricIds: [] };
    assert.throws(() => toBaseVerdict(verdict, ['normal', 'cpu_saturation', 'memory_leak'], 'v', 0.5), /expected 3 class probabilities, got 2/);
  });
});
