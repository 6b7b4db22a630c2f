// The mapping error panel: the source sheet and the target sheet side by side, every axon drawn
// in its source colour (so a good map looks like the same colour picture, maybe turned or
// flipped), expected versus actual landing positions joined by error vectors, the distribution
// of errors, and the summary numbers exactly as run.json gives them.
import { useEffect, useMemo, useRef, useState } from 'react';
import type { ViewStore } from '../state/viewState.ts';
import { useStore } from '../state/store.ts';
import { visibleMask, type RunModel } from '../model/runModel.ts';
import { pickPoint2d } from '../geometry/pick.ts';
import { formatValue } from './format.ts';

/** run.json metrics.map keys, in display order, with labels and units. */
export const MAP_METRICS: { key: string; label: string; unit?: string; percent?: boolean }[] = [
  { key: 'meanErrorUm', label: 'mean error', unit: 'µm' },
  { key: 'medianErrorUm', label: 'median error', unit: 'µm' },
  { key: 'p95ErrorUm', label: '95th percentile error', unit: 'µm' },
  { key: 'ectopicFraction', label: 'ectopic', percent: true },
  { key: 'spearmanU', label: 'Spearman ρ, u' },
  { key: 'spearmanV', label: 'Spearman ρ, v' },
  { key: 'orderFlipFraction', label: 'neighbour order flips', percent: true },
  { key: 'duplicationIndex', label: 'duplication index' },
];

/** sheet plot geometry, CSS px: a PLOT-sized square inside these margins */
export const PLOT = 180;
export const MARGIN = { l: 44, r: 8, t: 8, b: 30 };

export function MapCheck({ store, models }: { store: ViewStore; models: RunModel[] }) {
  const [tab, setTab] = useState(0);
  const model = models[Math.min(tab, models.length - 1)];
  const showVectors = useStore(store, (s) => s.showVectors);
  const showExpected = useStore(store, (s) => s.showExpected);
  const selected = useStore(store, (s) => s.selected);
  const hiddenPops = useStore(store, (s) => s.hiddenPops);
  const hiddenStatuses = useStore(store, (s) => s.hiddenStatuses);
  const mask = useMemo(() => visibleMask(model, hiddenPops, hiddenStatuses), [model, hiddenPops, hiddenStatuses]);
  const map = model.map;
  const hasExpected = !!(map?.expectedU && map.expectedV);

  return (
    <section className="map-check" aria-label="map check" data-testid="map-check">
      <header className="map-head">
        <h2>Map check</h2>
        {models.length > 1 && models.map((m, i) => (
          <button key={m.name} className={`seg ${i === tab ? 'on' : ''}`} onClick={() => setTab(i)}>{m.name}</button>
        ))}
        <label className="inline"><input type="checkbox" checked={showVectors} disabled={!hasExpected} onChange={() => store.set({ showVectors: !showVectors })} /> error vectors</label>
        <label className="inline"><input type="checkbox" checked={showExpected} disabled={!hasExpected} onChange={() => store.set({ showExpected: !showExpected })} /> expected positions</label>
        {map?.projected && <span className="note">target positions projected from axon ends (this run has no map columns)</span>}
      </header>
      <div className="map-body">
        <SheetPlot
          title={`source: ${model.sourceSheet?.name ?? 'source sheet'}`} uName={model.sourceSheet?.uName} vName={model.sourceSheet?.vName}
          model={model} xs={model.sourceU} ys={model.sourceV} mask={mask} selected={selected}
          onPick={(a) => store.set({ selected: a })} testId="plot-source"
        />
        {map ? (
          <SheetPlot
            title={`target: ${model.targetSheet?.name ?? 'target sheet'}`} uName={model.targetSheet?.uName} vName={model.targetSheet?.vName}
            model={model} xs={map.targetU} ys={map.targetV} mask={mask} selected={selected}
            expected={hasExpected ? [map.expectedU!, map.expectedV!] : null} showVectors={showVectors && hasExpected} showExpected={showExpected && hasExpected}
            onPick={(a) => store.set({ selected: a })} testId="plot-target"
          />
        ) : (
          <div className="plot-missing muted">No target sheet or map columns in this run.</div>
        )}
        {map?.errorUm ? <ErrorHistogram errors={map.errorUm} mask={mask} selected={selected} /> : <div className="plot-missing muted">No error_um column in axons.csv.</div>}
        <MetricsTable models={models} />
      </div>
    </section>
  );
}

