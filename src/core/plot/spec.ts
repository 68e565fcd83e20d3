/**
 * The plot: data built from sampled curves and analysis results, and the vega-lite spec that draws it.
 *
 * The spec is one fixed template whose variable parts are named data sets (`series`, `ranges`,
 * `kinks`, `breakdown`) and params (domain, visible layers, theme colours). Because nothing in it
 * depends on the formula, it is compiled to vega once at build time for the webview, and the host
 * only ever sends data — the extension host needs no chart library at all.
 *
 * Phases: (1) sample every curve (`sample.ts`), (2) turn analysis intervals into clipped rows,
 * (3) assemble `PlotData`; the template is static.
 */
import type { FloatType, RangeInterval, ScalarFn } from '../types';
import { grid, sampleCurve, splitJumps, viewRange, type Sample } from './sample';

export const LAYERS = ['f', 'f′', 'f″'] as const;
export type LayerName = (typeof LAYERS)[number];

export interface SeriesRow {
  /** Formula label (legend entry). */
  curve: string;
  layer: LayerName;
  x: number;
  y: number | null;
  segment: number;
  /** curve · layer · segment: one line mark per key. */
  key: string;
}

export interface RangeRow {
  curve: string;
  kind: 'saturating' | 'dead';
  from: number;
  to: number;
  label: string;
}

export interface KinkRow {
  curve: string;
  x: number;
  y: number;
}

export interface BreakdownRow {
  curve: string;
  type: FloatType;
  kind: string;
  from: number;
  to: number;
  label: string;
}

export interface PlotData {
  series: SeriesRow[];
  ranges: RangeRow[];
  kinks: KinkRow[];
  breakdown: BreakdownRow[];
  /** Visible x and y ranges (the y range is chosen so exponential tails do not flatten the body). */
  view: { xMin: number; xMax: number; yMin: number; yMax: number };
  /** Axis title for x: the formula's variable. */
  variable: string;
}

export interface CurveInput {
  label: string;
  f: ScalarFn;
  df: ScalarFn;
  d2f?: ScalarFn;
  saturation?: RangeInterval[];
  kinks?: number[];
  breakdown?: Partial<Record<FloatType, RangeInterval[]>>;
}

export interface PlotOptions {
  domain: [number, number];
  samples: number;
  floatType: FloatType;
  variable?: string;
  /** Layers shown initially (all are sampled). */
  layers?: readonly LayerName[];
}

function clipInterval(i: { from: number | null; to: number | null }, [a, b]: [number, number]): [number, number] | undefined {
  const from = Math.max(i.from ?? -Infinity, a);
  const to = Math.min(i.to ?? Infinity, b);
  return to > from ? [from, to] : undefined;
}

const fmt = (v: number | null, inf: string): string => (v === null ? inf : String(Number(v.toPrecision(4))));

