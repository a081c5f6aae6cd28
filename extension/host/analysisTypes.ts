import type { MetricFrame } from '../core/frame/types';
import type { Finding, TimeSpan } from '../core/report/types';

/** A window chosen by the user (or suggested), epoch ms UTC. */
export interface MsRange {
  readonly startMs: number;
  readonly endMs: number;
}

/** Options of the analysis facade (extension/node/analyze.ts). */
export interface AnalyzeOptions {
  readonly modelDir: string;
  readonly incident?: MsRange;
  readonly baseline?: MsRange;
  readonly onProgress?: (fraction: number, message: string) => void;
  readonly isCancelled?: () => boolean;
  readonly libraryPath?: string;
  readonly timelineWindowSteps?: number;
  readonly timelineStrideSteps?: number;
  readonly abstainThreshold?: number;
}

/** What one analysis of an export returns. */
export interface AnalysisResult {
  readonly frame: MetricFrame;
  readonly finding: Finding;
  readonly suggestion: { readonly incident: TimeSpan; readonly baseline: TimeSpan };
  readonly timeline: { readonly timesMs: Float64Array; readonly classNames: readonly string[]; readonly probabilities: Float32Array };
}

/** The facade's signature: the host depends on this port, extension.ts passes the real one in. */
export type AnalyzeExport = (path: string, options: AnalyzeOptions) => Promise<AnalysisResult>;

/** Everything the host features share; composed once in activate(). */
export interface HostDeps {
  readonly analyzeExport: AnalyzeExport;
  readonly extensionUri: import('vscode').Uri;
}
