/**
 * Builds the classifier's ONNX ModelProto (opset 17, dynamic batch and node axes) from the set-model
 * weights: the frozen temporal transform as plain nodes, then the set model exactly as
 * training/setModel.ts `forwardSetModel` computes it. Encoded with onnx-proto's protobuf classes.
 */
import { onnx } from 'onnx-proto';
import { getRowLength, type WindowSpec } from '../../extension/core/model/encode';
import { buildLinearProjection, FRACTION_THRESHOLDS, LINEAR_FEATURE_COUNT } from '../../extension/core/model/temporalFeatures';
import { FAMILY_COUNT, getPooledSize, type SetModelWeights } from '../setModel';

const FLOAT = onnx.TensorProto.DataType.FLOAT;
const INT64 = onnx.TensorProto.DataType.INT64;

/** Initializer names of the trained weights (the parity test reads them back by these names). */
export const WEIGHT_NAMES = ['featureMean', 'featureStd', 'w1', 'b1', 'w2', 'b2', 'wc', 'bc', 'wo', 'bo'] as const;

function floatTensor(name: string, dims: readonly number[], data: Float32Array): onnx.ITensorProto {
  const bytes = new Uint8Array(data.length * 4);
  const view = new DataView(bytes.buffer);
  for (let i = 0; i < data.length; i++) view.setFloat32(i * 4, data[i], true);
  return { name, dims: [...dims], dataType: FLOAT, rawData: bytes };
}

function int64Tensor(name: string, dims: readonly number[], data: readonly number[]): onnx.ITensorProto {
  return { name, dims: [...dims], dataType: INT64, int64Data: [...data] };
}

function node(opType: string, inputs: string[], outputs: string[], attributes: onnx.IAttributeProto[] = []): onnx.INodeProto {
  return { opType, input: inputs, output: outputs, name: outputs[0], attribute: attributes };
}

function intsAttr(name: string, ints: number[]): onnx.IAttributeProto {
  return { name, type: onnx.AttributeProto.AttributeType.INTS, ints };
}

function intAttr(name: string, i: number): onnx.IAttributeProto {
  return { name, type: onnx.AttributeProto.AttributeType.INT, i };
}

function valueInfo(name: string, elemType: number, dims: (number | string)[]): onnx.IValueInfoProto {
  return {
    name,
    type: { tensorType: { elemType, shape: { dim: dims.map((d) => (typeof d === 'number' ? { dimValue: d } : { dimParam: d })) } } },
  };
}

function buildTemporalNodes(spec: WindowSpec, inits: onnx.ITensorProto[]): onnx.INodeProto[] {
  const s = spec.sampleCount;
  const rowLength = getRowLength(spec);
  const diff = new Float32Array(s * (s - 1));
  for (let j = 0; j < s - 1; j++) { diff[j * (s - 1) + j] = -1; diff[(j + 1) * (s - 1) + j] = 1; }
  const [a, b] = FRACTION_THRESHOLDS;
  inits.push(
    floatTensor('projection', [rowLength, LINEAR_FEATURE_COUNT], buildLinearProjection(spec)),
    floatTensor('diffMatrix', [s, s - 1], diff),
    int64Tensor('sliceStart', [1], [0]), int64Tensor('sliceEnd', [1], [s]), int64Tensor('axis2', [1], [2]),
    floatTensor('thrA', [], Float32Array.of(a)), floatTensor('thrB', [], Float32Array.of(b)),
    floatTensor('thrNegA', [], Float32Array.of(-a)), floatTensor('thrNegB', [], Float32Array.of(-b)),
  );
  const mean = (input: string, output: string): onnx.INodeProto => node('ReduceMean', [input], [output], [intsAttr('axes', [2]), intAttr('keepdims', 1)]);
  const fraction = (op: string, threshold: string, output: string): onnx.INodeProto[] => [
    node(op, ['samples', threshold], [`${output}Bool`]),
    node('Cast', [`${output}Bool`], [`${output}Float`], [intAttr('to', FLOAT)]),
    mean(`${output}Float`, output),
  ];
  return [
    node('MatMul', ['values', 'projection'], ['linear']),
    node('Slice', ['values', 'sliceStart', 'sliceEnd', 'axis2'], ['samples']),
    node('ReduceMax', ['samples'], ['sampleMax'], [intsAttr('axes', [2]), intAttr('keepdims', 1)]),
    node('ReduceMin', ['samples'], ['sampleMin'], [intsAttr('axes', [2]), intAttr('keepdims', 1)]),
    node('Relu', ['samples'], ['positivePart']), mean('positivePart', 'positiveMean'),
    node('Neg', ['samples'], ['negatedSamples']), node('Relu', ['negatedSamples'], ['negativePart']), mean('negativePart', 'negativeMean'),
    node('MatMul', ['samples', 'diffMatrix'], ['differences']), node('Abs', ['differences'], ['absDifferences']), mean('absDifferences', 'roughness'),
    ...fraction('Greater', 'thrA', 'aboveA'), ...fraction('Greater', 'thrB', 'aboveB'),
    ...fraction('Less', 'thrNegA', 'belowA'), ...fraction('Less', 'thrNegB', 'belowB'),
    node('Concat', ['linear', 'sampleMax', 'sampleMin', 'positiveMean', 'negativeMean', 'roughness', 'aboveA', 'aboveB', 'belowA', 'belowB'], ['nodeFeatures'], [intAttr('axis', 2)]),
  ];
}

