/**
 * Stands in for vega-lite in the webview bundle (aliased in scripts/build.mjs): the template is
 * compiled to vega at build time, so vega-embed only ever runs in `mode: 'vega'` here. Keeps ~335 kB
 * of compiler out of the webview.
 */
export const version = 'not bundled (spec compiled at build time)';

export function compile(): never {
  throw new Error('vega-lite is not bundled in the webview: send a compiled vega spec');
}
