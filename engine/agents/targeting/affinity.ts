// Stop rule "affinity": chemoaffinity plus competition as one energy, minimised by stochastic
// updates (Koulakov & Tsigankov, BMC Neurosci. 5, 2004, from memory). Each step a terminal
// proposes a move δ drawn uniformly from the disc of radius ℓ in its sheet; with
//     ΔE = [E_i(x + δ) − E_i(x)] + [C_i(x + δ) − C_i(x)]
// (signals.ts, competition.ts) the move is accepted with probability
//     P = 1 / (1 + exp(ΔE / T))
// (Glauber, J. Math. Phys. 4, 1963; Koulakov & Tsigankov write P = 1/(1 + exp(4ΔE)) with T
// folded into the energy's coefficients, from memory). A symmetric proposal with this
// acceptance satisfies detailed balance, so a lone terminal samples the Boltzmann density
// ∝ exp(−E_i/T) (Glauber 1963). Moves off the sheet are rejected, which keeps the proposal
// symmetric. The terminal settles where it stops getting anywhere (rule.ts).
import type { Uniform } from '../random.ts';

/** P = 1/(1 + exp(ΔE/T)), written to avoid overflow for large |ΔE/T|. */
export function acceptance(dE: number, temperature: number): number {
  const x = dE / temperature;
  if (x > 0) {
    const e = Math.exp(-x);
    return e / (1 + e);
  }
  return 1 / (1 + Math.exp(x));
}

/** A move uniform in the disc of radius ℓ spanned by the orthonormal axes e1, e2:
 *  ρ = ℓ√U₁, θ = 2πU₂ (inverse-CDF sampling of the disc's area). Writes xyz into out[0..2]. */
export function proposeMove(e1: Float64Array, e2: Float64Array, stepLength: number, rng: Uniform, out: Float64Array): void {
  const rho = stepLength * Math.sqrt(rng()), th = 2 * Math.PI * rng();
  const c = rho * Math.cos(th), s = rho * Math.sin(th);
  out[0] = c * e1[0] + s * e2[0];
  out[1] = c * e1[1] + s * e2[1];
  out[2] = c * e1[2] + s * e2[2];
}