function buildSetModelNodes(weights: SetModelWeights, inits: onnx.ITensorProto[]): onnx.INodeProto[] {
  const { featureCount: f, hiddenSize: h, embeddingSize: d, classCount: c } = weights.shape;
  inits.push(
    floatTensor('featureMean', [f], weights.featureMean), floatTensor('featureStd', [f], weights.featureStd),
    floatTensor('w1', [f + FAMILY_COUNT, h], weights.w1), floatTensor('b1', [h], weights.b1),
    floatTensor('w2', [h, h], weights.w2), floatTensor('b2', [h], weights.b2),
    floatTensor('wc', [getPooledSize(weights.shape), d], weights.wc), floatTensor('bc', [d], weights.bc),
    floatTensor('wo', [d, c], weights.wo), floatTensor('bo', [c], weights.bo),
    int64Tensor('familyRange', [FAMILY_COUNT], Array.from({ length: FAMILY_COUNT }, (_, i) => i)),
    int64Tensor('axis1', [1], [1]), int64Tensor('axis3', [1], [3]), int64Tensor('flatShape', [2], [0, -1]),
    floatTensor('one', [], Float32Array.of(1)),
  );
  return [
    node('Sub', ['nodeFeatures', 'featureMean'], ['centered']), node('Div', ['centered', 'featureStd'], ['standardized']),
    node('Unsqueeze', ['families', 'axis2'], ['familiesColumn']),
    node('Equal', ['familiesColumn', 'familyRange'], ['familyBool']),
    node('Cast', ['familyBool'], ['familyOneHot'], [intAttr('to', FLOAT)]),
    node('Concat', ['standardized', 'familyOneHot'], ['nodeInput'], [intAttr('axis', 2)]),
    node('MatMul', ['nodeInput', 'w1'], ['z1']), node('Add', ['z1', 'b1'], ['a1']), node('Relu', ['a1'], ['h1']),
    node('MatMul', ['h1', 'w2'], ['z2']), node('Add', ['z2', 'b2'], ['a2']), node('Relu', ['a2'], ['h2']),
    node('Unsqueeze', ['mask', 'axis2'], ['maskColumn']),
    node('Mul', ['familyOneHot', 'maskColumn'], ['membership']),
    node('Transpose', ['membership'], ['membershipT'], [intsAttr('perm', [0, 2, 1])]),
    node('MatMul', ['membershipT', 'h2'], ['familySum']),
    node('ReduceSum', ['membershipT', 'axis2'], ['familyCount'], [intAttr('keepdims', 1)]),
    node('Max', ['familyCount', 'one'], ['familyDivisor']),
    node('Div', ['familySum', 'familyDivisor'], ['familyMean']),
    node('Unsqueeze', ['h2', 'axis2'], ['h2Expanded']), node('Unsqueeze', ['membership', 'axis3'], ['membershipExpanded']),
    node('Mul', ['h2Expanded', 'membershipExpanded'], ['maskedStates']),
    node('ReduceMax', ['maskedStates'], ['familyMax'], [intsAttr('axes', [1]), intAttr('keepdims', 0)]),
    node('Min', ['familyCount', 'one'], ['familyPresence']),
    node('Mul', ['h2', 'maskColumn'], ['maskedH2']),
    node('ReduceSum', ['maskedH2', 'axis1'], ['globalSum'], [intAttr('keepdims', 0)]),
    node('ReduceSum', ['mask', 'axis1'], ['nodeTotal'], [intAttr('keepdims', 1)]),
    node('Max', ['nodeTotal', 'one'], ['nodeDivisor']),
    node('Div', ['globalSum', 'nodeDivisor'], ['globalMean']),
    node('Reshape', ['familyMean', 'flatShape'], ['familyMeanFlat']),
    node('Reshape', ['familyMax', 'flatShape'], ['familyMaxFlat']),
    node('Reshape', ['familyPresence', 'flatShape'], ['familyPresenceFlat']),
    node('Concat', ['familyMeanFlat', 'familyMaxFlat', 'familyPresenceFlat', 'globalMean'], ['pooled'], [intAttr('axis', 1)]),
    node('MatMul', ['pooled', 'wc'], ['zc']), node('Add', ['zc', 'bc'], ['ac']), node('Relu', ['ac'], ['embedding']),
    node('MatMul', ['embedding', 'wo'], ['zo']), node('Add', ['zo', 'bo'], ['logits']),
  ];
}

