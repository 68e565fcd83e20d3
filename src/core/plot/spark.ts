/**
 * The hover card's tiny plot: f (solid) and f′ (dashed) on one axis, drawn as hand-made SVG paths.
 * A few hundred bytes, no chart library. Non-finite samples break the line instead of being drawn.
 * Colours are mid-tones readable on both light and dark hover backgrounds (the hover's theme is not
 * known to the host).
 */

export const SPARK = { width: 260, height: 84, pad: 4, labelPad: 14 } as const;

const COLOR_F = '#3d8fd9';
const COLOR_DF = '#e0842a';
const COLOR_AXIS = '#8a8a8a';

/** A robust y-range: the span of finite values, clipped to the 2nd–98th percentile when outliers dominate. */
export function robustRange(values: number[]): [number, number] | undefined {
  const finite = values.filter(Number.isFinite).sort((a, b) => a - b);
  if (finite.length === 0) return undefined;
  let lo = finite[0]!;
  let hi = finite[finite.length - 1]!;
  const q = (p: number): number => finite[Math.min(finite.length - 1, Math.max(0, Math.round(p * (finite.length - 1))))]!;
  const qlo = q(0.02);
  const qhi = q(0.98);
  // Exponential growth at one end would flatten everything else: clip when the tails are 4× the body.
  if (hi - lo > 4 * (qhi - qlo) && qhi > qlo) {
    lo = qlo;
    hi = qhi;
  }
  if (hi === lo) {
    lo -= 1;
    hi += 1;
  }
  const m = (hi - lo) * 0.06;
  return [lo - m, hi + m];
}

/** SVG path data for one curve; `undefined` samples and non-finite values start a new segment. */
export function pathData(xs: number[], ys: number[], sx: (x: number) => number, sy: (y: number) => number,
  yLimit: [number, number]): string {
  let d = '';
  let pen = false;
  const span = yLimit[1] - yLimit[0];
  for (let i = 0; i < xs.length; i++) {
    const x = xs[i]!;
    const y = ys[i];
    // Far outside the view: break rather than draw a spike to a clipped edge.
    if (y === undefined || !Number.isFinite(y) || y < yLimit[0] - 2 * span || y > yLimit[1] + 2 * span) {
      pen = false;
      continue;
    }
    d += `${pen ? 'L' : 'M'}${sx(x).toFixed(1)} ${sy(y).toFixed(1)}`;
    pen = true;
  }
  return d;
}

function label(v: number): string {
  const r = Number(v.toPrecision(3));
  return String(r).replace(/^-/, '−');
}

/** The SVG text, or undefined when there is nothing finite to draw. */
export function sparkSvg(xs: number[], f: number[], df: number[]): string | undefined {
  const yr = robustRange([...f, ...df]);
  if (!yr || xs.length < 2) return undefined;
  const { width: W, height: H, pad, labelPad } = SPARK;
  const x0 = xs[0]!;
  const x1 = xs[xs.length - 1]!;
  const plotH = H - labelPad;
  const sx = (x: number): number => pad + ((x - x0) / (x1 - x0)) * (W - 2 * pad);
  const sy = (y: number): number => pad + (1 - (y - yr[0]) / (yr[1] - yr[0])) * (plotH - 2 * pad);
  const parts: string[] = [];
  parts.push(`<svg xmlns="http://www.w3.org/2000/svg" width="${W}" height="${H}" viewBox="0 0 ${W} ${H}">`);
  parts.push(`<defs><clipPath id="c"><rect x="${pad}" y="${pad}" width="${W - 2 * pad}" height="${plotH - 2 * pad}"/></clipPath></defs>`);
  // Axes: y = 0 and x = 0 when in view.
  if (yr[0] < 0 && yr[1] > 0) parts.push(`<line x1="${pad}" x2="${W - pad}" y1="${sy(0).toFixed(1)}" y2="${sy(0).toFixed(1)}" stroke="${COLOR_AXIS}" stroke-width="0.6"/>`);
  if (x0 < 0 && x1 > 0) parts.push(`<line x1="${sx(0).toFixed(1)}" x2="${sx(0).toFixed(1)}" y1="${pad}" y2="${plotH - pad}" stroke="${COLOR_AXIS}" stroke-width="0.6"/>`);
  const g = (d: string, color: string, dash: string): string =>
    d ? `<path d="${d}" fill="none" stroke="${color}" stroke-width="1.6" stroke-linejoin="round"${dash}/>` : '';
  parts.push(`<g clip-path="url(#c)">${g(pathData(xs, df, sx, sy, yr), COLOR_DF, ' stroke-dasharray="4 2"')}${g(pathData(xs, f, sx, sy, yr), COLOR_F, '')}</g>`);
  const ty = H - 3;
  const font = 'font-family="sans-serif" font-size="10"';
  parts.push(`<text x="${pad}" y="${ty}" ${font} fill="${COLOR_AXIS}">${label(x0)}</text>`);
  parts.push(`<text x="${W - pad}" y="${ty}" ${font} fill="${COLOR_AXIS}" text-anchor="end">${label(x1)}</text>`);
  parts.push(`<text x="${W / 2 - 6}" y="${ty}" ${font} fill="${COLOR_F}" text-anchor="end">— f</text>`);
  parts.push(`<text x="${W / 2 + 6}" y="${ty}" ${font} fill="${COLOR_DF}">- - f′</text>`);
  parts.push('</svg>');
  return parts.join('');
}
