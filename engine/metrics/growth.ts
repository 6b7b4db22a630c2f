// How growth went, for run.json's metrics.growth: per population (and overall) how many axons
// ended with each status, and how far they grew. Whether axons reached their target, and where
// else they ended, is pathfinding's concept (metrics/pathfinding.ts), not repeated here.
import type { World } from '../sim/simulate.ts';
import { countStatuses, type AxonStatus } from '../io/runFormat.ts';

export interface GrowthSummary {
  axons: number;
  statusCounts: Partial<Record<AxonStatus, number>>;
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
  let path = 0, steps = 0;
  for (let i = from; i < to; i++) {
    path += cones.pathLength[i];
    steps += cones.steps[i];
  }
  return { axons: n, statusCounts: countStatuses(cones.status, from, to), meanPathLengthUm: n ? path / n : 0, meanSteps: n ? steps / n : 0 };
}
