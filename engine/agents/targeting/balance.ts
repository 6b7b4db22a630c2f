// Stop rule "balance": gradient balance after Gierer (Proc. R. Soc. B 218, 1983). A terminal on
// its target sheet moves down the gradient of its chemoaffinity energy E_i (signals.ts) plus
// the competition energy C_i (competition.ts), and comes to rest where the opposing signals
// balance, ∇(E_i + C_i) = 0: with a repulsive forward signal and a repulsive countergradient,
//     σ_f w_f ∇B_forward + σ_r w_r ∇B_reverse = 0,
// which for matched exponential gradients A(s) = e^(−r s), T(x) = e^(r(x−1)) and their mirror
// images (and T ≪ K_d) puts source s at target x = s (Gierer 1983, from memory).
//
// The cone reads each signal across its width a as in engine/agents/sensing.ts: bound fractions
// p± at x ± (a/2)e_k along the two in-sheet axes e_k, with binomial counting noise over N/2
// receptors per half. The sensed imbalance
//     S_k = −Σ_s σ_s w_s ΔB_s,k + a γ (−∇C_i/γ)·e_k + noise
// moves the terminal by ℓ·S/max(|S|, S_sat) (ℓ = in-sheet speed × dt, S_sat = the population's
// sensing saturation): full speed on a clear imbalance, slowing to a stop where it vanishes.
import type { Uniform } from '../random.ts';
import { gaussian } from '../random.ts';
import { occupancy } from '../sensing.ts';
import type { SignalSet } from './signals.ts';

export interface BalanceCone {
  diameter: number; // a, µm
  receptors: number; // N
  saturation: number; // S_sat
  stepLength: number; // ℓ, µm
}

/** Writes the terminal's in-sheet displacement (µm, xyz) into out[0..2]. `repel` is γ·(−∇C_i),
 *  µm⁻¹; e1, e2 are orthonormal axes in the sheet's plane; grad is scratch. */
export function balanceStep(
  set: SignalSet, levels: Float64Array, base: number, x: number, y: number, z: number,
  e1: Float64Array, e2: Float64Array, repel: Float64Array, cone: BalanceCone, rng: Uniform,
  grad: Float64Array, out: Float64Array,
): void {
  const a = cone.diameter, h = a / 2, half = cone.receptors / 2;
  let s1 = a * (repel[0] * e1[0] + repel[1] * e1[1] + repel[2] * e1[2]);
  let s2 = a * (repel[0] * e2[0] + repel[1] * e2[1] + repel[2] * e2[2]);
  let var1 = 0, var2 = 0;
  for (let s = 0; s < set.count; s++) {
    const t = set.fields[s].sample(x, y, z, grad);
    const g1 = grad[0] * e1[0] + grad[1] * e1[1] + grad[2] * e1[2];
    const g2 = grad[0] * e2[0] + grad[1] * e2[1] + grad[2] * e2[2];
    const level = levels[base + set.slot[s]], kd = set.kd[s], w = set.gain[s];
    for (let k = 0; k < 2; k++) {
      const g = k === 0 ? g1 : g2;
      let d: number, sd: number;
      if (set.reverse[s] === 1) {
        // target receptors T± occupied by the axon's ligand with probability p(A)
        const p = occupancy(level, kd);
        d = p * 2 * h * g;
        sd = Math.max(0, t) * Math.sqrt((2 * p * (1 - p)) / half);
      } else {
        const pp = occupancy(t + g * h, kd), pm = occupancy(t - g * h, kd);
        d = level * (pp - pm);
        sd = level * Math.sqrt((pp * (1 - pp) + pm * (1 - pm)) / half);
      }
      if (k === 0) { s1 -= w * d; var1 += w * w * sd * sd; } else { s2 -= w * d; var2 += w * w * sd * sd; }
    }
  }
  s1 += Math.sqrt(var1) * gaussian(rng);
  s2 += Math.sqrt(var2) * gaussian(rng);
  const mag = Math.sqrt(s1 * s1 + s2 * s2);
  const f = cone.stepLength / Math.max(mag, cone.saturation);
  out[0] = f * (s1 * e1[0] + s2 * e2[0]);
  out[1] = f * (s1 * e1[1] + s2 * e2[1]);
  out[2] = f * (s1 * e1[2] + s2 * e2[2]);
}
