/** Public surface of the pure view layer (webview HTML, view models, text placement). */
export * from './types';
export * from './renderWebviewHtml';
export * from './decimateSeries';
export * from './formatView';
export * from './buildViewerModel';
export * from './buildChartConfig';
export * from './renderTrendSvg';
