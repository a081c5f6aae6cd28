import * as vscode from 'vscode';

/** How the postmortem block shows a chart. */
export type ChartStyle = 'mermaid' | 'svg' | 'none';

/** The extension's settings, read in one place and validated here. */
export interface TriageSettings {
  readonly windowSteps: number;
  readonly strideSteps: number;
  readonly abstainThreshold: number;
  readonly chartStyle: ChartStyle;
  readonly postmortemTarget: string;
}

/** Reads `metricTriage.*`; out-of-range values fall back to the defaults of the manifest. */
export function readSettings(scope?: vscode.Uri): TriageSettings {
  const config = vscode.workspace.getConfiguration('metricTriage', scope);
  const windowSteps = config.get<number>('windowSteps', 32);
  const strideSteps = config.get<number>('strideSteps', 4);
  const abstainThreshold = config.get<number>('abstainThreshold', 0.5);
  const chartStyle = config.get<string>('chartStyle', 'mermaid');
  return {
    windowSteps: Number.isInteger(windowSteps) && windowSteps >= 3 && windowSteps <= 512 ? windowSteps : 32,
    strideSteps: Number.isInteger(strideSteps) && strideSteps >= 1 ? strideSteps : 4,
    abstainThreshold: abstainThreshold >= 0 && abstainThreshold <= 1 ? abstainThreshold : 0.5,
    chartStyle: chartStyle === 'svg' || chartStyle === 'none' ? chartStyle : 'mermaid',
    postmortemTarget: config.get<string>('postmortemTarget', ''),
  };
}