/** Serialized ONNX model bytes for `weights` under `spec`. Inputs values/families/mask; outputs logits/embedding. */
export function writeClassifierOnnx(weights: SetModelWeights, spec: WindowSpec, version: string): Uint8Array {
  const inits: onnx.ITensorProto[] = [];
  const nodes = [...buildTemporalNodes(spec, inits), ...buildSetModelNodes(weights, inits)];
  const rowLength = getRowLength(spec);
  const graph: onnx.IGraphProto = {
    name: 'metric_triage_classifier',
    node: nodes,
    initializer: inits,
    input: [
      valueInfo('values', FLOAT, ['batch', 'nodes', rowLength]),
      valueInfo('families', INT64, ['batch', 'nodes']),
      valueInfo('mask', FLOAT, ['batch', 'nodes']),
    ],
    output: [
      valueInfo('logits', FLOAT, ['batch', weights.shape.classCount]),
      valueInfo('embedding', FLOAT, ['batch', weights.shape.embeddingSize]),
    ],
  };
  const model: onnx.IModelProto = {
    irVersion: 8,
    opsetImport: [{ domain: '', version: 17 }],
    producerName: 'metric-triage-training',
    producerVersion: version,
    modelVersion: 1,
    graph,
  };
  return onnx.ModelProto.encode(onnx.ModelProto.create(model)).finish();
}

/** Read the trained weights back from serialized model bytes (for parity tests and inspection). */
export function readSetModelWeights(bytes: Uint8Array): SetModelWeights {
  const model = onnx.ModelProto.decode(bytes);
  const byName = new Map<string, Float32Array>();
  for (const t of model.graph?.initializer ?? []) {
    if (t.dataType !== FLOAT || !t.rawData || !t.name) continue;
    const raw = t.rawData;
    const copy = new Uint8Array(raw.length);
    copy.set(raw);
    byName.set(t.name, new Float32Array(copy.buffer));
  }
  const get = (name: string): Float32Array => {
    const v = byName.get(name);
    if (!v) throw new Error(`model file: expected float initializer "${name}", found none`);
    return v;
  };
  return {
    shape: { featureCount: get('featureMean').length, hiddenSize: get('b1').length, embeddingSize: get('bc').length, classCount: get('bo').length },
    featureMean: get('featureMean'), featureStd: get('featureStd'),
    w1: get('w1'), b1: get('b1'), w2: get('w2'), b2: get('b2'),
    wc: get('wc'), bc: get('bc'), wo: get('wo'), bo: get('bo'),
  };
}
