// Resolved at build time by scripts/build.mjs (WEBVIEW_OPTIONS): the plot template compiled to vega.
declare module 'virtual:slopewise-plot-vega' {
  import type { Spec } from 'vega';
  const spec: Spec;
  export default spec;
}
