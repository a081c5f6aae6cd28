import assert from 'node:assert/strict';
import { join } from 'node:path';
import { loadFrame } from '../../../extension/node/readExport';
import { loadClassifierModel, type LoadedClassifier } from '../../../extension/runtime/onnxRunner';
import { createClassifier } from '../../../extension/core/model/classifier';
import { createLibraryEmbedder } from '../../../extension/core/model/libraryEmbed';
import { createLibraryEntry, formatLibraryModelVersion, reembedLibrary } from '../../../extension/core/model/libraryEntry';
import { extractLibraryMetrics, findIndexWindow } from '../../../extension/core/model/libraryFrame';
import { matchLibrary } from '../../../extension/core/model/libraryMatch';
import { LIBRARY_SCHEMA_VERSION } from '../../../extension/core/model/libraryTypes';

// Real data: NAB realAWSCloudwatch ec2_cpu_utilization_24ae8d (numenta/NAB, MIT; test/fixtures/nab-cloud),
// with its labelled anomaly point 2014-02-26T22:05:00Z (labels.csv). Real bundled model: media/model.
const FIXTURE = join(__dirname, '../../fixtures/nab-cloud/series/realAWSCloudwatch__ec2_cpu_utilization_24ae8d.csv');
const MODEL_DIR = join(__dirname, '../../../media/model');

describe('library re-embedding with the bundled model', () => {
  let model: LoadedClassifier;
  before(async () => { model = await loadClassifierModel(MODEL_DIR); });
  after(async () => { await model.runner.release(); });

  it('recomputes a stale entry from its stored metrics into the current model space and then matches it', async () => {
    const { frame, sha256 } = await loadFrame(FIXTURE);
    const window = findIndexWindow(frame.timesMs, { startMs: Date.parse('2014-02-26T21:40:00Z'), endMs: Date.parse('2014-02-26T22:30:00Z') });
    const baseline = findIndexWindow(frame.timesMs, { startMs: Date.parse('2014-02-26T09:40:00Z'), endMs: Date.parse('2014-02-26T21:35:00Z') });
    assert.ok(window && baseline);
    assert.equal(window.endIndex - window.startIndex + 1, 11, '5-minute samples, both ends inclusive');
    const classifier = createClassifier(model.runner, model.spec);
    const verdict = await classifier.classifyWindow(frame, window, baseline);
    const currentVersion = formatLibraryModelVersion(model.spec.version, model.sha256);
    // An entry saved by an older model: another version and another embedding size.
    const stale = createLibraryEntry({
      id: '20261104T140300Z-000001', label: 'cpu_saturation', window: { startMs: frame.timesMs[window.startIndex], endMs: frame.timesMs[window.endIndex] },
      baseline: { startMs: frame.timesMs[baseline.startIndex], endMs: frame.timesMs[baseline.endIndex] }, exportSha256: sha256,
      exportFile: 'realAWSCloudwatch__ec2_cpu_utilization_24ae8d.csv', createdMs: 0, modelVersion: 'older-model', embedding: [0.5, 0.25, 0.125],
      metrics: extractLibraryMetrics(frame, window, baseline),
    });
    assert.equal(stale.metrics[0].baseline.length, 64, '144 baseline samples kept as 64');
    const before = matchLibrary(toRecord(model.spec.classes, verdict.probabilities), verdict.embedding, [stale], currentVersion);
    assert.equal(before.staleEntryCount, 1);

    const result = await reembedLibrary({ schemaVersion: LIBRARY_SCHEMA_VERSION, entries: [stale] }, currentVersion, createLibraryEmbedder(model.runner, model.spec.windowSpec));
    const [fresh] = result.document.entries;
    assert.deepEqual(result.reembeddedIds, [stale.id]);
    assert.equal(fresh.modelVersion, currentVersion);
    assert.equal(fresh.embedding.length, model.spec.embeddingSize);
    // Stored data (baseline thinned to 64 picked samples) lands next to the live full-resolution embedding.
    assert.ok(cosine(fresh.embedding, verdict.embedding) > 0.98, `cosine ${cosine(fresh.embedding, verdict.embedding)}`);
    const after = matchLibrary(toRecord(model.spec.classes, verdict.probabilities), verdict.embedding, result.document.entries, currentVersion);
    assert.equal(after.usedEntryCount, 1);
    assert.equal(after.nearest[0].id, stale.id);
  });
});

function toRecord(classes: readonly string[], probabilities: ArrayLike<number>): Record<string, number> {
  return Object.fromEntries(classes.map((c, i) => [c, probabilities[i]]));
}

function cosine(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let dot = 0; let na = 0; let nb = 0;
  for (let i = 0; i < a.length; i++) { dot += a[i] * b[i]; na += a[i] * a[i]; nb += b[i] * b[i]; }
  return dot / Math.sqrt(na * nb);
}
