/**
 * Shared by the library tests that run the REAL bundled model (media/model) on simulated incidents
 * of the invented Larkspur Provisions services: classify examples, and store them as entries.
 */
import { join } from 'node:path';
import type { LoadedClassifier } from '../../../extension/runtime/onnxRunner';
import { computeCalibratedLogProbabilities } from '../../../extension/core/model/classifier';
import { encodeBatch } from '../../../extension/core/model/encode';
import { createLibraryEntry } from '../../../extension/core/model/libraryEntry';
import type { LibraryEntry } from '../../../extension/core/model/libraryTypes';
import type { TrainingExample } from '../../../training/simulator';

export const MODEL_DIR = join(__dirname, '../../../media/model');
export const POOL = 'connection_pool_exhaustion';

export interface Classified { readonly example: TrainingExample; readonly probabilities: Record<string, number>; readonly embedding: number[] }

/** The bundled model's calibrated probabilities (by class name) and embedding for each example. */
export async function classify(model: LoadedClassifier, examples: readonly TrainingExample[]): Promise<Classified[]> {
  const output = await model.runner.run(encodeBatch(examples.map((e) => e.metrics), model.spec.windowSpec));
  return examples.map((example, i) => {
    const logProbabilities = computeCalibratedLogProbabilities(output.logits.subarray(i * output.classCount, (i + 1) * output.classCount), model.spec.temperature);
    return {
      example,
      probabilities: Object.fromEntries(model.spec.classes.map((c, j) => [c, Math.exp(logProbabilities[j])])),
      embedding: Array.from(output.embedding.subarray(i * output.embeddingSize, (i + 1) * output.embeddingSize)),
    };
  });
}

/** A classified example as the team's library entry number `index` (its metrics as stored). */
export function toEntry(c: Classified, index: number, modelVersion: string): LibraryEntry {
  const n = String(index).padStart(2, '0');
  return createLibraryEntry({
    id: `20261202T0${n}000Z-0000${n}`, label: c.example.label, window: { startMs: 0, endMs: 1 }, baseline: { startMs: 0, endMs: 1 },
    exportSha256: '0'.repeat(64), exportFile: `exports/pantry-db-${index}.csv`, createdMs: 0, modelVersion, embedding: c.embedding,
    metrics: c.example.metrics.map((m) => ({ ...m, name: m.name ?? m.id })),
  });
}
