/** Public surface of detect/: robust statistics, change points and window suggestion. */
export * from './robustStats';
export * from './tabularCusum';
export * from './changePoints';
export * from './seasonalBaseline';
export * from './robustDeviation';
export * from './consensusScore';
export * from './windowTypes';
export { suggestWindows } from './suggestWindows';
export * from './refineOnset';
