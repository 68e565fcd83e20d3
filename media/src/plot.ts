/**
 * The plot webview. Draws the data the host sends with a vega spec compiled from the vega-lite template
 * at build time (`virtual:slopewise-plot-vega`, see scripts/build.mjs), through vega-embed's expression
 * interpreter (`ast: true`): the webview's CSP has no 'unsafe-eval', and vega's default expression
 * compiler would need it. Every message from the host is validated before use; the host validates
 * everything sent back.
 */
import embed from 'vega-embed';
import * as vega from 'vega';
import compiledSpec from 'virtual:slopewise-plot-vega';
import { parseHostMessage, type HostMessage, type PlotState, type WebviewMessage } from '../../src/core/plot/protocol';
import type { PlotData } from '../../src/core/plot/spec';
import { countMarks, totalMarks } from '../../src/core/plot/marks';

interface VsCodeApi {
  postMessage(message: WebviewMessage): void;
}
declare function acquireVsCodeApi(): VsCodeApi;

const host = acquireVsCodeApi();
const $ = <T extends HTMLElement>(id: string): T => {
  const el = document.getElementById(id);
  if (!el) throw new Error(`missing #${id}`);
  return el as T;
};

const chart = $<HTMLElement>('chart');
const status = $<HTMLElement>('status');
const showF = $<HTMLInputElement>('show-f');
const showD1 = $<HTMLInputElement>('show-d1');
const showD2 = $<HTMLInputElement>('show-d2');
const floatSelect = $<HTMLSelectElement>('float-type');
const paramsBox = $<HTMLElement>('params');
const formulasBox = $<HTMLElement>('formulas');
const domainText = $<HTMLElement>('domain-text');

let view: vega.View | undefined;
let embeddedFor = '';
let data: PlotData | undefined;
let state: PlotState | undefined;
let startDomain: [number, number] | undefined;
/** The x range shown right now (may run ahead of the host's data while panning). */
let shown: [number, number] = [-6, 6];

function css(name: string, fallback: string): string {
  const v = getComputedStyle(document.body).getPropertyValue(name).trim();
  return v || fallback;
}

/** The formulas' colours, in order: the chart's category range and the chips' dots. */
function paletteColours(): string[] {
  return [
    css('--vscode-charts-blue', '#3d8fd9'), css('--vscode-charts-orange', '#e0842a'), css('--vscode-charts-green', '#3aa55d'),
    css('--vscode-charts-purple', '#9d6bd6'), css('--vscode-charts-red', '#d0463c'), css('--vscode-charts-yellow', '#c99a06'),
  ];
}

/** Theme colours read at render time from VS Code's CSS variables. */
function theme(): { config: vega.Config; signals: Record<string, string> } {
  const fg = css('--vscode-editor-foreground', '#333');
  const muted = css('--vscode-descriptionForeground', fg);
  const grid = css('--vscode-editorIndentGuide-background1', css('--vscode-editorIndentGuide-background', '#8884'));
  const font = css('--vscode-font-family', 'sans-serif');
  const hc = document.body.classList.contains('vscode-high-contrast') || document.body.classList.contains('vscode-high-contrast-light');
  const palette = paletteColours();
  const axis = { labelColor: fg, titleColor: fg, domainColor: muted, tickColor: muted, gridColor: grid,
    labelFont: font, titleFont: font, labelFontSize: 11, titleFontSize: 12, grid: true, gridOpacity: hc ? 0.6 : 0.5 };
  return {
    config: {
      background: 'transparent',
      font,
      axis,
      legend: { labelColor: fg, titleColor: muted, labelFont: font, titleFont: font, labelFontSize: 11, titleFontSize: 11 },
      range: { category: palette },
      line: { strokeWidth: hc ? 2.5 : 2 },
    } as vega.Config,
    signals: {
      colorSaturating: css('--vscode-editorWarning-foreground', '#c99a06'),
      colorDead: css('--vscode-disabledForeground', muted),
      colorBreakdown: css('--vscode-editorError-foreground', '#d0463c'),
      colorAxis: muted,
    },
  };
}

function post(m: WebviewMessage): void {
  host.postMessage(m);
}

function say(text: string): void {
  status.textContent = text;
}

const fmt = (v: number): string => String(Number(v.toPrecision(3))).replace(/^-/, '−');

