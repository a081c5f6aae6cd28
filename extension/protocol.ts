/** Typed messages between the extension host and the metric viewer webview. */
export type ToWebview = { readonly type: 'noop' };
export type FromWebview = { readonly type: 'ready' };
