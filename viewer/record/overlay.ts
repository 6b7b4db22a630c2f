// Text and marks burnt into recorded frames: the title, the time stamp in hours, the variant's
// name, a scale bar in µm, the colour legend and the region labels. Made to be read from the
// back of a lecture room: sizes are set for a 1080-line frame (title 60 px, time 52 px, variant
// 42 px, scale bar 40 px, legend and labels 30 px) and scale with the output; every text sits
// on a near-opaque dark plate (or, for labels over the picture, has a dark outline), white or
// near-white, so it keeps its contrast whatever is drawn behind it.
import type { RunManifest } from '../../engine/io/runFormat.ts';
import { scaleBar } from '../geometry/scaleBar.ts';
import { sheetColour } from '../colour/sheetColour.ts';
import { formatHours } from '../components/format.ts';
import type { OverlayName } from './recordOptions.ts';
import type { ViewFrame, PlacedLabel } from './stage.ts';

/** Font sizes and spacing at 1080 lines, px. */
export const OVERLAY_PX = { title: 60, time: 52, variant: 42, scale: 40, legend: 30, label: 30, margin: 28, legendSwatch: 130, bar: 10 } as const;
/** Smallest text drawn, px: below this nothing is legible anyway. */
const MIN_TEXT_PX = 8;

export interface LegendInfo {
  sheet: string;
  uName?: string;
  vName?: string;
}

export interface OverlayContent {
  width: number;
  height: number;
  show: ReadonlySet<OverlayName>;
  title: string;
  views: { frame: ViewFrame; variant: string }[];
  legend: LegendInfo | null;
}

/** How much the 1080-line sizes are scaled for an output: by the tighter of width and height
 *  against 1920 × 1080, so text keeps its share of the frame. */
export function overlayScale(width: number, height: number): number {
  return Math.min(width / 1920, height / 1080);
}

/** Font size in px at an output, from its size at 1080 lines. */
export function overlayFontPx(px1080: number, width: number, height: number): number {
  return Math.max(MIN_TEXT_PX, Math.round(px1080 * overlayScale(width, height)));
}

/** The variant's name as a run's manifest gives it: its named variant, its edits, or "normal". */
export function variantLabel(m: Pick<RunManifest, 'variant' | 'edits'>): string {
  if (m.variant) return m.variant;
  if (m.edits?.length) {
    return m.edits.map((e) => {
      const x = e as { op?: string; cue?: string; population?: string; factor?: number };
      const what = x.cue ?? x.population ?? '';
      return [x.op ?? 'edit', what, x.factor !== undefined ? `×${x.factor}` : ''].filter(Boolean).join(' ');
    }).join(', ');
  }
  return 'normal';
}

/** Draws every chosen overlay onto a frame that already holds the 3D picture. */
export function drawOverlays(ctx: CanvasRenderingContext2D, c: OverlayContent): void {
  const { width: W, height: H, show } = c;
  const f = (px: number) => overlayFontPx(px, W, H);
  const k = overlayScale(W, H);
  const m = Math.round(OVERLAY_PX.margin * k);
  const compare = c.views.length > 1;
  ctx.save();
  ctx.textBaseline = 'alphabetic';

  // plates first; the labels then go where no plate is (and where no other label is)
  const taken: Box[] = [];
  // top row: the title (left, or centred over side-by-side views) and, for one view, the time
  let below = m;
  if (show.has('title') && c.title.trim()) {
    const timeW = !compare && show.has('time') ? measure(ctx, timeText(c.views[0].frame.timeH), font(700, f(OVERLAY_PX.time))) + 3 * m : 0;
    const box = plate(ctx, c.title.trim(), f(OVERLAY_PX.title), 600, compare ? W / 2 : m, m, compare ? 'center' : 'left', W - 2 * m - timeW, TEXT);
    taken.push(box);
    below = m + box.h + Math.round(m / 2);
  }
  for (const v of c.views) {
    const r = v.frame.rect;
    if (show.has('time')) {
      const y = compare ? below : m;
      taken.push(plate(ctx, timeText(v.frame.timeH), f(OVERLAY_PX.time), 700, r.x + r.w - m, y, 'right', r.w - 2 * m, TEXT));
    }
    if (show.has('variant')) {
      // shares its row with the time when views are side by side, or when there is no title
      const sameRow = show.has('time') && (compare || below === m);
      const tw = sameRow ? measure(ctx, timeText(v.frame.timeH), font(700, f(OVERLAY_PX.time))) + 3 * m : 0;
      taken.push(plate(ctx, v.variant, f(OVERLAY_PX.variant), 600, r.x + m, below, 'left', r.w - 2 * m - tw, SUBTEXT));
    }
    if (show.has('scale')) {
      const bar = drawScaleBar(ctx, v.frame, f(OVERLAY_PX.scale), k, m);
      if (bar) taken.push(bar);
    }
  }
  if (show.has('legend') && c.legend) taken.push(drawLegend(ctx, c.legend, W, H, f(OVERLAY_PX.legend), k, m));
  if (show.has('labels')) for (const v of c.views) drawLabels(ctx, v.frame, f(OVERLAY_PX.label), taken);
  ctx.restore();
}

