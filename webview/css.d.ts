/** Stylesheets imported for their side effect; esbuild emits them as dist/webview/main.css. */
declare module '*.css';
