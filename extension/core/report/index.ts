export * from './types';
export * from './estimativeWords';
export * from './sparkline';
export * from './findingBlock';
export * from './renderFindingMarkdown';
export * from './buildFinding';
