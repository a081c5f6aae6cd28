/**
 * Worker thread of the parallel dataset builder (training/encodeInWorkers.ts): draws the chunks of
 * a split it is sent with sampleExamples, encodes them with the inference code, and answers with
 * the encoded examples packed into transferable arrays.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { DEFAULT_WINDOW_SPEC } from '../extension/core/model/encode';
import { encodeExamples } from './buildDataset';
import { sampleExamples, type SampleOptions } from './simulator';
import { packEncodedChunk } from './packEncodedChunk';

interface ChunkRequest { readonly firstIndex: number; readonly count: number }

const { options, labelClasses } = workerData as { options: SampleOptions; labelClasses?: readonly string[] };
parentPort?.on('message', (request: ChunkRequest) => {
  const examples = encodeExamples(sampleExamples({ ...options, firstIndex: request.firstIndex, count: request.count }), DEFAULT_WINDOW_SPEC, labelClasses);
  const packed = packEncodedChunk(examples);
  // The arrays are fresh and unshared (packEncodedChunk allocates them), so their buffers move without a copy.
  const buffers = [packed.features, packed.familyIds, packed.mask, packed.nodeStart, packed.labels].map((a) => a.buffer as ArrayBuffer);
  parentPort?.postMessage({ firstIndex: request.firstIndex, packed }, buffers);
});
