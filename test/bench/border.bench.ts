/**
 * Benchmark: the coupled border solve (engine/fields/borderSolver.ts).
 *
 *   npx tsx test/bench/border.bench.ts [--runs N] [--sizes 61,121] [--json]
 *
 * Two species produced in boxes at the two x ends of an N × (N+1)/2 × (N+1)/2 grid (h = 10 µm,
 * D = 50 µm²/s, k = 0.005 /s so λ = 10 voxels, repression K = 0.1, Hill n = 2, reflecting
 * walls, tolerance 1e-6), once with equal production (border midway) and once with one species
 * scaled by 4. Prints the median wall time of N runs (default 3), the chain steps and the CG
 * iterations summed over all linear solves. Single-threaded.
 */
import { solveBorder } from '../../engine/fields/borderSolver.ts';

const args = process.argv.slice(2);
const opt = (name: string, fallback: string) => {
  const i = args.indexOf(name);
  return i >= 0 && i + 1 < args.length ? args[i + 1] : fallback;
};
const runs = Math.max(1, Number(opt('--runs', '3')));
const sizes = opt('--sizes', '61,121').split(',').map(Number);
const json = args.includes('--json');
const log = (line: string) => { if (!json) console.log(line); };
const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
};

const results: Record<string, number> = {};
log(`border bench: median of ${runs} run(s), node ${process.version}`);
log('grid           factor  steps  CG iterations  median ms');
for (const N of sizes) {
  const nx = N, ny = (N + 1) / 2, nz = (N + 1) / 2, h = 10;
  const prod = (lo: number, hi: number, rate: number) => {
    const s = new Float64Array(nx * ny * nz);
    for (let k = 0; k < nz; k++) for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++) if (i * h >= lo && i * h <= hi) s[i + nx * (j + ny * k)] = rate;
    return s;
  };
  const L = (nx - 1) * h;
  for (const factor of [1, 4]) {
    const times: number[] = [];
    let steps = 0, cg = 0;
    for (let r = 0; r < runs; r++) {
      const t0 = performance.now();
      const sol = solveBorder({
        grid: { nx, ny, nz, h }, boundary: 'reflecting',
        species: [
          { diffusion: 50, decay: 0.005, production: prod(0, 0.1 * L, 0.05 * factor), repression: 0.1, hill: 2 },
          { diffusion: 50, decay: 0.005, production: prod(0.9 * L, L, 0.05), repression: 0.1, hill: 2 },
        ],
      });
      times.push(performance.now() - t0);
      steps = sol.iterations;
      cg = sol.linearIterations;
    }
    const ms = median(times);
    results[`border_${nx}x${ny}x${nz}_f${factor}_ms`] = ms;
    log(`${`${nx}×${ny}×${nz}`.padEnd(14)} ${String(factor).padStart(6)}  ${String(steps).padStart(5)}  ${String(cg).padStart(13)}  ${ms.toFixed(0).padStart(9)}`);
  }
}
if (json) console.log(JSON.stringify(results));
