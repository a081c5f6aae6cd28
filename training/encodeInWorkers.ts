/**
 * Draws and encodes a split in chunks on worker threads (training/encodeWorker.ts), the chunks
 * reassembled in order: the result is the same as drawing and encoding the split in one thread
 * (tested), only faster on more cores. The raw windows of a chunk never leave its worker.
 */
import { join } from 'node:path';
import type { EncodedExample } from './buildDataset';
import { unpackEncodedChunk, type PackedChunk } from './packEncodedChunk';
import type { SampleOptions } from './simulator';
import { startTsWorker } from './startTsWorker';

/** Labels are indices in `labelClasses` (default the built-in CLASSES; examples of other classes are skipped). */
export async function encodeInWorkers(options: SampleOptions, workerCount = 2, chunkSize = 2000, labelClasses?: readonly string[]): Promise<EncodedExample[]> {
  if (!Number.isInteger(workerCount) || workerCount < 1) throw new Error(`encodeInWorkers: expected workerCount as a positive integer, got ${workerCount}`);
  const starts: number[] = [];
  for (let first = 0; first < options.count; first += chunkSize) starts.push(first);
  const chunks = new Map<number, EncodedExample[]>();
  const entry = join(__dirname, 'encodeWorker.ts');
  const workers = Array.from({ length: Math.min(workerCount, Math.max(1, starts.length)) }, () => startTsWorker(entry, { options, labelClasses }));
  let next = 0;
  try {
    await Promise.all(workers.map((worker) => new Promise<void>((resolve, reject) => {
      const ask = (): void => {
        if (next >= starts.length) { resolve(); return; }
        const first = starts[next++];
        worker.postMessage({ firstIndex: first, count: Math.min(chunkSize, options.count - first) });
      };
      worker.on('message', (message: { firstIndex: number; packed: PackedChunk }) => {
        chunks.set(message.firstIndex, unpackEncodedChunk(message.packed));
        ask();
      });
      worker.on('error', reject);
      worker.on('exit', (code: number) => reject(new Error(`dataset worker stopped (exit code ${code}) before its chunks were done`)));
      ask();
    })));
  } finally {
    await Promise.all(workers.map((w) => w.terminate()));
  }
  return starts.flatMap((first) => chunks.get(first) ?? []);
}