/** (1)–(3): sample every curve and assemble the data the template draws. */
export function buildPlotData(curves: CurveInput[], opts: PlotOptions): PlotData {
  const [a, b] = opts.domain;
  const xs = grid(a, b, opts.samples);
  const series: SeriesRow[] = [];
  const ranges: RangeRow[] = [];
  const kinks: KinkRow[] = [];
  const breakdown: BreakdownRow[] = [];
  const forRange: number[] = [];
  // (1) sample, then (2) break at jumps larger than a tenth of the visible y range (bisection tells a
  // jump from a steep continuous stretch, so the threshold can be low).
  const sampled: { c: CurveInput; layer: LayerName; fn: ScalarFn; samples: Sample[] }[] = [];
  for (const c of curves) {
    const fns: [LayerName, ScalarFn | undefined][] = [['f', c.f], ['f′', c.df], ['f″', c.d2f]];
    for (const [layer, fn] of fns) {
      if (!fn) continue;
      const samples = sampleCurve(fn, xs);
      sampled.push({ c, layer, fn, samples });
      if (layer !== 'f″') for (const p of samples) forRange.push(p.y);
    }
  }
  const [yMin, yMax] = viewRange(forRange);
  for (const { c, layer, fn, samples } of sampled) {
    for (const p of splitJumps(fn, samples, (yMax - yMin) / 10)) {
      series.push({ curve: c.label, layer, x: p.x, y: p.y, segment: p.segment, key: `${c.label}\u0001${layer}\u0001${p.segment}` });
    }
  }
  for (const c of curves) {
    for (const s of c.saturation ?? []) {
      if (s.kind !== 'saturating' && s.kind !== 'dead') continue;
      const clipped = clipInterval(s, opts.domain);
      if (clipped) {
        ranges.push({ curve: c.label, kind: s.kind, from: clipped[0], to: clipped[1],
          label: `${c.label}: ${s.kind} on [${fmt(s.from, '−∞')}, ${fmt(s.to, '+∞')}]` });
      }
    }
    for (const k of c.kinks ?? []) {
      if (k < a || k > b) continue;
      const y = c.f(k);
      if (Number.isFinite(y)) kinks.push({ curve: c.label, x: k, y });
    }
    for (const i of c.breakdown?.[opts.floatType] ?? []) {
      const clipped = clipInterval(i, opts.domain);
      if (clipped) {
        breakdown.push({ curve: c.label, type: opts.floatType, kind: i.kind, from: clipped[0], to: clipped[1],
          label: `${c.label}: ${opts.floatType} ${i.kind} on [${fmt(i.from, '−∞')}, ${fmt(i.to, '+∞')}]` });
      }
    }
  }
  return { series, ranges, kinks, breakdown, view: { xMin: a, xMax: b, yMin, yMax }, variable: opts.variable ?? 'x' };
}

/** Params the webview sets at run time (names shared with media/src/plot.ts). */
export const PLOT_PARAMS = {
  showF: true, showD1: true, showD2: false,
  xMin: -6, xMax: 6, yMin: -1, yMax: 1,
  colorSaturating: '#c99a06', colorDead: '#7f7f7f', colorBreakdown: '#d0463c', colorAxis: '#808080',
} as const;

type Json = null | boolean | number | string | Json[] | { [k: string]: Json };

/**
 * The vega-lite template: layers (bottom to top) saturating shading, dead ranges, float-breakdown
 * strip, zero line, kink rules, curves, kink points.
 */
