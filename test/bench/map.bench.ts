// Topographic map benchmark.
//  mapEndToEnd: scenes/map.json with 10,000 axons, start to finish (build, grow, map in the
//    plate, measure, write the run directory), wall time and cone-steps per second.
//  mapCompetition: the competition step for N terminals on one sheet, at the default radius
//    (twice the mean spacing): rebuild of the neighbour grid plus one energy-change query per
//    terminal, in ns per terminal. With the cell list it stays flat as N grows; the all-pairs
//    sum it replaces is given beside it for the smaller N, growing with N (so N² in all).
// Run: npx tsx test/bench/map.bench.ts [--json]
import { join } from 'node:path';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { loadScene } from '../../engine/scene/load.ts';
import { runScene } from '../../engine/sim/runScene.ts';
import { Sheet } from '../../engine/geometry/regions.ts';
import { TerminalCompetition, defaultCompetitionRadius, pairEnergy } from '../../engine/agents/targeting/competition.ts';
import { stream } from '../../engine/agents/random.ts';

const json = process.argv.includes('--json');
const log = (s: string) => { if (!json) console.log(s); };
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

async function endToEnd(axons: number) {
  const scene = loadScene(join(import.meta.dirname, '../../scenes/map.json'));
  const dir = mkdtempSync(join(tmpdir(), 'axonloom-map-bench-'));
  try {
    const t0 = performance.now();
    const { manifest, world } = await runScene({ scene, outDir: join(dir, 'run'), axons });
    const wallS = (performance.now() - t0) / 1000;
    let coneSteps = 0;
    for (let i = 0; i < world.cones.count; i++) coneSteps += world.cones.steps[i];
    const map = manifest.metrics.map as Record<string, number>;
    return {
      axons, stepsRun: manifest.stepsRun, wallS: +wallS.toFixed(2),
      // cone-steps include the steps terminals take within the plate
      coneStepsPerSec: Math.round(coneSteps / wallS),
      terminatedFraction: +((manifest.statusCounts.terminated ?? 0) / axons).toFixed(4),
      meanErrorUm: +map.meanErrorUm.toFixed(2), spearmanU: +map.spearmanU.toFixed(4), spearmanV: +map.spearmanV.toFixed(4),
    };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

function competition(n: number, brute: boolean) {
  const sheet = new Sheet({ name: 'plate', shape: 'sheet', permissive: true, origin: [0, 0, 0], uAxis: [0, 300, 0], vAxis: [0, 0, 300] });
  const r = defaultCompetitionRadius(sheet, n);
  const rng = stream(1, 'map-bench', n);
  const xyz = new Float64Array(3 * n), move = new Float64Array(3 * n), p = new Float64Array(3);
  for (let i = 0; i < n; i++) {
    sheet.point(rng(), rng(), 0, p);
    xyz.set(p, 3 * i);
    move[3 * i + 1] = 10 * (rng() - 0.5); move[3 * i + 2] = 10 * (rng() - 0.5);
  }
  const c = new TerminalCompetition(sheet, r, n);
  const times: number[] = [], bruteTimes: number[] = [];
  let sink = 0;
  for (let rep = 0; rep < 8; rep++) {
    const t0 = performance.now();
    c.clear();
    for (let i = 0; i < n; i++) c.add(i, xyz[3 * i], xyz[3 * i + 1], xyz[3 * i + 2]);
    c.commit();
    for (let i = 0; i < n; i++) {
      const k = 3 * i;
      sink += c.densityChange(i, xyz[k], xyz[k + 1], xyz[k + 2], xyz[k], xyz[k + 1] + move[k + 1], xyz[k + 2] + move[k + 2], r);
    }
    if (rep > 0) times.push(((performance.now() - t0) * 1e6) / n); // the first warms the JIT
    if (brute && rep < 4) {
      const t1 = performance.now();
      for (let i = 0; i < n; i++) {
        const k = 3 * i;
        let before = 0, after = 0;
        for (let j = 0; j < n; j++) {
          if (j === i) continue;
          const q = 3 * j;
          const dy = xyz[q + 1] - xyz[k + 1], dz = xyz[q + 2] - xyz[k + 2];
          before += pairEnergy(Math.sqrt(dy * dy + dz * dz), r);
          const ey = dy - move[k + 1], ez = dz - move[k + 2];
          after += pairEnergy(Math.sqrt(ey * ey + ez * ez), r);
        }
        sink -= after - before;
      }
      if (rep > 0) bruteTimes.push(((performance.now() - t1) * 1e6) / n);
    }
  }
  if (!Number.isFinite(sink)) throw new Error('bad sums');
  return { radiusUm: +r.toFixed(2), nsPerTerminal: Math.round(median(times)), bruteNsPerTerminal: brute ? Math.round(median(bruteTimes)) : undefined };
}

const comp: Record<string, { radiusUm: number; nsPerTerminal: number; bruteNsPerTerminal?: number }> = {};
log('competition step (grid rebuild + one energy change per terminal), default radius:');
for (const n of [1_000, 10_000, 100_000]) {
  comp[String(n)] = competition(n, n <= 10_000);
  const c = comp[String(n)];
  log(`  ${String(n).padStart(7)} terminals: ${c.nsPerTerminal} ns/terminal (radius ${c.radiusUm} µm)${c.bruteNsPerTerminal ? `; all pairs ${c.bruteNsPerTerminal} ns/terminal` : ''}`);
}
const growth = comp['100000'].nsPerTerminal / comp['1000'].nsPerTerminal;
log(`  per-terminal cost 100,000 vs 1,000 terminals: ×${growth.toFixed(2)} (all pairs would be ×100)`);

const e2e = await endToEnd(10_000);
log(`map scene, ${e2e.axons} axons end to end: ${e2e.wallS} s (${e2e.stepsRun} steps, ${(e2e.coneStepsPerSec / 1e6).toFixed(2)} M cone-steps/s), terminated ${(100 * e2e.terminatedFraction).toFixed(1)} %, mean error ${e2e.meanErrorUm} µm, ρ_u ${e2e.spearmanU}`);

if (json) {
  process.stdout.write(JSON.stringify({
    mapEndToEnd: e2e,
    mapCompetition: { nsPerTerminal: comp, growth100kOver1k: +growth.toFixed(3), peakRssMiB: Math.round(process.resourceUsage().maxRSS / 1024) },
  }) + '\n');
}
