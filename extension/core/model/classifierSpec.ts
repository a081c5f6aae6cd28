import { FAMILIES } from '../frame/types';
import { DEFAULT_WINDOW_SPEC, type WindowSpec } from './encode';
import { CLASSES } from './types';

/** Contents of media/model/classifier.json: everything needed to use classifier.onnx correctly. */
export interface ClassifierSpec {
  readonly version: string;
  /** Class names in logit order (CLASSES). */
  readonly classes: readonly string[];
  /** Family names in id order (FAMILIES). */
  readonly families: readonly string[];
  readonly windowSpec: WindowSpec;
  /** Temperature T (Guo et al. 2017): calibrated probabilities = softmax(logits / T). */
  readonly temperature: number;
  /** Abstain when the calibrated top probability is below this. */
  readonly abstainThreshold: number;
  /** Training class frequencies, used as v(∅) for subset values (log prior). */
  readonly classPriors: readonly number[];
  /** Mean embedding per class on the training split, [C][D]. */
  readonly embeddingCentroids: readonly (readonly number[])[];
  /** Out of distribution when the distance to the nearest centroid exceeds this (a high quantile on calibration data). */
  readonly oodDistance: number;
  /** sha256 (hex) of classifier.onnx. */
  readonly sha256: string;
  readonly embeddingSize: number;
  /** Free-form provenance (seed, data sizes, normalization...); not read by the runtime. */
  readonly training?: Readonly<Record<string, unknown>>;
}

function fail(expected: string, actual: unknown): never {
  throw new Error(`classifier.json: expected ${expected}, got ${JSON.stringify(actual)?.slice(0, 80)}`);
}

function readNumberArray(value: unknown, name: string, length?: number): number[] {
  if (!Array.isArray(value) || value.some((v) => typeof v !== 'number' || !Number.isFinite(v))) fail(`"${name}" as an array of finite numbers`, value);
  if (length !== undefined && value.length !== length) fail(`"${name}" with ${length} entries`, `${value.length} entries`);
  return value as number[];
}

function readPositive(record: Record<string, unknown>, name: string): number {
  const v = record[name];
  if (typeof v !== 'number' || !(v > 0)) fail(`"${name}" > 0`, v);
  return v;
}

/**
 * Validate parsed classifier.json. Throws an Error naming the field, what was expected and what was
 * found (the file is shipped with the extension, so a bad one is a packaging defect, not user input).
 * Class and family lists must equal CLASSES and FAMILIES exactly: their order is the model contract.
 */
export function parseClassifierSpec(json: unknown): ClassifierSpec {
  if (typeof json !== 'object' || json === null) fail('an object', json);
  const r = json as Record<string, unknown>;
  if (typeof r.version !== 'string') fail('"version" as a string', r.version);
  if (JSON.stringify(r.classes) !== JSON.stringify(CLASSES)) fail(`"classes" = ${JSON.stringify(CLASSES)}`, r.classes);
  if (JSON.stringify(r.families) !== JSON.stringify(FAMILIES)) fail(`"families" = ${JSON.stringify(FAMILIES)}`, r.families);
  if (typeof r.sha256 !== 'string' || !/^[0-9a-f]{64}$/.test(r.sha256)) fail('"sha256" as 64 hex digits', r.sha256);
  const ws = r.windowSpec as Record<string, unknown> | undefined;
  if (typeof ws !== 'object' || ws === null) fail('"windowSpec" as an object', ws);
  const windowSpec = { ...DEFAULT_WINDOW_SPEC } as Record<string, number>;
  for (const key of Object.keys(DEFAULT_WINDOW_SPEC)) {
    if (typeof ws[key] !== 'number' || !Number.isFinite(ws[key])) fail(`"windowSpec.${key}" as a number`, ws[key]);
    windowSpec[key] = ws[key] as number;
  }
  const threshold = r.abstainThreshold;
  if (typeof threshold !== 'number' || threshold < 0 || threshold > 1) fail('"abstainThreshold" in [0, 1]', threshold);
  const embeddingSize = readPositive(r, 'embeddingSize');
  const centroidsRaw = r.embeddingCentroids;
  if (!Array.isArray(centroidsRaw) || centroidsRaw.length !== CLASSES.length) fail(`"embeddingCentroids" with ${CLASSES.length} rows`, centroidsRaw);
  return {
    version: r.version,
    classes: [...CLASSES],
    families: [...FAMILIES],
    windowSpec: windowSpec as unknown as WindowSpec,
    temperature: readPositive(r, 'temperature'),
    abstainThreshold: threshold,
    classPriors: readNumberArray(r.classPriors, 'classPriors', CLASSES.length),
    embeddingCentroids: centroidsRaw.map((row, i) => readNumberArray(row, `embeddingCentroids[${i}]`, embeddingSize)),
    oodDistance: readPositive(r, 'oodDistance'),
    sha256: r.sha256,
    embeddingSize,
    training: typeof r.training === 'object' && r.training !== null ? (r.training as Record<string, unknown>) : undefined,
  };
}
