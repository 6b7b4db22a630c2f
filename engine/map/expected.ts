// The expected topographic map: where on its target sheet an axon from source (u, v) should
// end. Either stated by the scene, axis by axis (which source axis feeds each target axis and
// whether reversed), or taken from another run's terminations (`run --reference RUN`).
import type { ExpectedMap } from '../scene/schema.ts';
import { buildPointGrid, pointsWithin } from '../index/pointGrid.ts';
import type { Terminations } from './reference.ts';

export interface AxisPairing {
  u: { from: 'u' | 'v'; reversed: boolean };
  v: { from: 'u' | 'v'; reversed: boolean };
}

/** Target u from source u, target v from source v, neither reversed. */
export const DEFAULT_PAIRING: AxisPairing = { u: { from: 'u', reversed: false }, v: { from: 'v', reversed: false } };

export function pairingOf(map: ExpectedMap | undefined): AxisPairing {
  return map ? { u: { ...map.u }, v: { ...map.v } } : DEFAULT_PAIRING;
}

export interface ExpectedPlacement {
  readonly kind: 'axes' | 'reference';
  /** expected target (u, v) for source (su, sv), into out[0..1] */
  place(su: number, sv: number, out: Float64Array): void;
}

/** Linear map axis by axis: target t = s or 1 − s (reversed), s the paired source coordinate. */
export function axesPlacement(p: AxisPairing): ExpectedPlacement {
  const pick = (a: AxisPairing['u'], su: number, sv: number) => {
    const s = a.from === 'u' ? su : sv;
    return a.reversed ? 1 - s : s;
  };
  return {
    kind: 'axes',
    place(su, sv, out) {
      out[0] = pick(p.u, su, sv);
      out[1] = pick(p.v, su, sv);
    },
  };
}

/** The mean termination of the k reference axons nearest in source (u, v): a nearest-neighbour
 *  estimate of the reference run's map at any source position, whatever its seed or axon
 *  count. For a reference with the same seed and axons, an axon's own reference twin is
 *  among its k nearest (at distance 0). */
export function referencePlacement(ref: Terminations, k = 5): ExpectedPlacement {
  const n = ref.count;
  const kk = Math.min(k, n);
  const xyz = new Float64Array(3 * n);
  for (let i = 0; i < n; i++) { xyz[3 * i] = ref.su[i]; xyz[3 * i + 1] = ref.sv[i]; }
  const r0 = 2 / Math.sqrt(Math.max(1, n));
  const grid = buildPointGrid(xyz, n, r0, { minX: 0, minY: 0, minZ: 0, maxX: 1, maxY: 1, maxZ: 0 });
  const candIdx = new Int32Array(n), candD = new Float64Array(n);
  let found = 0;
  const visit = (i: number, d: number) => { candIdx[found] = i; candD[found] = d; found++; };
  return {
    kind: 'reference',
    place(su, sv, out) {
      let r = r0;
      for (;;) {
        found = 0;
        pointsWithin(grid, su, sv, 0, r, visit);
        if (found >= kk || r > 2) break;
        r *= 2;
      }
      // the kk nearest candidates by partial selection (kk is small)
      let tu = 0, tv = 0;
      for (let m = 0; m < kk; m++) {
        let best = m;
        for (let c = m + 1; c < found; c++) if (candD[c] < candD[best]) best = c;
        const ti = candIdx[best]; candIdx[best] = candIdx[m]; candIdx[m] = ti;
        const td = candD[best]; candD[best] = candD[m]; candD[m] = td;
        tu += ref.tu[candIdx[m]];
        tv += ref.tv[candIdx[m]];
      }
      out[0] = tu / kk;
      out[1] = tv / kk;
    },
  };
}
