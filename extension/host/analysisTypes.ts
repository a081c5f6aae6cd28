import type { AnalysisResult, AnalyzeOptions, MsRange } from '../node/analyze';

export type { AnalysisResult, AnalyzeOptions, MsRange };

/** The facade's signature: the host depends on this port, extension.ts passes the real one in. */
export type AnalyzeExport = (path: string, options: AnalyzeOptions) => Promise<AnalysisResult>;

/** Everything the host features share; composed once in activate(). */
export interface HostDeps {
  readonly analyzeExport: AnalyzeExport;
  readonly extensionUri: import('vscode').Uri;
}
