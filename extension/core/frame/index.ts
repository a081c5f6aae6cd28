/** Public surface of the frame layer. */
export type { Family, FrameSeries, IndexWindow, MetricFrame } from './types';
export { FAMILIES } from './types';
export { inferFamily, normalizeMetricName } from './families';
export { buildFrame, FrameTooLargeError, type BuildFrameOptions } from './buildFrame';
export { planSamples, applySamplePlan, convertCounterToRate, convertDeltaToRate, computeMedianStepMs, computeGridIndex, placeOnGrid, type SamplePlan } from './alignSeries';
