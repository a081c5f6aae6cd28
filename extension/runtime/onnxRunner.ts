/**
 * The only importer of onnxruntime-node. Loads media/model/classifier.onnx + classifier.json,
 * refuses a model whose sha256 differs from the one recorded in classifier.json, creates the
 * session lazily (once), validates every batch before `session.run` (a native failure inside
 * onnxruntime can take down the whole extension host, a thrown Error cannot), and splits large
 * batches so memory stays bounded.
 */
import { createHash } from 'node:crypto';
import { readFile } from 'node:fs/promises';
import { join } from 'node:path';
import type * as Ort from 'onnxruntime-node';
import { parseClassifierSpec, type ClassifierSpec } from '../core/model/classifierSpec';
import { getRowLength } from '../core/model/encode';
import type { InferenceRunner, ModelOutput, NodeBatch } from '../core/model/types';

/** A runner that can release its native session. */
export interface ReleasableRunner extends InferenceRunner {
  release(): Promise<void>;
}

export interface LoadedClassifier {
  readonly runner: ReleasableRunner;
  readonly spec: ClassifierSpec;
  /** sha256 (hex) of the model file as read. */
  readonly sha256: string;
}

/** Largest number of node rows (batch × nodes) sent to onnxruntime in one run. */
const MAX_ROWS_PER_RUN = 65_536;

/** Throws when the batch's shapes, dtypes or values do not fit the ONNX contract. */
export function validateBatch(batch: NodeBatch, rowLength: number): void {
  const { batchSize: b, nodeCount: n, windowLength: w } = batch;
  const where = `model input [${b}, ${n}, ${w}]`;
  if (!Number.isInteger(b) || !Number.isInteger(n) || b < 1 || n < 1) throw new Error(`${where}: expected batch ≥ 1 and nodes ≥ 1`);
  if (w !== rowLength) throw new Error(`${where}: expected row length ${rowLength}, got ${w}`);
  if (!(batch.values instanceof Float32Array) || batch.values.length !== b * n * w) throw new Error(`${where}: expected ${b * n * w} float32 values, got ${batch.values.length}`);
  if (!(batch.families instanceof BigInt64Array) || batch.families.length !== b * n) throw new Error(`${where}: expected ${b * n} int64 family ids, got ${batch.families.length}`);
  if (!(batch.mask instanceof Float32Array) || batch.mask.length !== b * n) throw new Error(`${where}: expected ${b * n} float32 mask entries, got ${batch.mask.length}`);
  for (let i = 0; i < batch.values.length; i++) {
    if (!Number.isFinite(batch.values[i])) throw new Error(`${where}: expected finite values, got ${batch.values[i]} at flat index ${i}`);
  }
  for (let i = 0; i < batch.families.length; i++) {
    const f = batch.families[i];
    if (f < 0n || f > 10n) throw new Error(`${where}: expected family ids 0..10, got ${f} at index ${i}`);
    const m = batch.mask[i];
    if (m !== 0 && m !== 1) throw new Error(`${where}: expected mask 0 or 1, got ${m} at index ${i}`);
  }
}

function sliceBatch(batch: NodeBatch, start: number, end: number): NodeBatch {
  const rows = batch.nodeCount;
  const w = batch.windowLength;
  return {
    batchSize: end - start, nodeCount: rows, windowLength: w,
    values: batch.values.subarray(start * rows * w, end * rows * w),
    families: batch.families.subarray(start * rows, end * rows),
    mask: batch.mask.subarray(start * rows, end * rows),
  };
}

/**
 * Load the classifier from `modelDir` (classifier.onnx + classifier.json). Rejects with an Error
 * naming both hashes when the model file's sha256 differs from classifier.json's, and with the
 * field at fault when classifier.json is malformed. The onnxruntime session is created on first run.
 */
export async function loadClassifierModel(modelDir: string): Promise<LoadedClassifier> {
  const jsonPath = join(modelDir, 'classifier.json');
  const onnxPath = join(modelDir, 'classifier.onnx');
  let spec: ClassifierSpec;
  try {
    spec = parseClassifierSpec(JSON.parse(await readFile(jsonPath, 'utf8')) as unknown);
  } catch (error) {
    throw new Error(`${jsonPath}: ${(error as Error).message}`);
  }
  const bytes = await readFile(onnxPath);
  const sha256 = createHash('sha256').update(bytes).digest('hex');
  if (sha256 !== spec.sha256) {
    throw new Error(`${onnxPath}: model file sha256 ${sha256} does not match ${spec.sha256} recorded in classifier.json; refusing to load a model that was changed or replaced`);
  }
  const rowLength = getRowLength(spec.windowSpec);
  let session: Promise<Ort.InferenceSession> | null = null;
  let ort: typeof Ort | null = null;
  const getSession = (): Promise<Ort.InferenceSession> => {
    session ??= (async () => {
      ort = await import('onnxruntime-node');
      return ort.InferenceSession.create(bytes, { graphOptimizationLevel: 'all', intraOpNumThreads: 1 });
    })();
    return session;
  };
  const runOnce = async (batch: NodeBatch): Promise<ModelOutput> => {
    const s = await getSession();
    const o = ort as typeof Ort;
    const { batchSize: b, nodeCount: n, windowLength: w } = batch;
    const result = await s.run({
      values: new o.Tensor('float32', batch.values, [b, n, w]),
      families: new o.Tensor('int64', batch.families, [b, n]),
      mask: new o.Tensor('float32', batch.mask, [b, n]),
    });
    const logits = result.logits.data as Float32Array;
    const embedding = result.embedding.data as Float32Array;
    return { logits, embedding, classCount: logits.length / b, embeddingSize: embedding.length / b };
  };
  const runner: ReleasableRunner = {
    async run(batch: NodeBatch): Promise<ModelOutput> {
      validateBatch(batch, rowLength);
      const perRun = Math.max(1, Math.floor(MAX_ROWS_PER_RUN / batch.nodeCount));
      if (batch.batchSize <= perRun) return runOnce(batch);
      const c = spec.classes.length;
      const d = spec.embeddingSize;
      const logits = new Float32Array(batch.batchSize * c);
      const embedding = new Float32Array(batch.batchSize * d);
      for (let start = 0; start < batch.batchSize; start += perRun) {
        const end = Math.min(batch.batchSize, start + perRun);
        const part = await runOnce(sliceBatch(batch, start, end));
        logits.set(part.logits, start * c);
        embedding.set(part.embedding, start * d);
      }
      return { logits, embedding, classCount: c, embeddingSize: d };
    },
    async release(): Promise<void> {
      if (session) {
        const s = await session;
        session = null;
        await s.release();
      }
    },
  };
  return { runner, spec, sha256 };
}