// --- private helpers ---

interface Box {
  x: number;
  y: number;
  w: number;
  h: number;
}

const TEXT = '#ffffff';
const SUBTEXT = '#e3eaf1';
const PLATE = 'rgba(12, 15, 19, 0.88)';
const FONT_FAMILY = 'system-ui, "DejaVu Sans", "Liberation Sans", Arial, sans-serif';
const LABEL_COLOUR: Record<PlacedLabel['role'], string> = {
  source: '#ffffff', target: '#e8eef5', wall: '#ffb896', region: '#b9d4f2', axis: '#c3ccd6',
};

function font(weight: number, px: number): string {
  return `${weight} ${px}px ${FONT_FAMILY}`;
}

function timeText(h: number): string {
  return `t = ${formatHours(h)} h`;
}

function measure(ctx: CanvasRenderingContext2D, text: string, f: string): number {
  ctx.font = f;
  return ctx.measureText(text).width;
}

/** Text on a dark plate, its top edge at y, anchored at x; shrunk (to 80 %) and then cut with
 *  an ellipsis to fit maxW. Returns where the plate is. */
function plate(ctx: CanvasRenderingContext2D, text: string, px: number, weight: number, x: number, y: number, align: 'left' | 'center' | 'right', maxW: number, colour: string): Box {
  const padX = Math.round(px * 0.32), padY = Math.round(px * 0.16);
  let size = px;
  let shown = text;
  ctx.font = font(weight, size);
  while (ctx.measureText(shown).width + 2 * padX > maxW && size > px * 0.8) ctx.font = font(weight, --size);
  while (shown.length > 1 && ctx.measureText(shown).width + 2 * padX > maxW) shown = shown.slice(0, -2) + '…';
  const tw = ctx.measureText(shown).width;
  const w = Math.ceil(tw + 2 * padX), h = Math.ceil(size * 1.18 + 2 * padY);
  const left = align === 'left' ? x : align === 'right' ? x - w : x - w / 2;
  ctx.fillStyle = PLATE;
  roundRect(ctx, left, y, w, h, Math.round(size * 0.18));
  ctx.fillStyle = colour;
  ctx.textAlign = 'left';
  ctx.fillText(shown, left + padX, y + padY + size * 0.93);
  return { x: left, y, w, h };
}

/** Region and axis labels at their projected points, moved in so that each stays whole inside
 *  its own view (a label at a view's edge would otherwise be cut, or run into the next view).
 *  Region names first, then axis names; a label that would cover a plate or an earlier label
 *  is left out, since two texts over each other read as neither. */
function drawLabels(ctx: CanvasRenderingContext2D, v: ViewFrame, px: number, taken: Box[]): void {
  const r = v.rect, pad = Math.max(2, Math.round(px * 0.2));
  ctx.save();
  ctx.beginPath();
  ctx.rect(r.x, r.y, r.w, r.h);
  ctx.clip();
  ctx.textAlign = 'center';
  ctx.lineJoin = 'round';
  const labels = [...v.labels].sort((a, b) => Number(a.role === 'axis') - Number(b.role === 'axis'));
  const placed: Box[] = [];
  for (const l of labels) {
    const weight = l.role === 'region' || l.role === 'axis' ? 500 : 700;
    const size = l.role === 'axis' ? Math.max(MIN_TEXT_PX, Math.round(px * 0.85)) : px;
    ctx.font = font(weight, size);
    const half = ctx.measureText(l.text).width / 2 + pad;
    const x = Math.min(Math.max(l.x, r.x + half), r.x + r.w - half);
    const y = Math.min(Math.max(l.y, r.y + size * 0.6 + pad), r.y + r.h - size * 0.6 - pad) + size * 0.35;
    const box = { x: x - half, y: y - size * 0.95, w: 2 * half, h: size * 1.25 };
    if (taken.some((t) => overlap(t, box)) || placed.some((t) => overlap(t, box))) continue;
    placed.push(box);
    ctx.lineWidth = Math.max(2, size * 0.2);
    ctx.strokeStyle = 'rgba(0, 0, 0, 0.92)';
    ctx.strokeText(l.text, x, y);
    ctx.fillStyle = LABEL_COLOUR[l.role];
    ctx.fillText(l.text, x, y);
  }
  ctx.restore();
}

