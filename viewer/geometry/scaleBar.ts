// A scale bar of a round length (1, 2 or 5 × 10^k µm) that is as long as possible without
// exceeding the space given for it.

export interface ScaleBar {
  um: number;
  px: number;
  label: string;
}

/** pxPerUm: screen pixels per µm (an orthographic view has one value everywhere). */
export function scaleBar(pxPerUm: number, maxPx = 140): ScaleBar | null {
  if (!(pxPerUm > 0) || !Number.isFinite(pxPerUm)) return null;
  const maxUm = maxPx / pxPerUm;
  const p = 10 ** Math.floor(Math.log10(maxUm));
  let um = p;
  for (const m of [5, 2, 1]) {
    if (m * p <= maxUm * (1 + 1e-9)) {
      um = m * p;
      break;
    }
  }
  const label = um >= 1000 ? `${trim(um / 1000)} mm` : um >= 1 ? `${trim(um)} µm` : `${trim(um * 1000)} nm`;
  return { um, px: um * pxPerUm, label };
}

function trim(x: number): string {
  return String(Number(x.toPrecision(6)));
}
