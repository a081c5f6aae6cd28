/**
 * A small random forest (Breiman 2001): CART trees grown on bootstrap samples with Gini impurity,
 * √d candidate features per split, majority vote of the trees. Written here so the non-neural
 * baseline needs no extra package.
 */

/** A tree node: a leaf holds class votes, an inner node a threshold test `x[feature] <= threshold`. */
export type TreeNode =
  | { readonly kind: 'leaf'; readonly classIndex: number }
  | { readonly kind: 'split'; readonly feature: number; readonly threshold: number; readonly left: TreeNode; readonly right: TreeNode };

/** Options of {@link fitRandomForest}. */
export interface ForestOptions {
  readonly treeCount: number;
  readonly maxDepth: number;
  readonly minLeafSize: number;
  readonly random: () => number;
}

/** Gini impurity 1 − Σ p_k² of class counts with total `n` (0 for an empty set). */
export function computeGini(counts: ArrayLike<number>, n: number): number {
  if (n === 0) return 0;
  let s = 0;
  for (let k = 0; k < counts.length; k++) s += (counts[k] / n) ** 2;
  return 1 - s;
}

interface Split { readonly feature: number; readonly threshold: number; readonly score: number }

/**
 * Best threshold on one feature for the rows `rows`: minimises the size-weighted Gini of the two
 * sides; thresholds sit halfway between consecutive distinct values. Undefined when the feature is
 * constant on these rows or no split leaves `minLeafSize` rows on each side.
 */
export function findBestSplit(
  features: readonly ArrayLike<number>[], labels: ArrayLike<number>, rows: readonly number[], feature: number,
  classCount: number, minLeafSize: number,
): Split | undefined {
  const sorted = [...rows].sort((a, b) => features[a][feature] - features[b][feature]);
  const right = new Float64Array(classCount);
  for (const r of sorted) right[labels[r]]++;
  const left = new Float64Array(classCount);
  let best: Split | undefined;
  for (let i = 0; i < sorted.length - 1; i++) {
    const c = labels[sorted[i]];
    left[c]++; right[c]--;
    const value = features[sorted[i]][feature];
    const next = features[sorted[i + 1]][feature];
    if (value === next || i + 1 < minLeafSize || sorted.length - i - 1 < minLeafSize) continue;
    const nLeft = i + 1;
    const nRight = sorted.length - nLeft;
    const score = (nLeft * computeGini(left, nLeft) + nRight * computeGini(right, nRight)) / sorted.length;
    if (best === undefined || score < best.score) best = { feature, threshold: (value + next) / 2, score };
  }
  return best;
}

function growTree(
  features: readonly ArrayLike<number>[], labels: ArrayLike<number>, rows: number[], depth: number, classCount: number, options: ForestOptions,
): TreeNode {
  const counts = new Float64Array(classCount);
  for (const r of rows) counts[labels[r]]++;
  let majority = 0;
  for (let k = 1; k < classCount; k++) if (counts[k] > counts[majority]) majority = k;
  const isPure = counts[majority] === rows.length;
  if (isPure || depth >= options.maxDepth || rows.length < 2 * options.minLeafSize) return { kind: 'leaf', classIndex: majority };
  const d = features[0].length;
  const tryCount = Math.max(1, Math.round(Math.sqrt(d)));
  let best: Split | undefined;
  for (let t = 0; t < tryCount; t++) {
    const split = findBestSplit(features, labels, rows, Math.floor(options.random() * d), classCount, options.minLeafSize);
    if (split !== undefined && (best === undefined || split.score < best.score)) best = split;
  }
  if (best === undefined || best.score >= computeGini(counts, rows.length)) return { kind: 'leaf', classIndex: majority };
  const { feature, threshold } = best;
  const leftRows = rows.filter((r) => features[r][feature] <= threshold);
  const rightRows = rows.filter((r) => features[r][feature] > threshold);
  return {
    kind: 'split', feature, threshold,
    left: growTree(features, labels, leftRows, depth + 1, classCount, options),
    right: growTree(features, labels, rightRows, depth + 1, classCount, options),
  };
}

/**
 * Fits `options.treeCount` trees, each on a bootstrap sample (n draws with replacement).
 * Throws when inputs are empty or disagree in length (programmer error).
 */
export function fitRandomForest(
  features: readonly ArrayLike<number>[], labels: ArrayLike<number>, classCount: number, options: ForestOptions,
): TreeNode[] {
  if (features.length === 0 || features.length !== labels.length) {
    throw new Error(`expected one label per feature vector and at least one vector, got ${labels.length} labels for ${features.length} vectors`);
  }
  return Array.from({ length: options.treeCount }, () => {
    const rows = Array.from({ length: features.length }, () => Math.floor(options.random() * features.length));
    return growTree(features, labels, rows, 0, classCount, options);
  });
}

/** Class index of one vector by one tree. */
export function predictTree(tree: TreeNode, x: ArrayLike<number>): number {
  let node = tree;
  while (node.kind === 'split') node = x[node.feature] <= node.threshold ? node.left : node.right;
  return node.classIndex;
}

/** Majority vote of the trees per vector (ties → the lower class index). */
export function predictRandomForest(trees: readonly TreeNode[], features: readonly ArrayLike<number>[], classCount: number): Int32Array {
  return Int32Array.from(features, (x) => {
    const votes = new Int32Array(classCount);
    for (const tree of trees) votes[predictTree(tree, x)]++;
    let best = 0;
    for (let k = 1; k < classCount; k++) if (votes[k] > votes[best]) best = k;
    return best;
  });
}
