/** The common shape of the neural baselines, so one trainer serves all of them. */
import type * as tf from '@tensorflow/tfjs-core';
import type { BatchTensors } from './layers';

/** A trainable classifier over a set of metric nodes. */
export interface NodeSetModel {
  readonly name: string;
  readonly variables: readonly tf.Variable[];
  /** Returns logits [B, C]; must not depend on masked nodes or on node order. */
  computeLogits(input: BatchTensors): tf.Tensor2D;
}

/** Sizes shared by the neural baselines. */
export interface NodeSetModelSpec {
  /** Values per node row (the encoder's row length: resampled samples + summary slots). */
  readonly windowLength: number;
  /** Leading entries of a row that form the time series (the rest are per-node summary slots). */
  readonly sequenceLength: number;
  readonly classCount: number;
  /** Hidden width per node. */
  readonly hiddenSize: number;
}
