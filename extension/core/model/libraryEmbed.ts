import type { WindowSpec } from './encode';
import { encodeMetricWindows } from './encode';
import type { EmbedMetricWindows } from './libraryEntry';
import type { InferenceRunner } from './types';

/**
 * The embedding function used to (re-)embed library entries: the same encoder and model as
 * Classifier.classifyWindow, so a stored window and a live query land in the same space. Returns
 * the model's embedding row (length = the model's embedding size). A window with no usable metric
 * still runs (all nodes masked; the model's masked readout gives its "empty" embedding) rather
 * than failing a whole re-embedding run.
 */
export function createLibraryEmbedder(runner: InferenceRunner, windowSpec: WindowSpec): EmbedMetricWindows {
  return async (metrics) => {
    const output = await runner.run(encodeMetricWindows(metrics, windowSpec));
    return output.embedding.slice(0, output.embeddingSize);
  };
}