function SheetPlot(p: {
  title: string; uName?: string; vName?: string; model: RunModel; xs: ArrayLike<number>; ys: ArrayLike<number>; mask: Uint8Array;
  selected: number | null; expected?: [Float64Array, Float64Array] | null; showVectors?: boolean; showExpected?: boolean;
  onPick: (a: number | null) => void; testId: string;
}) {
  const ref = useRef<HTMLCanvasElement>(null);
  const W = PLOT + MARGIN.l + MARGIN.r, H = PLOT + MARGIN.t + MARGIN.b;
  const toX = (u: number) => MARGIN.l + u * PLOT;
  const toY = (v: number) => MARGIN.t + (1 - v) * PLOT;
  useEffect(() => {
    const c = ref.current;
    const ctx = c && setupCanvas(c, W, H);
    if (!ctx) return;
    const { model, xs, ys, mask, expected, selected } = p;
    ctx.fillStyle = '#161b22';
    ctx.fillRect(MARGIN.l, MARGIN.t, PLOT, PLOT);
    ctx.strokeStyle = '#2c3440';
    ctx.lineWidth = 1;
    for (const g of [0.25, 0.5, 0.75]) {
      line(ctx, toX(g), MARGIN.t, toX(g), MARGIN.t + PLOT);
      line(ctx, MARGIN.l, toY(g), MARGIN.l + PLOT, toY(g));
    }
    // Few canvas calls: one path for all vectors, one for all expected marks, and the dots written
    // straight into the pixels (thousands of separately styled rectangles are slow to raster).
    if (expected && p.showVectors) {
      ctx.strokeStyle = 'rgba(230, 236, 242, 0.28)';
      ctx.beginPath();
      for (let a = 0; a < xs.length; a++) {
        if (!mask[a] || !Number.isFinite(xs[a]) || !Number.isFinite(expected[0][a])) continue;
        ctx.moveTo(toX(expected[0][a]), toY(expected[1][a]));
        ctx.lineTo(toX(xs[a]), toY(ys[a]));
      }
      ctx.stroke();
    }
    if (expected && p.showExpected) {
      ctx.strokeStyle = 'rgba(230, 236, 242, 0.55)';
      ctx.beginPath();
      for (let a = 0; a < xs.length; a++) {
        if (!mask[a] || !Number.isFinite(expected[0][a])) continue;
        ctx.rect(toX(expected[0][a]) - 1.5, toY(expected[1][a]) - 1.5, 3, 3);
      }
      ctx.stroke();
    }
    drawDots(ctx, model.colours, xs, ys, mask, toX, toY, xs.length > 3000 ? 2 : 3);
    if (selected !== null && selected < xs.length && Number.isFinite(xs[selected])) {
      const x = toX(clamp(xs[selected])), y = toY(clamp(ys[selected]));
      if (expected && Number.isFinite(expected[0][selected])) {
        ctx.strokeStyle = '#ffffff';
        ctx.lineWidth = 2;
        line(ctx, toX(expected[0][selected]), toY(expected[1][selected]), x, y);
        ctx.strokeRect(toX(expected[0][selected]) - 3, toY(expected[1][selected]) - 3, 6, 6);
      }
      ring(ctx, x, y);
    }
    ctx.strokeStyle = '#8b96a3';
    ctx.lineWidth = 1;
    ctx.strokeRect(MARGIN.l + 0.5, MARGIN.t + 0.5, PLOT - 1, PLOT - 1);
    ctx.fillStyle = '#c9d1d9';
    ctx.font = '11px system-ui, sans-serif';
    ctx.textAlign = 'center';
    for (const t of [0, 0.5, 1]) {
      ctx.fillText(String(t), toX(t), MARGIN.t + PLOT + 12);
    }
    ctx.textAlign = 'right';
    for (const t of [0, 0.5, 1]) ctx.fillText(String(t), MARGIN.l - 4, toY(t) + 4);
    ctx.textAlign = 'center';
    ctx.font = '12px system-ui, sans-serif';
    ctx.fillText(`u${p.uName ? ` (${p.uName})` : ''}`, MARGIN.l + PLOT / 2, H - 3);
    if (p.vName) {
      ctx.save();
      ctx.translate(11, MARGIN.t + PLOT / 2);
      ctx.rotate(-Math.PI / 2);
      ctx.fillText(`v (${p.vName})`, 0, 0);
      ctx.restore();
    } else {
      ctx.fillText('v', 10, MARGIN.t + PLOT / 2 + 4); // a lone letter reads better upright
    }
  });
  const onClick = (e: React.MouseEvent<HTMLCanvasElement>) => {
    const r = e.currentTarget.getBoundingClientRect();
    const px = e.clientX - r.left, py = e.clientY - r.top;
    const n = p.xs.length;
    const sx = new Float64Array(n), sy = new Float64Array(n);
    for (let a = 0; a < n; a++) {
      sx[a] = toX(clamp(p.xs[a]));
      sy[a] = toY(clamp(p.ys[a]));
    }
    const hit = pickPoint2d(sx, sy, p.mask, px, py, 7);
    p.onPick(hit < 0 ? null : hit);
  };
  return (
    <figure className="sheet-plot">
      <figcaption>{p.title}</figcaption>
      <canvas ref={ref} style={{ width: W, height: H }} onClick={onClick} data-testid={p.testId} />
    </figure>
  );
}

