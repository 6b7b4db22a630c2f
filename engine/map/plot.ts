// The map plot: target position against source position, one column per variant, one row per
// target axis, as a standalone SVG. It is the first thing people look at after a comparison, so
// it stays plain: every axis labelled with the tissue's own axis names, the expected map drawn
// as a dashed line, knock-in axons in a second colour, ρ in each panel.
import type { AxisPairing } from './expected.ts';

export interface PlotPanel {
  title: string;
  su: ArrayLike<number>;
  sv: ArrayLike<number>;
  tu: ArrayLike<number>;
  tv: ArrayLike<number>;
  /** 1 for a knock-in axon */
  knockin: ArrayLike<number>;
  spearmanU: number | null;
  spearmanV: number | null;
}

/** names of the sheets' axes, e.g. "outer→inner" (empty when the scene gives none) */
export interface PlotLabels {
  source: string;
  target: string;
  sourceU: string;
  sourceV: string;
  targetU: string;
  targetV: string;
}

const SIZE = 190; // panel side, px
const GAP = 44;
const LEFT = 74;
const TOP = 56;
const BOTTOM = 58;
const MAX_POINTS = 1500; // per panel; more are thinned evenly
const WILD = '#2f6db5';
const KNOCKIN = '#e07b00';

export function mapPlotSvg(panels: PlotPanel[], labels: PlotLabels, pairing: AxisPairing): string {
  const cols = Math.max(1, panels.length);
  const width = LEFT + cols * SIZE + (cols - 1) * GAP + 24;
  const height = TOP + 2 * SIZE + GAP + BOTTOM + 26;
  const out: string[] = [];
  out.push(`<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" font-family="Helvetica, Arial, sans-serif" font-size="11">`);
  out.push(`<rect width="${width}" height="${height}" fill="#fff"/>`);
  out.push(text(LEFT, 20, `Termination on ${labels.target} against origin on ${labels.source}`, 'start', 13, 'bold'));
  const rows: ('u' | 'v')[] = ['u', 'v'];
  const anyKnockin = panels.some((p) => Array.prototype.some.call(p.knockin, (k: number) => k === 1));
  panels.forEach((p, c) => {
    const x0 = LEFT + c * (SIZE + GAP);
    out.push(text(x0 + SIZE / 2, TOP - 10, p.title, 'middle', 12, 'bold'));
    rows.forEach((axis, r) => {
      const y0 = TOP + r * (SIZE + GAP);
      const pair = pairing[axis];
      const src = pair.from === 'u' ? p.su : p.sv;
      const tgt = axis === 'u' ? p.tu : p.tv;
      out.push(`<rect x="${x0}" y="${y0}" width="${SIZE}" height="${SIZE}" fill="#fafafa" stroke="#999"/>`);
      for (const t of [0.25, 0.5, 0.75]) {
        out.push(`<line x1="${x0 + t * SIZE}" y1="${y0}" x2="${x0 + t * SIZE}" y2="${y0 + SIZE}" stroke="#e6e6e6"/>`);
        out.push(`<line x1="${x0}" y1="${y0 + t * SIZE}" x2="${x0 + SIZE}" y2="${y0 + t * SIZE}" stroke="#e6e6e6"/>`);
      }
      // expected map: target = source, or 1 − source when reversed
      const ey0 = pair.reversed ? 1 : 0, ey1 = pair.reversed ? 0 : 1;
      out.push(`<line x1="${x0}" y1="${f(y0 + (1 - ey0) * SIZE)}" x2="${x0 + SIZE}" y2="${f(y0 + (1 - ey1) * SIZE)}" stroke="#555" stroke-dasharray="4 3"/>`);
      const n = src.length;
      const stride = Math.max(1, Math.ceil(n / MAX_POINTS));
      // wild type first, knock-in on top
      for (const group of [0, 1]) {
        const colour = group ? KNOCKIN : WILD;
        const dots: string[] = [];
        for (let i = 0; i < n; i += stride) {
          if ((p.knockin[i] === 1 ? 1 : 0) !== group) continue;
          dots.push(`M${f(x0 + src[i] * SIZE)} ${f(y0 + (1 - tgt[i]) * SIZE)}h0`);
        }
        if (dots.length) out.push(`<path d="${dots.join('')}" stroke="${colour}" stroke-opacity="0.7" stroke-width="3.2" stroke-linecap="round"/>`);
      }
      const rho = axis === 'u' ? p.spearmanU : p.spearmanV;
      out.push(text(x0 + 6, y0 + 14, `ρ = ${rho === null ? '–' : rho.toFixed(2)}`, 'start', 11));
      out.push(text(x0 + SIZE / 2, y0 + SIZE + 26, `source ${pair.from}${axisName(pair.from === 'u' ? labels.sourceU : labels.sourceV)}`, 'middle', 10));
      for (const t of [0, 1]) {
        out.push(text(x0 + t * SIZE, y0 + SIZE + 12, String(t), 'middle', 9, 'normal', '#666'));
        if (c === 0) out.push(text(x0 - 5, y0 + (1 - t) * SIZE + 3, String(t), 'end', 9, 'normal', '#666'));
      }
      if (c === 0) {
        const label = `target ${axis}${axisName(axis === 'u' ? labels.targetU : labels.targetV)}`;
        const cx = LEFT - 30, cy = y0 + SIZE / 2;
        out.push(`<text x="${cx}" y="${cy}" text-anchor="middle" font-size="10" transform="rotate(-90 ${cx} ${cy})">${esc(label)}</text>`);
      }
    });
  });
  const ly = TOP + 2 * SIZE + GAP + BOTTOM - 4;
  let lx = LEFT;
  out.push(`<circle cx="${lx + 4}" cy="${ly - 4}" r="3.5" fill="${WILD}"/>`, text(lx + 12, ly, anyKnockin ? 'wild-type axons' : 'axons', 'start', 10));
  lx += anyKnockin ? 110 : 60;
  if (anyKnockin) {
    out.push(`<circle cx="${lx + 4}" cy="${ly - 4}" r="3.5" fill="${KNOCKIN}"/>`, text(lx + 12, ly, 'knock-in axons', 'start', 10));
    lx += 105;
  }
  out.push(`<line x1="${lx}" y1="${ly - 4}" x2="${lx + 22}" y2="${ly - 4}" stroke="#555" stroke-dasharray="4 3"/>`, text(lx + 28, ly, 'expected map', 'start', 10));
  out.push('</svg>');
  return out.join('\n') + '\n';
}

function axisName(name: string): string {
  return name ? ` (${name})` : '';
}

function text(x: number, y: number, s: string, anchor: string, size: number, weight = 'normal', fill = '#222'): string {
  return `<text x="${f(x)}" y="${f(y)}" text-anchor="${anchor}" font-size="${size}" font-weight="${weight}" fill="${fill}">${esc(s)}</text>`;
}

function f(x: number): string {
  return (Math.round(x * 10) / 10).toString();
}

function esc(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}
