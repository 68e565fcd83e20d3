/**
 * vega's own entry (vega/build/vega.module.js) minus the transforms a Slopewise chart never uses
 * (geo, force, hierarchy, label, regression, voronoi, wordcloud, crossfilter). The compiled plot spec
 * needs only the core, view and encode transforms. Aliased for `vega` in the webview bundle
 * (scripts/build.mjs, WEBVIEW_OPTIONS); a unit test checks the compiled spec uses no other transform.
 */
import { extend } from 'vega-util';
import { transforms } from 'vega-dataflow';
import * as tx from 'vega-transforms';
import * as vtx from 'vega-view-transforms';
import * as encode from 'vega-encode';

extend(transforms, tx, vtx, encode);

export * from 'vega-util';
export { Dataflow, EventStream, MultiPulse, Operator, Parameters, Pulse, Transform, changeset, definition, ingest, isTuple, transform, transforms, tupleid } from 'vega-dataflow';
export * from 'vega-statistics';
export * from 'vega-time';
export * from 'vega-loader';
export * from 'vega-scenegraph';
export { interpolate, interpolateColors, interpolateRange, quantizeInterpolator, scale, scheme } from 'vega-scale';
export { projection } from 'vega-projection';
export { View } from 'vega-view';
export { defaultLocale, numberFormatDefaultLocale as formatLocale, locale, resetDefaultLocale, timeFormatDefaultLocale as timeFormatLocale } from 'vega-format';
export { expressionFunction } from 'vega-functions';
export { parse } from 'vega-parser';
export { context as runtimeContext } from 'vega-runtime';
export { codegenExpression, parseExpression } from 'vega-expression';
export { parseSelector } from 'vega-event-selector';
export const version = '6.4.0';