/** A bar of a round length in µm (1, 2 or 5 × 10^k), true everywhere in an orthographic view,
 *  bottom left of its view, with its length written above it. */
function drawScaleBar(ctx: CanvasRenderingContext2D, v: ViewFrame, px: number, k: number, m: number): Box | null {
  const r = v.rect;
  const bar = scaleBar(v.pxPerUm, Math.min(360 * k, r.w * 0.3));
  if (!bar) return null;
  const thick = Math.max(3, Math.round(OVERLAY_PX.bar * k));
  const pad = Math.round(px * 0.3);
  ctx.font = font(700, px);
  const tw = ctx.measureText(bar.label).width;
  const w = Math.ceil(Math.max(tw, bar.px) + 2 * pad), h = Math.ceil(px * 1.1 + thick + 3 * pad);
  const x = r.x + m, y = r.y + r.h - m - h;
  ctx.fillStyle = PLATE;
  roundRect(ctx, x, y, w, h, Math.round(px * 0.18));
  ctx.fillStyle = TEXT;
  ctx.textAlign = 'left';
  ctx.fillText(bar.label, x + pad, y + pad + px * 0.9);
  const by = y + h - pad - thick;
  ctx.fillStyle = '#000000';
  ctx.fillRect(x + pad - 1, by - 1, bar.px + 2, thick + 2);
  ctx.fillStyle = TEXT;
  ctx.fillRect(x + pad, by, bar.px, thick);
  return { x, y, w, h };
}

/** The source-sheet colour map with its axes: colour = where on the source sheet an axon
 *  started (u to the right, v upward, as in the viewer's key). */
function drawLegend(ctx: CanvasRenderingContext2D, l: LegendInfo, W: number, H: number, px: number, k: number, m: number): Box {
  const sw = Math.max(12, Math.round(OVERLAY_PX.legendSwatch * k));
  const pad = Math.round(px * 0.45), gap = Math.round(px * 0.5);
  const head = `Colour = start on ${l.sheet}`;
  const vText = `↑ v${l.vName ? `  ${l.vName}` : ''}`, uText = `→ u${l.uName ? `  ${l.uName}` : ''}`;
  ctx.font = font(700, px);
  const headW = ctx.measureText(head).width;
  ctx.font = font(500, px);
  const axisW = Math.max(ctx.measureText(vText).width, ctx.measureText(uText).width);
  const w = Math.ceil(Math.max(headW, sw + gap + axisW) + 2 * pad);
  const h = Math.ceil(pad + px * 1.2 + gap / 2 + sw + pad);
  const x = W - m - w, y = H - m - h;
  ctx.fillStyle = PLATE;
  roundRect(ctx, x, y, w, h, Math.round(px * 0.2));
  ctx.textAlign = 'left';
  ctx.fillStyle = TEXT;
  ctx.font = font(700, px);
  ctx.fillText(head, x + pad, y + pad + px * 0.95);
  const sy = y + pad + px * 1.2 + gap / 2;
  ctx.imageSmoothingEnabled = true;
  ctx.drawImage(legendSwatch(), x + pad, sy, sw, sw);
  ctx.strokeStyle = '#d8dee6';
  ctx.lineWidth = Math.max(1, k * 2);
  ctx.strokeRect(x + pad, sy, sw, sw);
  ctx.font = font(500, px);
  ctx.fillStyle = SUBTEXT;
  ctx.fillText(vText, x + pad + sw + gap, sy + px * 0.9);
  ctx.fillText(uText, x + pad + sw + gap, sy + sw);
  return { x, y, w, h };
}

function overlap(a: Box, b: Box): boolean {
  return a.x < b.x + b.w && b.x < a.x + a.w && a.y < b.y + b.h && b.y < a.y + a.h;
}

let swatch: HTMLCanvasElement | null = null;
/** The (u, v) colour map, 64 × 64, v growing upward. */
function legendSwatch(): HTMLCanvasElement {
  if (swatch) return swatch;
  const n = 64;
  const c = document.createElement('canvas');
  c.width = c.height = n;
  const g = c.getContext('2d')!;
  const img = g.createImageData(n, n);
  for (let y = 0; y < n; y++) for (let x = 0; x < n; x++) {
    const [r, gg, b] = sheetColour(x / (n - 1), 1 - y / (n - 1));
    const o = (y * n + x) * 4;
    img.data[o] = Math.round(r * 255);
    img.data[o + 1] = Math.round(gg * 255);
    img.data[o + 2] = Math.round(b * 255);
    img.data[o + 3] = 255;
  }
  g.putImageData(img, 0, 0);
  return (swatch = c);
}

function roundRect(ctx: CanvasRenderingContext2D, x: number, y: number, w: number, h: number, r: number): void {
  ctx.beginPath();
  ctx.roundRect(x, y, w, h, r);
  ctx.fill();
}
