/**
 * The plot panel: one webview reused for every plot (create-or-show). The host samples the curves
 * and sends plain data by message; the webview (media/src/plot.ts) draws it with a vega spec compiled
 * at build time. Zoom/pan, sliders and the float-type picker come back as messages, validated here,
 * and trigger a recomputation in the host.
 */
import * as vscode from 'vscode';
import type { Config } from './config';
import type { FloatType } from '../core/types';
import { parseWebviewMessage, type HostMessage, type PlotState, type RenderReport } from '../core/plot/protocol';
import { buildPlotData } from '../core/plot/spec';
import * as engine from './engine';

export interface PlotRequest {
  formula: string;
  variable?: string;
  language?: string;
  params?: Record<string, number>;
  uri?: string;
}

interface Entry {
  request: PlotRequest;
  /** Where it came from, to follow the document: the formula's text and position when plotted. */
  source?: { uri: string; offset: number };
}

const MAX_FORMULAS = 6;

export class PlotPanel {
  static current: PlotPanel | undefined;
  static readonly viewType = 'slopewise.plot';

  private readonly disposables: vscode.Disposable[] = [];
  private entries: Entry[] = [];
  private domain: [number, number];
  private floatType: FloatType;
  private samples: number;
  /** Slider values chosen in the panel, by parameter name (apply to every formula that has it). */
  private overrides: Record<string, number> = {};
  private ready = false;
  private pending: HostMessage | undefined;
  private followTimer: ReturnType<typeof setTimeout> | undefined;

  static createOrShow(context: vscode.ExtensionContext, log: vscode.LogOutputChannel, config: Config,
    onRendered: (r: RenderReport) => void): PlotPanel {
    if (PlotPanel.current) {
      PlotPanel.current.panel.reveal(undefined, true);
      return PlotPanel.current;
    }
    const panel = vscode.window.createWebviewPanel(PlotPanel.viewType, 'Slopewise Plot',
      { viewColumn: vscode.ViewColumn.Beside, preserveFocus: true }, {
        enableScripts: true,
        retainContextWhenHidden: true,
        localResourceRoots: [vscode.Uri.joinPath(context.extensionUri, 'media')],
      });
    PlotPanel.current = new PlotPanel(panel, context, log, config, onRendered);
    return PlotPanel.current;
  }

  private constructor(
    private readonly panel: vscode.WebviewPanel,
    private readonly context: vscode.ExtensionContext,
    private readonly log: vscode.LogOutputChannel,
    config: Config,
    private readonly onRendered: (r: RenderReport) => void,
  ) {
    this.domain = [...config.plotDomain];
    this.floatType = config.plotFloatType;
    this.samples = config.plotSamples;
    panel.iconPath = vscode.Uri.joinPath(context.extensionUri, 'media', 'plot-icon.svg');
    panel.webview.html = this.html();
    panel.onDidDispose(() => this.dispose(), null, this.disposables);
    panel.webview.onDidReceiveMessage((m: unknown) => this.receive(m), null, this.disposables);
    void vscode.commands.executeCommand('setContext', 'slopewise.plotOpen', true);
  }

  dispose(): void {
    if (PlotPanel.current === this) PlotPanel.current = undefined;
    void vscode.commands.executeCommand('setContext', 'slopewise.plotOpen', false);
    if (this.followTimer) clearTimeout(this.followTimer);
    this.panel.dispose();
    for (const d of this.disposables.splice(0)) d.dispose();
  }

  /** Plots `request`, replacing the chart or adding it to the comparison. */
  show(request: PlotRequest, add: boolean): void {
    const entry: Entry = { request };
    if (request.uri) {
      const doc = vscode.workspace.textDocuments.find((d) => d.uri.toString() === request.uri);
      const offset = doc?.getText().indexOf(request.formula) ?? -1;
      if (offset >= 0) entry.source = { uri: request.uri, offset };
    }
    if (add) {
      if (this.entries.some((e) => e.request.formula === request.formula)) return this.panel.reveal(undefined, true);
      this.entries = [...this.entries, entry].slice(-MAX_FORMULAS);
    } else {
      this.entries = [entry];
      this.overrides = {};
    }
    this.panel.reveal(undefined, true);
    this.update();
  }

  /** The formulas on the chart, as plotted (source text). */
  formulas(): string[] {
    return this.entries.map((e) => e.request.formula);
  }

  settingsChanged(config: Config): void {
    this.samples = config.plotSamples;
    this.update();
  }

