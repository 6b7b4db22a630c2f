// Chemoaffinity between a terminal and its target sheet: what each of its mapping signals binds
// at a point of the sheet, and the energy that both stop rules (balance.ts, affinity.ts) use.
//
// Two kinds of signal, both read at the terminal's place on the sheet (mass action at
// equilibrium, p(c) = c / (c + K_d), engine/agents/sensing.ts):
//   forward  ligand on the target (level T(x), the cue), receptor on the axon (level A):
//            B = A · p(T(x))          the axon's receptors occupied by the target's ligand
//   reverse  receptor on the target (level T(x), the cue), ligand on the axon (level A):
//            B = T(x) · p(A)          the target's receptors occupied by the axon's ligand
// Energy of terminal i at x:  E_i(x) = Σ_s σ_s w_s B_s(i, x),  σ = +1 repel, −1 attract
// (a repulsive signal costs energy where it is strong). Forward signalling with a receptor
// gradient across the source and a ligand gradient across the target, and reverse signalling
// as the countergradient, is the arrangement of Gierer (Proc. R. Soc. B 218, 1983) and
// Koulakov & Tsigankov (BMC Neurosci. 5, 2004); their energies use the product A·T, which is
// the low-occupancy limit of B (T ≪ K_d).
import type { CueField } from '../../fields/field.ts';
import type { ConePopulation } from '../cones.ts';
import type { Mapping } from '../../scene/schema.ts';
import { occupancy } from '../sensing.ts';

/** A population's mapping signals, compiled for the step loop. */
export interface SignalSet {
  readonly count: number;
  readonly fields: CueField[];
  /** slot of the axon-side molecule in the axon's receptor levels */
  readonly slot: Int32Array;
  readonly kd: Float64Array;
  /** σ·w: +w for a repulsive signal, −w for an attractive one */
  readonly gain: Float64Array;
  readonly reverse: Uint8Array;
}

export function compileSignals(pop: ConePopulation, signals: Mapping['signals'], fields: CueField[]): SignalSet {
  const slot = Int32Array.from(signals.map((s) => pop.receptorNames.indexOf(s.receptor)));
  return {
    count: signals.length,
    fields: [...slot].map((k) => fields[pop.receptorField[k]]),
    slot,
    kd: Float64Array.from([...slot].map((k) => pop.receptorKd[k])),
    // receptorGain is s·w with s = +1 attract, −1 repel; the energy's sign is the opposite
    gain: Float64Array.from([...slot].map((k) => -pop.receptorGain[k])),
    reverse: Uint8Array.from(signals.map((s) => (s.mode === 'reverse' ? 1 : 0))),
  };
}

/** B for one signal: forward A·p(T), reverse T·p(A). */
export function boundSignal(reverse: boolean, axonLevel: number, targetLevel: number, kd: number): number {
  return reverse ? targetLevel * occupancy(axonLevel, kd) : axonLevel * occupancy(targetLevel, kd);
}

/** E_i(x) = Σ_s σ_s w_s B_s at the point (x, y, z) on the sheet. `levels[base + slot]` are the
 *  axon's molecule levels; `grad` is scratch. */
export function chemoEnergy(set: SignalSet, levels: Float64Array, base: number, x: number, y: number, z: number, grad: Float64Array): number {
  let e = 0;
  for (let s = 0; s < set.count; s++) {
    const t = set.fields[s].sample(x, y, z, grad);
    e += set.gain[s] * boundSignal(set.reverse[s] === 1, levels[base + set.slot[s]], t, set.kd[s]);
  }
  return e;
}
