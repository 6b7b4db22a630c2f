/**
 * Benchmark: steady reaction–diffusion grid solve (engine/fields/gridSolver.ts).
 *
 *   npx tsx test/bench/gridSolver.bench.ts [--runs N] [--sizes 61,121] [--jacobi]
 *
 * A point source at the centre of an N³ box (h = 1 µm, D = 100 µm²/s, tolerance 1e-8), two
 * regimes: absorbing walls with λ = 10 voxels (short-range cue), and reflecting walls with
 * λ = 1000 voxels (nearly pure diffusion, the hardest case for CG). Prints the median wall
 * time of N runs (default 3) per case, timing the whole call (set-up included). The Jacobi
 * preconditioner is run too with --jacobi (slow at 121³: tens of seconds per run).
 * Single-threaded: the solver uses one core.
 */

import { addPointSource, solveSteadyReactionDiffusion, type Boundary } from '../../engine/fields/gridSolver.ts';

const args = process.argv.slice(2);
const opt = (name: string, fallback: string) => {
  const i = args.indexOf(name);
  return i >= 0 && i + 1 < args.length ? args[i + 1] : fallback;
};
const runs = Math.max(1, Number(opt('--runs', '3')));
const sizes = opt('--sizes', '61,121').split(',').map(Number);
const preconditioners: Array<'multigrid' | 'jacobi'> = args.includes('--jacobi') ? ['multigrid', 'jacobi'] : ['multigrid'];
const regimes: Array<{ boundary: Boundary; lambdaVoxels: number }> = [
  { boundary: 'absorbing', lambdaVoxels: 10 },
  { boundary: 'reflecting', lambdaVoxels: 1000 },
];

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
};

const json = args.includes('--json');
const log = (line: string) => { if (!json) console.log(line); };
const results: Record<string, number> = {};
log(`gridSolver bench: median of ${runs} run(s), node ${process.version}`);
log('grid      walls       λ/h    preconditioner  iterations  median ms  (min–max)');
for (const N of sizes) {
  const grid = { nx: N, ny: N, nz: N, h: 1 };
  const mid = (N - 1) / 2;
  const source = addPointSource(grid, [mid, mid, mid], 1);
  const D = 100;
  for (const { boundary, lambdaVoxels } of regimes) {
    const decay = D / (lambdaVoxels * grid.h) ** 2;
    for (const preconditioner of preconditioners) {
      // One untimed warm-up run at the small size lets the JIT settle; at 121³ it is not worth it.
      if (N <= 61) solveSteadyReactionDiffusion({ grid, diffusion: D, decay, source, boundary, preconditioner });
      const times: number[] = [];
      let iterations = 0;
      for (let r = 0; r < runs; r++) {
        const t0 = performance.now();
        const sol = solveSteadyReactionDiffusion({ grid, diffusion: D, decay, source, boundary, preconditioner });
        times.push(performance.now() - t0);
        iterations = sol.iterations;
        if (!(sol.relResidual <= 1e-8)) throw new Error(`did not converge: ${sol.relResidual}`);
      }
      results[`${N}^3-${boundary}-${preconditioner}`] = Math.round(median(times));
      log(
        `${`${N}³`.padEnd(9)} ${boundary.padEnd(11)} ${String(lambdaVoxels).padStart(5)}  ${preconditioner.padEnd(15)} ` +
          `${String(iterations).padStart(10)}  ${median(times).toFixed(0).padStart(9)}  ` +
          `(${Math.min(...times).toFixed(0)}–${Math.max(...times).toFixed(0)})`,
      );
    }
  }
}
if (json) process.stdout.write(JSON.stringify({ gridSolveMedianMs: results }) + '\n');