  /** Follows the document: when the source of a plotted formula changes, re-read it and redraw. */
  documentChanged(doc: vscode.TextDocument): void {
    const uri = doc.uri.toString();
    if (!this.entries.some((e) => e.source?.uri === uri)) return;
    if (this.followTimer) clearTimeout(this.followTimer);
    this.followTimer = setTimeout(() => {
      let changed = false;
      this.entries = this.entries.map((e) => {
        if (e.source?.uri !== uri) return e;
        const next = engine.formulaNear(doc, e.source.offset, e.request.formula);
        if (!next || next.text === e.request.formula) return e;
        changed = true;
        const request: PlotRequest = { ...e.request, formula: next.text };
        if (next.variable) request.variable = next.variable;
        return { request, source: { uri, offset: next.offset } };
      });
      if (changed) this.update();
    }, 300);
  }

  private post(msg: HostMessage): void {
    if (!this.ready) {
      this.pending = msg;
      return;
    }
    void this.panel.webview.postMessage(msg);
  }

  /** Recomputes every curve for the current domain, parameters and float type, and sends the data. */
  private update(): void {
    const curves = [];
    const params = new Map<string, number>();
    let variable = 'x';
    for (const e of this.entries) {
      try {
        const c = engine.plotCurve(e.request, this.overrides, this.floatType, this.domain);
        curves.push(c.curve);
        variable = c.variable;
        for (const [k, v] of Object.entries(c.parameters)) if (!params.has(k)) params.set(k, v);
      } catch (err) {
        this.log.warn(`plot: ${short(e.request.formula)}: ${engine.describe(err)}`);
        void vscode.window.showWarningMessage(`Slopewise: cannot plot ${short(e.request.formula)}: ${err instanceof Error ? err.message : String(err)}`);
      }
    }
    // Titled by what the chart shows (the display form), not by the raw source text.
    this.panel.title = curves.length === 1 ? `Plot: ${short(curves[0]!.label)}` : `Plot: ${curves.length} formulas`;
    const data = buildPlotData(curves, { domain: this.domain, samples: this.samples, floatType: this.floatType, variable });
    const state: PlotState = {
      domain: this.domain,
      floatType: this.floatType,
      params: [...params].map(([name, value]) => ({ name, value, ...sliderRange(value) })),
      formulas: curves.map((c) => c.label),
    };
    this.post({ type: 'plot', data, state });
  }

  private receive(raw: unknown): void {
    const m = parseWebviewMessage(raw);
    if (!m) {
      this.log.warn(`plot webview sent an unexpected message: ${JSON.stringify(raw)?.slice(0, 200)}`);
      return;
    }
    switch (m.type) {
      case 'ready':
        this.ready = true;
        if (this.pending) {
          void this.panel.webview.postMessage(this.pending);
          this.pending = undefined;
        }
        return;
      case 'rendered':
        this.log.debug(`plot rendered: ${m.layers} layer(s), ${m.marks} mark item(s), ${m.formulas} formula(s)`);
        this.onRendered(m);
        return;
      case 'domain':
        this.domain = [m.from, m.to];
        this.update();
        return;
      case 'param':
        this.overrides = { ...this.overrides, [m.name]: m.value };
        this.update();
        return;
      case 'floatType':
        this.floatType = m.value;
        this.update();
        return;
      case 'remove':
        if (m.index < this.entries.length && this.entries.length > 1) {
          this.entries = this.entries.filter((_, i) => i !== m.index);
          this.update();
        }
        return;
      case 'export':
        void this.save(m.format, m.data);
        return;
      case 'error':
        this.log.error(`plot webview: ${m.message}`);
        return;
    }
  }

  private async save(format: 'svg' | 'png', data: string): Promise<void> {
    const base = vscode.workspace.workspaceFolders?.[0]?.uri ?? this.context.globalStorageUri;
    const target = await vscode.window.showSaveDialog({
      defaultUri: vscode.Uri.joinPath(base, `slopewise-plot.${format}`),
      filters: format === 'svg' ? { 'SVG image': ['svg'] } : { 'PNG image': ['png'] },
      saveLabel: `Export ${format.toUpperCase()}`,
    });
    if (!target) return;
    try {
      const bytes = format === 'svg' ? new TextEncoder().encode(data) : base64ToBytes(data.slice(data.indexOf(',') + 1));
      await vscode.workspace.fs.writeFile(target, bytes);
      this.post({ type: 'exported', ok: true, message: `saved ${vscode.workspace.asRelativePath(target)}` });
    } catch (e) {
      this.log.error(`export failed: ${engine.describe(e)}`);
      this.post({ type: 'exported', ok: false, message: e instanceof Error ? e.message : String(e) });
    }
  }

