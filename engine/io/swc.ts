// Axon paths as SWC, the plain-text morphology format of Cannon, Turner, Pyapali & Wheal,
// "An on-line archive of reconstructed hippocampal neurons", J. Neurosci. Methods 84 (1998)
// 49–54. One sample per line, seven space-separated columns:
//   n  T  x  y  z  R  P
//   n sample id (positive integer), T structure type (2 = axon), x y z position, R radius,
//   P parent sample id (-1 for a tree's root).
// Lines starting with '#' are comments. Each parent is listed before its children.
// Pure string building (no Node, no DOM).

import { formatCell, formatFloat32 } from './csv.ts';

export interface AxonPath {
  axonId: number;
  /** x, y, z of each point, µm, in growth order (points[3i..3i+2] is point i). */
  points: Float32Array | Float64Array;
  /** Points in use; `points` may be a larger, reused buffer. */
  count: number;
}

/** SWC structure type for axon (Cannon et al. 1998: 0 undefined, 1 soma, 2 axon, 3 dendrite,
 *  4 apical dendrite). */
export const SWC_TYPE_AXON = 2;

/** One tree per axon, in the order given. Sample ids run 1, 2, 3 … across the whole file, each
 *  tree's first point is its root (parent -1) and every other point's parent is the point before
 *  it. Each tree is preceded by a "# axon <id>" comment so readers can map trees back to axons;
 *  axons with no points are left out. */
export function axonsToSwc(paths: readonly AxonPath[], radius: number, comments: readonly string[] = []): string {
  if (!Number.isFinite(radius) || radius < 0) throw new RangeError(`SWC radius must be finite and ≥ 0, got ${radius}`);
  const r = formatCell(radius);
  const out: string[] = [];
  for (const c of comments) for (const line of c.split(/\r\n|\r|\n/)) out.push(`# ${line}`.trimEnd());
  out.push('# n T x y z R P');

  let id = 0;
  for (const path of paths) {
    const { axonId, points, count } = path;
    if (!Number.isInteger(count) || count < 0 || count * 3 > points.length) {
      throw new RangeError(`axon ${axonId}: count ${count} does not fit ${points.length / 3} points`);
    }
    if (count === 0) continue;
    const fmt = points instanceof Float32Array ? formatFloat32 : formatCell;
    out.push(`# axon ${axonId}`);
    for (let i = 0; i < count; i++) {
      const x = points[3 * i], y = points[3 * i + 1], z = points[3 * i + 2];
      if (!Number.isFinite(x) || !Number.isFinite(y) || !Number.isFinite(z)) {
        throw new RangeError(`axon ${axonId}: point ${i} is not finite (${x}, ${y}, ${z})`);
      }
      id++;
      const parent = i === 0 ? -1 : id - 1;
      out.push(`${id} ${SWC_TYPE_AXON} ${fmt(x)} ${fmt(y)} ${fmt(z)} ${r} ${parent}`);
    }
  }
  return out.join('\n') + '\n';
}
