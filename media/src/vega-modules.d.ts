// vega's sub-packages ship no type declarations of their own; media/src/vega-lean.ts only re-exports
// them, and the rest of the webview uses the types of the `vega` package.
declare module 'vega-dataflow';
declare module 'vega-transforms';
declare module 'vega-view-transforms';
declare module 'vega-encode';
declare module 'vega-statistics';
declare module 'vega-time';
declare module 'vega-loader';
declare module 'vega-scenegraph';
declare module 'vega-scale';
declare module 'vega-projection';
declare module 'vega-view';
declare module 'vega-format';
declare module 'vega-functions';
declare module 'vega-parser';
declare module 'vega-runtime';
