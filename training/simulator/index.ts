/** Public surface of the fault-injection simulator (training only; never shipped). */
export { generateSystem, type GenerateOptions } from './generateSystem';
export { KEY_ROLES, sampleExamples, sampleOneExample, type SampleOptions, type Difficulty } from './sampleExamples';
export { buildSplits, buildFewShotSplits, describeSplits, DEFAULT_TRAIN_SYSTEMS, drawSystemSeeds, HELD_OUT_CLASSES, type SplitOptions, type Splits, type FewShotOptions, type FewShotSplits } from './buildSplits';
export { buildSystemSpec, formatSeriesId, SERVICES, type SystemSpec } from './systemSpec';
export { convertCounterToRates } from './counterRates';
export { createRandom, mixSeeds, type Random } from './random';
export type { SimClass, HeldOutClass, SimSystem, SimSeries, SimIncident, TrainingExample, MetricTruth, NamingStyle } from './types';
export { measureSimulatorThroughput, type SimulatorThroughput } from './measureThroughput';
