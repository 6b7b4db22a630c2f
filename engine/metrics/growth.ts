// Summary of how growth went, for run.json's metrics.growth: what share of axons ended how,
// and how far they grew. Per population and overall.
import type { World } from '../sim/simulate.ts';
import { AXON_STATUS } from '../io/runFormat.ts';

export interface GrowthSummary {
  axons: number;
  reachedFraction: number;
  stalledFraction: number;
  exitedFraction: number;
  meanPathLengthUm: number;
  meanSteps: number;
}

export function growthMetrics(world: World): { overall: GrowthSummary; populations: Record<string, GrowthSummary> } {
  const populations: Record<string, GrowthSummary> = {};
  for (const p of world.populations) populations[p.name] = summarise(world, p.first, p.first + p.count);
  return { overall: summarise(world, 0, world.cones.count), populations };
}

function summarise(world: World, from: number, to: number): GrowthSummary {
  const { cones } = world;
  const n = to - from;
  let reached = 0, stalled = 0, exited = 0, path = 0, steps = 0;
  for (let i = from; i < to; i++) {
    const s = AXON_STATUS[cones.status[i]];
    if (s === 'reached' || s === 'terminated') reached++;
    else if (s === 'stalled') stalled++;
    else if (s === 'exited') exited++;
    path += cones.pathLength[i];
    steps += cones.steps[i];
  }
  const f = (k: number) => (n ? k / n : 0);
  return {
    axons: n,
    reachedFraction: f(reached),
    stalledFraction: f(stalled),
    exitedFraction: f(exited),
    meanPathLengthUm: n ? path / n : 0,
    meanSteps: n ? steps / n : 0,
  };
}