function ErrorHistogram({ errors, mask, selected }: { errors: Float64Array; mask: Uint8Array; selected: number | null }) {
  const ref = useRef<HTMLCanvasElement>(null);
  const W = 280, H = PLOT + MARGIN.t + MARGIN.b;
  const stats = useMemo(() => {
    const vals: number[] = [];
    for (let a = 0; a < errors.length; a++) if (mask[a] && Number.isFinite(errors[a])) vals.push(errors[a]);
    vals.sort((x, y) => x - y);
    // linear interpolation between order statistics (NumPy's default quantile method)
    const q = (p: number) => {
      if (!vals.length) return NaN;
      const pos = p * (vals.length - 1), lo = Math.floor(pos), hi = Math.ceil(pos);
      return vals[lo] + (vals[hi] - vals[lo]) * (pos - lo);
    };
    const mean = vals.reduce((s, x) => s + x, 0) / (vals.length || 1);
    // the axis ends just past the 99th percentile so a few far strays do not squash the rest
    return { vals, mean, median: q(0.5), p95: q(0.95), top: vals.length ? Math.max(q(0.99) * 1.05, 1e-6) : 1 };
  }, [errors, mask]);
  useEffect(() => {
    const c = ref.current;
    const ctx = c && setupCanvas(c, W, H);
    if (!ctx) return;
    const l = 40, r = 10, t = 22, b = 30;
    const pw = W - l - r, ph = H - t - b;
    const top = niceCeil(stats.top || 1);
    const bins = 30;
    const counts = new Array<number>(bins).fill(0);
    let beyond = 0;
    for (const v of stats.vals) {
      if (v > top) beyond++;
      else counts[Math.min(bins - 1, Math.floor((v / top) * bins))]++;
    }
    const cmax = Math.max(1, ...counts);
    ctx.fillStyle = '#161b22';
    ctx.fillRect(l, t, pw, ph);
    ctx.fillStyle = '#7d9bc1';
    counts.forEach((n, i) => {
      const h = (n / cmax) * ph;
      ctx.fillRect(l + (i * pw) / bins + 0.5, t + ph - h, pw / bins - 1, h);
    });
    const mark = (x: number, colour: string, dash: number[], label: string, row: number) => {
      if (!Number.isFinite(x)) return;
      const px = l + (x / top) * pw;
      ctx.strokeStyle = colour;
      ctx.setLineDash(dash);
      ctx.lineWidth = 1.5;
      line(ctx, px, t, px, t + ph);
      ctx.setLineDash([]);
      ctx.fillStyle = colour;
      ctx.font = '11px system-ui, sans-serif';
      ctx.textAlign = px > l + pw * 0.7 ? 'right' : 'left';
      ctx.fillText(label, px + (ctx.textAlign === 'right' ? -3 : 3), t + 11 + row * 12);
    };
    mark(stats.mean, '#f2cc60', [], `mean ${formatValue(stats.mean)}`, 0);
    mark(stats.median, '#e6edf3', [4, 3], `median ${formatValue(stats.median)}`, 1);
    mark(stats.p95, '#f0883e', [2, 2], `95% ${formatValue(stats.p95)}`, 2);
    if (selected !== null && Number.isFinite(errors[selected])) {
      const px = l + (errors[selected] / top) * pw;
      ctx.fillStyle = '#ffffff';
      ctx.beginPath();
      ctx.moveTo(px, t + ph);
      ctx.lineTo(px - 5, t + ph + 8);
      ctx.lineTo(px + 5, t + ph + 8);
      ctx.fill();
    }
    ctx.strokeStyle = '#8b96a3';
    ctx.lineWidth = 1;
    ctx.strokeRect(l + 0.5, t + 0.5, pw - 1, ph - 1);
    ctx.fillStyle = '#c9d1d9';
    ctx.font = '11px system-ui, sans-serif';
    ctx.textAlign = 'center';
    for (let i = 0; i <= 4; i++) ctx.fillText(formatValue((top * i) / 4), l + (pw * i) / 4, t + ph + 12);
    ctx.font = '12px system-ui, sans-serif';
    ctx.fillText('error, µm (landing vs expected position)', l + pw / 2, H - 3);
    ctx.textAlign = 'right';
    ctx.font = '11px system-ui, sans-serif';
    ctx.fillText(String(cmax), l - 4, t + 9);
    ctx.fillText('0', l - 4, t + ph);
    ctx.save();
    ctx.translate(12, t + ph / 2);
    ctx.rotate(-Math.PI / 2);
    ctx.textAlign = 'center';
    ctx.fillText('axons', 0, 0);
    ctx.restore();
    ctx.textAlign = 'left';
    ctx.font = '12px system-ui, sans-serif';
    ctx.fillText(`${stats.vals.length.toLocaleString('en-US')} axons shown`, l, 14);
    if (beyond > 0) {
      ctx.textAlign = 'right';
      ctx.fillStyle = '#f0883e';
      ctx.fillText(`${beyond} beyond ${formatValue(top)} µm →`, l + pw, 14);
    }
  });
  return (
    <figure className="histogram">
      <figcaption>Error distribution</figcaption>
      <canvas ref={ref} style={{ width: W, height: H }} data-testid="error-histogram" data-mean={stats.mean} />
    </figure>
  );
}

