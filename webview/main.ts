// Webview entry (browser). Charts and panels land here.
export {};
