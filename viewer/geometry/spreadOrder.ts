// A drawing order for axons in which every prefix is a representative sample: spread evenly
// over each population's source sheet. While the timeline moves or the camera turns, the
// viewer draws only the first k axons of this order, and k is whatever the measured frame time
// allows; because the sample is spread over (u, v), the map's layout still reads correctly.
//
// Method: level by level over a quadtree of the unit (u, v) square (1, 4, 16 … cells), and per
// population, the not-yet-chosen axon nearest each cell's centre comes next. Ties go to the
// lower axon index, so the order is deterministic.

export function spreadOrder(u: ArrayLike<number>, v: ArrayLike<number>, group: ArrayLike<number> | null = null, maxLevel = 8): Int32Array {
  const n = u.length;
  const order = new Int32Array(n);
  const taken = new Uint8Array(n);
  let count = 0;
  let groups = 1;
  if (group) for (let i = 0; i < n; i++) groups = Math.max(groups, group[i] + 1);

  for (let level = 0; level <= maxLevel && count < n; level++) {
    const side = 1 << level;
    const cells = side * side * groups;
    const best = new Int32Array(cells).fill(-1);
    const bestD = new Float64Array(cells).fill(Infinity);
    for (let i = 0; i < n; i++) {
      if (taken[i]) continue;
      const uu = clamp01(u[i]), vv = clamp01(v[i]);
      const cu = Math.min(side - 1, Math.floor(uu * side)), cv = Math.min(side - 1, Math.floor(vv * side));
      const c = ((group ? group[i] : 0) * side + cv) * side + cu;
      const du = uu - (cu + 0.5) / side, dv = vv - (cv + 0.5) / side;
      const d = du * du + dv * dv;
      if (d < bestD[c]) {
        bestD[c] = d;
        best[c] = i;
      }
    }
    for (let c = 0; c < cells; c++) {
      const i = best[c];
      if (i >= 0) {
        taken[i] = 1;
        order[count++] = i;
      }
    }
  }
  for (let i = 0; i < n; i++) if (!taken[i]) order[count++] = i;
  return order;
}

function clamp01(x: number): number {
  return !(x > 0) ? 0 : x > 1 ? 1 : x; // NaN → 0
}