  private html(): string {
    const webview = this.panel.webview;
    const media = (f: string): vscode.Uri => webview.asWebviewUri(vscode.Uri.joinPath(this.context.extensionUri, 'media', f));
    const nonce = makeNonce();
    const csp = [
      "default-src 'none'",
      `script-src 'nonce-${nonce}'`,
      `style-src ${webview.cspSource} 'unsafe-inline'`,
      `img-src ${webview.cspSource} data:`,
      `font-src ${webview.cspSource}`,
    ].join('; ');
    return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="UTF-8">
<meta http-equiv="Content-Security-Policy" content="${csp}">
<meta name="viewport" content="width=device-width, initial-scale=1.0">
<link href="${media('plot.css').toString()}" rel="stylesheet">
<title>Slopewise Plot</title>
</head>
<body>
<header class="toolbar" role="toolbar" aria-label="Plot controls">
  <fieldset class="layers" aria-label="Curves shown">
    <label title="f: solid line"><input type="checkbox" id="show-f" checked> f <svg class="dash" width="22" height="6" aria-hidden="true"><line x1="1" y1="3" x2="21" y2="3"/></svg></label>
    <label title="f′: dashed line"><input type="checkbox" id="show-d1" checked> f′ <svg class="dash" width="22" height="6" aria-hidden="true"><line x1="1" y1="3" x2="21" y2="3" stroke-dasharray="7 4"/></svg></label>
    <label title="f″: dotted line"><input type="checkbox" id="show-d2"> f″ <svg class="dash" width="22" height="6" aria-hidden="true"><line x1="1" y1="3" x2="21" y2="3" stroke-dasharray="2 3"/></svg></label>
  </fieldset>
  <label class="float">breakdown in <select id="float-type" aria-label="Float type whose breakdown ranges are marked">
    <option value="float16">float16</option><option value="bfloat16">bfloat16</option><option value="float32">float32</option>
  </select></label>
  <span class="domain" aria-label="x range">
    <button id="zoom-in" title="Zoom in (or scroll on the chart)" aria-label="Zoom in">+</button>
    <button id="zoom-out" title="Zoom out (or scroll on the chart)" aria-label="Zoom out">-</button>
    <button id="reset" title="Back to the starting range">reset</button>
    <span id="domain-text" class="muted"></span>
  </span>
  <span class="export">
    <button id="export-svg" title="Save the chart as SVG">SVG</button>
    <button id="export-png" title="Save the chart as PNG">PNG</button>
  </span>
</header>
<section id="params" class="params" aria-label="Parameters"></section>
<section id="formulas" class="formulas" aria-label="Formulas on the chart"></section>
<main id="chart" class="chart" aria-label="Chart"></main>
<footer class="legend-note muted">
  <span class="item"><span class="swatch saturating"></span> saturating (|f′| small)</span>
  <span class="item"><span class="swatch dead"></span> dead (f′ = 0)</span>
  <span class="item"><span class="swatch breakdown"></span> float breakdown</span>
  <span class="item"><span class="kink">◆</span> kink</span>
  <span class="item">drag to pan, scroll to zoom</span>
  <span id="status" role="status"></span>
</footer>
<script nonce="${nonce}" src="${media('dist/plot.js').toString()}"></script>
</body>
</html>`;
  }
}

function short(s: string): string {
  const t = s.replace(/\s+/g, ' ').trim();
  return t.length > 40 ? `${t.slice(0, 39)}…` : t;
}

function makeNonce(): string {
  const bytes = new Uint8Array(24);
  crypto.getRandomValues(bytes);
  return Array.from(bytes, (b) => b.toString(16).padStart(2, '0')).join('');
}

function base64ToBytes(b64: string): Uint8Array {
  const bin = atob(b64);
  const out = new Uint8Array(bin.length);
  for (let i = 0; i < bin.length; i++) out[i] = bin.charCodeAt(i);
  return out;
}

/** A slider range around a parameter's value: [0, 2v] for positive values, symmetric otherwise. */
export function sliderRange(v: number): { min: number; max: number; step: number } {
  const mag = Math.max(Math.abs(v), 0.1);
  const min = v > 0 ? 0 : -2 * mag;
  const max = v < 0 ? 0 : 2 * mag;
  const step = Number(((max - min) / 200).toPrecision(2));
  return { min: v < 0 ? Math.min(min, v) : min, max, step };
}
