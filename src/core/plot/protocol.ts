/**
 * Messages between the extension host and the plot webview, with the validators both sides run on
 * everything they receive. Nothing received is trusted: a message that does not have exactly the
 * expected shape is dropped (and logged by the caller).
 */
import type { PlotData } from './spec';

export type ExportFormat = 'svg' | 'png';

/** Host → webview. */
export type HostMessage =
  | { type: 'plot'; data: PlotData; state: PlotState }
  | { type: 'exported'; ok: boolean; message: string };

/** What the controls show; echoed by the host so the webview's controls match the data. */
export interface PlotState {
  domain: [number, number];
  floatType: 'float16' | 'bfloat16' | 'float32';
  /** Free parameters with slider ranges: one slider each. */
  params: { name: string; value: number; min: number; max: number; step: number }[];
  /** Labels of the formulas on the chart, in order (for the "remove" buttons). */
  formulas: string[];
}

export interface RenderReport {
  type: 'rendered';
  /** Layers (f, f′, f″) visible, over all formulas. */
  layers: number;
  /** Mark items drawn by vega (lines, rects, rules, points). */
  marks: number;
  /** Formulas on the chart. */
  formulas: number;
}

/** Webview → host. */
export type WebviewMessage =
  | { type: 'ready' }
  | RenderReport
  | { type: 'domain'; from: number; to: number }
  | { type: 'param'; name: string; value: number }
  | { type: 'floatType'; value: PlotState['floatType'] }
  | { type: 'remove'; index: number }
  | { type: 'export'; format: ExportFormat; data: string }
  | { type: 'error'; message: string };

const isObj = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);
const isNum = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v);
const isCount = (v: unknown): v is number => isNum(v) && Number.isInteger(v) && v >= 0 && v < 1e7;
const hasOnly = (o: Record<string, unknown>, keys: string[]): boolean => Object.keys(o).every((k) => keys.includes(k));
const FLOATS = ['float16', 'bfloat16', 'float32'];

/** Largest export payload accepted from the webview (a PNG data URL of a big chart). */
export const MAX_EXPORT_CHARS = 20_000_000;
/** Parameter names: identifiers, Greek letters included. */
const PARAM_NAME = /^[\p{L}_][\p{L}\p{N}_]{0,31}$/u;

/** Validates what the webview posts to the host. */
export function parseWebviewMessage(v: unknown): WebviewMessage | undefined {
  if (!isObj(v) || typeof v.type !== 'string') return undefined;
  switch (v.type) {
    case 'ready':
      return hasOnly(v, ['type']) ? { type: 'ready' } : undefined;
    case 'rendered':
      return hasOnly(v, ['type', 'layers', 'marks', 'formulas']) && isCount(v.layers) && isCount(v.marks) && isCount(v.formulas)
        ? { type: 'rendered', layers: v.layers, marks: v.marks, formulas: v.formulas } : undefined;
    case 'domain':
      return hasOnly(v, ['type', 'from', 'to']) && isNum(v.from) && isNum(v.to) && v.from < v.to
        && Math.abs(v.from) <= 1e6 && Math.abs(v.to) <= 1e6 && v.to - v.from >= 1e-9
        ? { type: 'domain', from: v.from, to: v.to } : undefined;
    case 'param':
      return hasOnly(v, ['type', 'name', 'value']) && typeof v.name === 'string' && PARAM_NAME.test(v.name) && isNum(v.value)
        ? { type: 'param', name: v.name, value: v.value } : undefined;
    case 'floatType':
      return hasOnly(v, ['type', 'value']) && typeof v.value === 'string' && FLOATS.includes(v.value)
        ? { type: 'floatType', value: v.value as PlotState['floatType'] } : undefined;
    case 'remove':
      return hasOnly(v, ['type', 'index']) && isCount(v.index) ? { type: 'remove', index: v.index } : undefined;
    case 'export': {
      if (!hasOnly(v, ['type', 'format', 'data']) || typeof v.data !== 'string' || v.data.length > MAX_EXPORT_CHARS) return undefined;
      if (v.format === 'svg' && /^\s*(<\?xml[^>]*>\s*)?<svg[\s>]/.test(v.data)) return { type: 'export', format: 'svg', data: v.data };
      if (v.format === 'png' && /^data:image\/png;base64,[A-Za-z0-9+/]+=*$/.test(v.data)) return { type: 'export', format: 'png', data: v.data };
      return undefined;
    }
    case 'error':
      return hasOnly(v, ['type', 'message']) && typeof v.message === 'string'
        ? { type: 'error', message: v.message.slice(0, 2000) } : undefined;
    default:
      return undefined;
  }
}

const isRow = (r: unknown): boolean => isObj(r);
const isNumOrNull = (v: unknown): boolean => v === null || isNum(v);

/** Validates what the host posts to the webview (the webview runs this on every message). */
export function parseHostMessage(v: unknown): HostMessage | undefined {
  if (!isObj(v) || typeof v.type !== 'string') return undefined;
  if (v.type === 'exported') {
    return typeof v.ok === 'boolean' && typeof v.message === 'string' ? { type: 'exported', ok: v.ok, message: v.message } : undefined;
  }
  if (v.type !== 'plot' || !isObj(v.data) || !isObj(v.state)) return undefined;
  const d = v.data;
  const s = v.state;
  const arrays = ['series', 'ranges', 'kinks', 'breakdown'];
  if (!arrays.every((k) => Array.isArray(d[k]) && (d[k] as unknown[]).every(isRow))) return undefined;
  const series = d.series as Record<string, unknown>[];
  if (!series.every((r) => isNum(r.x) && isNumOrNull(r.y) && typeof r.curve === 'string' && typeof r.layer === 'string'
      && isCount(r.segment))) return undefined;
  const view = d.view;
  if (!isObj(view) || !['xMin', 'xMax', 'yMin', 'yMax'].every((k) => isNum(view[k])) || typeof d.variable !== 'string') return undefined;
  if (!Array.isArray(s.domain) || s.domain.length !== 2 || !isNum(s.domain[0]) || !isNum(s.domain[1])) return undefined;
  if (typeof s.floatType !== 'string' || !FLOATS.includes(s.floatType)) return undefined;
  if (!Array.isArray(s.params) || !s.params.every((p) => isObj(p) && typeof p.name === 'string' && isNum(p.value)
      && isNum(p.min) && isNum(p.max) && isNum(p.step))) return undefined;
  if (!Array.isArray(s.formulas) || !s.formulas.every((f) => typeof f === 'string')) return undefined;
  return v as unknown as HostMessage;
}