function MetricsTable({ models }: { models: RunModel[] }) {
  const maps = models.map((m) => (m.manifest.metrics as { map?: Record<string, unknown> } | undefined)?.map ?? null);
  return (
    <div className="metrics">
      <table className="metrics-table" data-testid="map-metrics">
        <caption>Summary (run.json)</caption>
        <thead>
          <tr><th /> {models.map((m) => <th key={m.name}>{m.name}</th>)}</tr>
        </thead>
        <tbody>
          {MAP_METRICS.map((k) => (
            <tr key={k.key}>
              <th>{k.label}</th>
              {maps.map((mp, i) => {
                const v = mp?.[k.key];
                const num = typeof v === 'number' ? v : null;
                const text = num === null ? '—' : k.percent ? `${formatValue(num * 100)} %` : `${formatValue(num)}${k.unit ? ` ${k.unit}` : ''}`;
                return <td key={i} data-testid={`metric-${k.key}-${i}`} data-value={num ?? ''}>{text}</td>;
              })}
            </tr>
          ))}
        </tbody>
      </table>
      {models.map((m, i) => <Consistency key={m.name} model={m} map={maps[i]} />)}
    </div>
  );
}

/** Says so when axons.csv's error_um column does not give run.json's mean error. */
function Consistency({ model, map }: { model: RunModel; map: Record<string, unknown> | null }) {
  const e = model.map?.errorUm;
  const stated = typeof map?.meanErrorUm === 'number' ? map.meanErrorUm : null;
  if (!e || stated === null) return map ? null : <p className="muted small">{model.name}: no map metrics in run.json.</p>;
  let s = 0, n = 0;
  for (let a = 0; a < e.length; a++) if (Number.isFinite(e[a])) { s += e[a]; n++; }
  const mean = s / (n || 1);
  if (Math.abs(mean - stated) <= 1e-3 * Math.max(1, Math.abs(stated))) return null;
  return <p className="note small">{model.name}: axons.csv error_um averages {formatValue(mean)} µm over {n} axons; run.json says {formatValue(stated)} µm.</p>;
}