export function plotTemplate(): { [k: string]: Json } {
  const x = { field: 'x', type: 'quantitative', title: 'x',
    scale: { domain: { expr: '[xMin, xMax]' }, nice: false, zero: false } };
  const y = { field: 'y', type: 'quantitative', title: 'value',
    scale: { domain: { expr: '[yMin, yMax]' }, nice: false, zero: false } };
  const range = (field: string) => ({ field, type: 'quantitative' });
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    description: 'Slopewise plot: f, f′ and f″ with saturating, dead and float-breakdown ranges',
    width: 'container',
    height: 'container',
    autosize: { type: 'fit', contains: 'padding' },
    params: Object.entries(PLOT_PARAMS).map(([name, value]) => ({ name, value })),
    layer: [
      {
        data: { name: 'ranges' },
        transform: [{ filter: "datum.kind === 'saturating'" }],
        mark: { type: 'rect', color: { expr: 'colorSaturating' }, opacity: 0.14, tooltip: { content: 'data' } },
        encoding: { x: { ...range('from'), scale: x.scale, title: 'x' }, x2: { field: 'to' }, tooltip: { field: 'label', type: 'nominal' } },
      },
      {
        data: { name: 'ranges' },
        transform: [{ filter: "datum.kind === 'dead'" }],
        mark: { type: 'rect', fill: { expr: 'colorDead' }, fillOpacity: 0.22, stroke: { expr: 'colorDead' }, strokeDash: [5, 3],
          strokeWidth: 1 },
        encoding: { x: { ...range('from'), scale: x.scale, title: 'x' }, x2: { field: 'to' }, tooltip: { field: 'label', type: 'nominal' } },
      },
      {
        data: { name: 'breakdown' },
        mark: { type: 'rect', color: { expr: 'colorBreakdown' }, opacity: 0.85 },
        encoding: {
          x: { ...range('from'), scale: x.scale, title: 'x' }, x2: { field: 'to' },
          y: { value: 0 }, y2: { value: 7 },
          tooltip: { field: 'label', type: 'nominal' },
        },
      },
      {
        data: { values: [{ zero: 0 }] },
        mark: { type: 'rule', color: { expr: 'colorAxis' }, strokeWidth: 1, opacity: 0.6 },
        encoding: { y: { field: 'zero', type: 'quantitative', scale: y.scale, title: 'value' } },
      },
      {
        data: { name: 'kinks' },
        mark: { type: 'rule', color: { expr: 'colorAxis' }, strokeDash: [2, 3], opacity: 0.7 },
        encoding: { x: { ...x } },
      },
      {
        data: { name: 'series' },
        transform: [{ filter: "(datum.layer === 'f' && showF) || (datum.layer === 'f′' && showD1) || (datum.layer === 'f″' && showD2)" }],
        mark: { type: 'line', clip: true, strokeWidth: 2, strokeCap: 'round', interpolate: 'linear' },
        encoding: {
          x,
          y,
          // Colours in the order the formulas were added (the webview's chips use the same order); the
          // legends are the webview's own HTML, which wraps in a narrow panel where vega's would be cut.
          color: { field: 'curve', type: 'nominal', title: 'formula', sort: null, legend: null },
          strokeDash: {
            field: 'layer', type: 'nominal', title: 'curve',
            scale: { domain: [...LAYERS], range: [[1, 0], [7, 4], [2, 3]] },
            legend: null,
          },
          detail: { field: 'key', type: 'nominal' },
          order: { field: 'x', type: 'quantitative' },
        },
      },
      {
        data: { name: 'kinks' },
        transform: [{ filter: 'showF' }],
        // Hollow and larger than the line is wide, so it stands out on the curve it marks.
        mark: { type: 'point', shape: 'diamond', filled: false, size: 110, strokeWidth: 2, clip: true },
        encoding: {
          x,
          y: { ...y },
          color: { field: 'curve', type: 'nominal', title: 'formula', sort: null, legend: null },
          tooltip: [{ field: 'curve', type: 'nominal', title: 'kink of' }, { field: 'x', type: 'quantitative', format: '.4~g' }],
        },
      },
    ],
    config: {
      view: { stroke: null },
      axis: { titleFontWeight: 'normal', labelFontSize: 11, titleFontSize: 12, gridOpacity: 0.35 },
      legend: { labelFontSize: 11, titleFontSize: 11, titleFontWeight: 'normal' },
    },
  };
}

/** The template with the data inlined: a self-contained vega-lite spec (for tests, export, the CLI). */
export function buildPlotSpec(data: PlotData): { [k: string]: Json } {
  const spec = plotTemplate();
  const sets: Record<string, unknown[]> = { series: data.series, ranges: data.ranges, kinks: data.kinks, breakdown: data.breakdown };
  const layer = spec.layer as { [k: string]: Json }[];
  for (const l of layer) {
    const d = l.data as { name?: string } | undefined;
    if (d?.name && sets[d.name]) l.data = { values: sets[d.name] as Json[] };
  }
  const view = data.view;
  spec.params = (spec.params as { name: string; value: Json }[]).map((p) =>
    (p.name in view ? { name: p.name, value: view[p.name as keyof typeof view] } : p));
  for (const l of layer) {
    const enc = l.encoding as { x?: { title?: Json } } | undefined;
    if (enc?.x?.title !== undefined) enc.x.title = data.variable;
  }
  return spec;
}