/** Creates the view (first plot, new variable, theme change) or reuses it. */
async function ensureView(variable: string): Promise<vega.View> {
  const key = `${variable}\u0001${document.body.className}`;
  if (view && embeddedFor === key) return view;
  view?.finalize();
  const spec = structuredClone(compiledSpec) as vega.Spec & { axes?: { scale: string; title?: unknown }[] };
  // vega-lite writes its default white background into the compiled spec; the panel's own shows through.
  spec.background = 'transparent';
  // Axis titles are explicit; x is the formula's variable (vega-lite would have titled it "from, x").
  for (const a of spec.axes ?? []) if (a.scale === 'x' && a.title !== undefined) a.title = variable;
  const t = theme();
  const result = await embed(chart, spec, { mode: 'vega', ast: true, actions: false, renderer: 'svg', config: t.config,
    tooltip: { theme: document.body.classList.contains('vscode-light') ? 'light' : 'dark' } });
  view = result.view;
  embeddedFor = key;
  for (const [k, v] of Object.entries(t.signals)) view.signal(k, v);
  return view;
}

function visibleLayers(): number {
  if (!data) return 0;
  const on = new Set([showF.checked ? 'f' : '', showD1.checked ? 'f′' : '', showD2.checked ? 'f″' : '']);
  const pairs = new Set(data.series.filter((r) => on.has(r.layer)).map((r) => `${r.curve}\u0001${r.layer}`));
  return pairs.size;
}

async function render(): Promise<void> {
  if (!data || !state) return;
  const v = await ensureView(data.variable);
  const replace = (name: string, rows: object[]): void => {
    v.change(name, vega.changeset().remove(() => true).insert(rows));
  };
  replace('series', data.series);
  replace('ranges', data.ranges);
  replace('kinks', data.kinks);
  replace('breakdown', data.breakdown);
  v.signal('showF', showF.checked).signal('showD1', showD1.checked).signal('showD2', showD2.checked);
  setDomain(v, [data.view.xMin, data.view.xMax]);
  v.signal('yMin', data.view.yMin).signal('yMax', data.view.yMax);
  await v.runAsync();
  report(v);
}

function setDomain(v: vega.View, d: [number, number]): void {
  shown = d;
  v.signal('xMin', d[0]).signal('xMax', d[1]);
  domainText.textContent = `${data?.variable ?? 'x'} ∈ [${fmt(d[0])}, ${fmt(d[1])}]`;
}

function report(v: vega.View): void {
  const counts = countMarks((v.scenegraph() as unknown as { root: unknown }).root);
  const marks = totalMarks(counts);
  post({ type: 'rendered', layers: visibleLayers(), marks, formulas: state?.formulas.length ?? 0 });
  chart.dataset.marks = String(marks);
  chart.dataset.layers = String(visibleLayers());
}

// ---- controls ------------------------------------------------------------------------------------

function buildControls(s: PlotState): void {
  floatSelect.value = s.floatType;
  // Sliders: rebuilt only when the set of parameters changes, so dragging one is not interrupted.
  const names = s.params.map((p) => p.name).join(',');
  if (paramsBox.dataset.names !== names) {
    paramsBox.dataset.names = names;
    paramsBox.replaceChildren();
    for (const p of s.params) {
      const label = document.createElement('label');
      label.className = 'param';
      const name = document.createElement('span');
      name.className = 'name';
      name.textContent = p.name;
      const input = document.createElement('input');
      input.type = 'range';
      input.min = String(p.min);
      input.max = String(p.max);
      input.step = String(p.step);
      input.value = String(p.value);
      input.setAttribute('aria-label', `parameter ${p.name}`);
      const value = document.createElement('output');
      value.textContent = fmt(p.value);
      let timer: ReturnType<typeof setTimeout> | undefined;
      input.addEventListener('input', () => {
        const n = Number(input.value);
        value.textContent = fmt(n);
        if (timer) clearTimeout(timer);
        timer = setTimeout(() => post({ type: 'param', name: p.name, value: n }), 40);
      });
      label.append(name, input, value);
      paramsBox.append(label);
    }
  }
  paramsBox.hidden = s.params.length === 0;
  renderChips(s);
}

/** The formula legend: one chip per formula with its colour; a remove button once there are two. */
function renderChips(s: PlotState): void {
  const palette = paletteColours();
  formulasBox.replaceChildren();
  formulasBox.hidden = s.formulas.length === 0;
  s.formulas.forEach((f, i) => {
    const chip = document.createElement('span');
    chip.className = 'chip';
    const dot = document.createElement('span');
    dot.className = 'dot';
    dot.style.background = palette[i % palette.length] ?? 'currentColor';
    const label = document.createElement('span');
    label.textContent = f;
    chip.append(dot, label);
    if (s.formulas.length > 1) {
      const x = document.createElement('button');
      x.textContent = '×';
      x.title = `Remove ${f} from the chart`;
      x.setAttribute('aria-label', `Remove ${f}`);
      x.addEventListener('click', () => post({ type: 'remove', index: i }));
      chip.append(x);
    }
    formulasBox.append(chip);
  });
}

for (const box of [showF, showD1, showD2]) {
  box.addEventListener('change', () => {
    if (!view) return;
    view.signal('showF', showF.checked).signal('showD1', showD1.checked).signal('showD2', showD2.checked);
    void view.runAsync().then(report);
  });
}

