// Random streams. Every axon draws only from its own stream, derived from the scene seed and
// the axon's id, so a run's result does not depend on the order axons are processed in (or on
// how work is split later).
import seedrandom from 'seedrandom';

/** A uniform generator on [0, 1). */
export type Uniform = () => number;

/** Alea (a fast, well-distributed generator shipped with seedrandom) keyed by seed and purpose. */
export function stream(seed: number, ...key: (string | number)[]): Uniform {
  // the generator itself is callable: returning it avoids a wrapper call in the hot loop
  return seedrandom.alea(`axonloom:${seed}:${key.join(':')}`) as unknown as Uniform;
}

export function axonStream(seed: number, axon: number): Uniform {
  return stream(seed, 'axon', axon);
}

/** Standard normal by Box–Muller, z = √(−2 ln u₁) cos 2πu₂ (Box & Muller, Ann. Math. Stat. 29,
 *  1958). One value per call so a stream's use never depends on a cached second value. */
export function gaussian(rng: Uniform): number {
  const u1 = 1 - rng(); // (0, 1]: avoids log(0)
  return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * rng());
}

/** k distinct indices from [0, n), chosen uniformly (partial Fisher–Yates), ascending. */
export function sampleIndices(rng: Uniform, n: number, k: number): Uint32Array {
  const idx = new Uint32Array(n);
  for (let i = 0; i < n; i++) idx[i] = i;
  for (let i = 0; i < k; i++) {
    const j = i + Math.floor(rng() * (n - i));
    const t = idx[i]; idx[i] = idx[j]; idx[j] = t;
  }
  return idx.slice(0, k).sort();
}
