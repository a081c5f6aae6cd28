/** Public surface of explain/: Shapley values over metrics and baseline-vs-incident effect sizes. */
export * from './computeShapley';
export * from './effectSizes';
export * from './rankTests';
export * from './normalDistribution';
export * from './computeFrameEffects';