floatSelect.addEventListener('change', () => {
  const v = floatSelect.value;
  if (v === 'float16' || v === 'bfloat16' || v === 'float32') post({ type: 'floatType', value: v });
});

let domainTimer: ReturnType<typeof setTimeout> | undefined;
/** Shows `d` at once (stretching the data already there) and asks the host to resample it. */
function requestDomain(d: [number, number]): void {
  const width = d[1] - d[0];
  if (!(width > 1e-6) || Math.abs(d[0]) > 1e5 || Math.abs(d[1]) > 1e5) return;
  if (view) {
    setDomain(view, d);
    void view.runAsync();
  }
  if (domainTimer) clearTimeout(domainTimer);
  domainTimer = setTimeout(() => post({ type: 'domain', from: d[0], to: d[1] }), 120);
}

function zoom(factor: number, at = 0.5): void {
  const [a, b] = shown;
  const c = a + (b - a) * at;
  requestDomain([c - (c - a) * factor, c + (b - c) * factor]);
}

/** Where on the plot's x range a pointer is, as a fraction 0…1. */
function fraction(ev: MouseEvent): number {
  if (!view) return 0.5;
  const rect = chart.getBoundingClientRect();
  const [ox] = view.origin();
  const pad = view.padding();
  const px = ev.clientX - rect.left - ox - (typeof pad === 'number' ? pad : pad.left ?? 0);
  return Math.min(1, Math.max(0, px / Math.max(1, view.width())));
}

chart.addEventListener('wheel', (ev) => {
  ev.preventDefault();
  zoom(ev.deltaY > 0 ? 1.15 : 1 / 1.15, fraction(ev));
}, { passive: false });

let drag: { x: number; domain: [number, number] } | undefined;
chart.addEventListener('pointerdown', (ev) => {
  if (ev.button !== 0) return;
  drag = { x: ev.clientX, domain: shown };
  chart.setPointerCapture(ev.pointerId);
  chart.classList.add('dragging');
});
chart.addEventListener('pointermove', (ev) => {
  if (!drag || !view) return;
  const dx = ((ev.clientX - drag.x) / Math.max(1, view.width())) * (drag.domain[1] - drag.domain[0]);
  requestDomain([drag.domain[0] - dx, drag.domain[1] - dx]);
});
const endDrag = (): void => {
  drag = undefined;
  chart.classList.remove('dragging');
};
chart.addEventListener('pointerup', endDrag);
chart.addEventListener('pointercancel', endDrag);

$('zoom-in').addEventListener('click', () => zoom(1 / 1.5));
$('zoom-out').addEventListener('click', () => zoom(1.5));
$('reset').addEventListener('click', () => { if (startDomain) requestDomain(startDomain); });

$('export-svg').addEventListener('click', () => {
  if (!view) return;
  void view.toSVG().then((svg) => post({ type: 'export', format: 'svg', data: svg }));
});
$('export-png').addEventListener('click', () => {
  if (!view) return;
  // PNG at 2× so it stays crisp when pasted into documents; drawn on a canvas the view creates (no eval, no network).
  void view.toImageURL('png', 2).then((url) => post({ type: 'export', format: 'png', data: url }));
});

// The chart fills what the toolbar, sliders and chips leave: follow its size (vega only watches the window).
new ResizeObserver(() => {
  if (!view || chart.clientWidth === 0 || chart.clientHeight === 0) return;
  void view.width(chart.clientWidth).height(chart.clientHeight).resize().runAsync();
}).observe(chart);

// Theme switches change the body's classes; re-embed so axis and legend colours follow.
new MutationObserver(() => {
  if (state) renderChips(state);
  if (data) void render().catch(fail);
}).observe(document.body, { attributes: true, attributeFilter: ['class'] });

function fail(e: unknown): void {
  const message = e instanceof Error ? e.message : String(e);
  say(`could not draw: ${message}`);
  post({ type: 'error', message });
}

window.addEventListener('message', (ev: MessageEvent<unknown>) => {
  const m: HostMessage | undefined = parseHostMessage(ev.data);
  if (!m) {
    post({ type: 'error', message: 'dropped a malformed message from the host' });
    return;
  }
  if (m.type === 'exported') {
    say(m.ok ? m.message : `export failed: ${m.message}`);
    return;
  }
  const first = !state;
  const newFormulas = state?.formulas.join('\u0001') !== m.state.formulas.join('\u0001');
  data = m.data;
  state = m.state;
  if (first || newFormulas) startDomain = [...m.state.domain];
  buildControls(m.state);
  say(m.data.series.length === 0 ? 'nothing to draw on this range' : '');
  void render().catch(fail);
});

post({ type: 'ready' });
