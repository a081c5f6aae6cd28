/**
 * Nearest-centroid classifier on standardised feature vectors (each feature z-scored with the
 * training mean and standard deviation), the simplest non-neural baseline.
 */

/** A fitted nearest-centroid model. */
export interface NearestCentroidModel {
  readonly featureCount: number;
  readonly means: Float64Array;
  readonly scales: Float64Array;
  /** One standardised centroid per class index; undefined for classes absent from training. */
  readonly centroids: ReadonlyArray<Float64Array | undefined>;
}

/**
 * Fits centroids from `features[i]` labelled `labels[i]` (class indices 0..classCount-1).
 * Constant features get scale 1 so they neither divide by zero nor matter. Throws when the
 * inputs disagree in length or a label is out of range (programmer error).
 */
export function fitNearestCentroid(
  features: readonly Float64Array[], labels: ArrayLike<number>, classCount: number,
): NearestCentroidModel {
  if (features.length !== labels.length) {
    throw new Error(`expected one label per feature vector, got ${labels.length} labels for ${features.length} vectors`);
  }
  if (features.length === 0) throw new Error('expected at least one training vector, got 0');
  const d = features[0].length;
  const means = new Float64Array(d);
  const scales = new Float64Array(d);
  for (const x of features) for (let j = 0; j < d; j++) means[j] += x[j] / features.length;
  for (const x of features) for (let j = 0; j < d; j++) scales[j] += (x[j] - means[j]) ** 2 / features.length;
  for (let j = 0; j < d; j++) scales[j] = scales[j] > 1e-12 ? Math.sqrt(scales[j]) : 1;
  const sums = Array.from({ length: classCount }, () => new Float64Array(d));
  const counts = new Int32Array(classCount);
  features.forEach((x, i) => {
    const c = labels[i];
    if (!(c >= 0 && c < classCount)) throw new Error(`expected a label in 0..${classCount - 1}, got ${c} at vector ${i}`);
    counts[c]++;
    for (let j = 0; j < d; j++) sums[c][j] += (x[j] - means[j]) / scales[j];
  });
  const centroids = sums.map((s, c) => (counts[c] > 0 ? s.map((v) => v / counts[c]) : undefined));
  return { featureCount: d, means, scales, centroids };
}

/** Returns the class index of the nearest centroid (Euclidean, standardised space) per vector. */
export function predictNearestCentroid(model: NearestCentroidModel, features: readonly Float64Array[]): Int32Array {
  const out = new Int32Array(features.length);
  features.forEach((x, i) => {
    let best = -1, bestDistance = Infinity;
    model.centroids.forEach((centroid, c) => {
      if (centroid === undefined) return;
      let distance = 0;
      for (let j = 0; j < model.featureCount; j++) distance += ((x[j] - model.means[j]) / model.scales[j] - centroid[j]) ** 2;
      if (distance < bestDistance) { bestDistance = distance; best = c; }
    });
    out[i] = best;
  });
  return out;
}
