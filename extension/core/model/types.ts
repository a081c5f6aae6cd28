import type { Family } from '../frame/types';

/** Built-in fault classes, in the model's output order. */
export const CLASSES = [
  'normal', 'cpu_saturation', 'memory_leak', 'disk_io_saturation',
  'network_latency', 'packet_loss', 'traffic_surge', 'error_storm',
] as const;
export type FaultClass = (typeof CLASSES)[number];

/**
 * The platform port through which core runs the ONNX model (implemented in extension/runtime).
 * Shapes follow the ONNX contract: values [B,N,W] float32, families [B,N] int64, mask [B,N] float32.
 */
export interface InferenceRunner {
  run(batch: NodeBatch): Promise<ModelOutput>;
}

export interface NodeBatch {
  readonly batchSize: number;
  readonly nodeCount: number;
  readonly windowLength: number;
  readonly values: Float32Array;
  readonly families: BigInt64Array;
  readonly mask: Float32Array;
}

export interface ModelOutput {
  /** [B, C] raw logits (before temperature). */
  readonly logits: Float32Array;
  /** [B, D] embedding for prototypes. */
  readonly embedding: Float32Array;
  readonly classCount: number;
  readonly embeddingSize: number;
}

/**
 * One metric's data for the classifier: its baseline and window samples (NaN = gap). `name` and
 * `labels` feed the name hints (vantage, polarity); without them they are read from `id` (see
 * parseSeriesId).
 */
export interface MetricWindow {
  readonly id: string;
  readonly family: Family;
  readonly name?: string;
  readonly labels?: Readonly<Record<string, string>>;
  readonly baseline: Float64Array;
  readonly window: Float64Array;
}
