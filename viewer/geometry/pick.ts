// Picking an axon under the pointer: the path point (any stored frame up to the one shown)
// nearest the pointer on screen, within a radius. Done on the CPU over the frames array, which
// is exact and needs no picking render pass (expensive in software WebGL).

export interface PathPick {
  axon: number;
  frame: number;
  distancePx: number;
}

/** `viewProj`: the camera's projection × view matrix, column-major (three.js Matrix4.elements).
 *  `visible[a]` = 0 skips axon a. `frameStep` > 1 checks every n-th frame only (faster, and
 *  still within a few pixels when frames are dense). */
export function pickPath(
  frames: Float32Array, F: number, N: number, lastFrame: number, visible: Uint8Array | null,
  viewProj: ArrayLike<number>, width: number, height: number, px: number, py: number, radiusPx: number, frameStep = 1,
): PathPick | null {
  const m = viewProj;
  let best = -1, bestFrame = -1, bestD2 = radiusPx * radiusPx;
  const last = Math.min(lastFrame, F - 1);
  const step = Math.max(1, Math.floor(frameStep));
  for (let f = last; f >= 0; f -= step) {
    const row = f * N * 3;
    for (let a = 0; a < N; a++) {
      if (visible && !visible[a]) continue;
      const o = row + a * 3;
      const x = frames[o], y = frames[o + 1], z = frames[o + 2];
      const w = m[3] * x + m[7] * y + m[11] * z + m[15];
      const sx = ((m[0] * x + m[4] * y + m[8] * z + m[12]) / w + 1) * 0.5 * width;
      const sy = (1 - (m[1] * x + m[5] * y + m[9] * z + m[13]) / w) * 0.5 * height;
      const dx = sx - px, dy = sy - py;
      const d2 = dx * dx + dy * dy;
      if (d2 < bestD2) {
        bestD2 = d2;
        best = a;
        bestFrame = f;
      }
    }
  }
  return best < 0 ? null : { axon: best, frame: bestFrame, distancePx: Math.sqrt(bestD2) };
}

/** Nearest of n 2-D points (xs, ys in pixels) to (px, py) within radiusPx; −1 if none. */
export function pickPoint2d(xs: ArrayLike<number>, ys: ArrayLike<number>, visible: Uint8Array | null, px: number, py: number, radiusPx: number): number {
  let best = -1, bestD2 = radiusPx * radiusPx;
  for (let i = 0; i < xs.length; i++) {
    if (visible && !visible[i]) continue;
    const dx = xs[i] - px, dy = ys[i] - py;
    const d2 = dx * dx + dy * dy;
    if (d2 < bestD2) {
      bestD2 = d2;
      best = i;
    }
  }
  return best;
}