// --- drawing helpers ---

/** Colour squares of `size` CSS px at (toX(x), toY(y)), written into the canvas's pixels. */
function drawDots(ctx: CanvasRenderingContext2D, colours: Uint8Array, xs: ArrayLike<number>, ys: ArrayLike<number>, mask: Uint8Array,
  toX: (u: number) => number, toY: (v: number) => number, size: number) {
  const dpr = ctx.getTransform().a;
  const W = ctx.canvas.width, H = ctx.canvas.height;
  const img = ctx.getImageData(0, 0, W, H);
  const d = img.data;
  const s = Math.max(1, Math.round(size * dpr));
  for (let a = 0; a < xs.length; a++) {
    if (!mask[a] || !Number.isFinite(xs[a]) || !Number.isFinite(ys[a])) continue;
    const x0 = Math.round(toX(clamp(xs[a])) * dpr - s / 2), y0 = Math.round(toY(clamp(ys[a])) * dpr - s / 2);
    for (let y = Math.max(0, y0); y < Math.min(H, y0 + s); y++) {
      for (let x = Math.max(0, x0); x < Math.min(W, x0 + s); x++) {
        const o = (y * W + x) * 4;
        d[o] = colours[a * 4];
        d[o + 1] = colours[a * 4 + 1];
        d[o + 2] = colours[a * 4 + 2];
        d[o + 3] = 255;
      }
    }
  }
  ctx.putImageData(img, 0, 0);
}

function setupCanvas(c: HTMLCanvasElement, w: number, h: number): CanvasRenderingContext2D | null {
  const dpr = Math.min(2, window.devicePixelRatio || 1);
  if (c.width !== Math.round(w * dpr)) c.width = Math.round(w * dpr);
  if (c.height !== Math.round(h * dpr)) c.height = Math.round(h * dpr);
  // A software canvas: these plots are redrawn rarely and read back for the dots, and it keeps
  // their rasterising off the GPU thread that the 3D view's software WebGL needs.
  const ctx = c.getContext('2d', { willReadFrequently: true });
  if (!ctx) return null;
  ctx.setTransform(dpr, 0, 0, dpr, 0, 0);
  ctx.clearRect(0, 0, w, h);
  return ctx;
}

function line(ctx: CanvasRenderingContext2D, x0: number, y0: number, x1: number, y1: number) {
  ctx.beginPath();
  ctx.moveTo(x0, y0);
  ctx.lineTo(x1, y1);
  ctx.stroke();
}

function ring(ctx: CanvasRenderingContext2D, x: number, y: number) {
  ctx.lineWidth = 3;
  ctx.strokeStyle = '#0f1318';
  ctx.beginPath();
  ctx.arc(x, y, 6, 0, Math.PI * 2);
  ctx.stroke();
  ctx.lineWidth = 1.5;
  ctx.strokeStyle = '#ffffff';
  ctx.stroke();
}

function clamp(x: number): number {
  return x < 0 ? 0 : x > 1 ? 1 : x;
}

/** 1, 2, 2.5 or 5 × 10^k at or above x. */
function niceCeil(x: number): number {
  const p = 10 ** Math.floor(Math.log10(x));
  for (const m of [1, 2, 2.5, 5, 10]) if (m * p >= x) return m * p;
  return 10 * p;
}
