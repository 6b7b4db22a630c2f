// One run, end to end: resolve the scene, build the world, simulate, measure, write the run
// store. Commands (run, compare, sweeps) call this; it reads no process state of its own.
import type { Scene, Edit } from '../scene/schema.ts';
import { resolveScene } from '../scene/edits.ts';
import { buildWorld, simulate, type World, type SimResult } from './simulate.ts';
import { RunRecorder } from '../io/runWriter.ts';
import type { RunManifest } from '../io/runFormat.ts';
import { growthMetrics } from '../metrics/growth.ts';

export interface RunRequest {
  scene: Scene;
  label?: string; // for error messages (the scene file's name)
  outDir: string;
  variant?: string;
  edits?: Edit[];
  seed?: number;
  axons?: number;
  steps?: number;
  swc?: boolean;
  onProgress?: (message: string, done: number, total: number) => void;
  shouldStop?: () => boolean;
}

export interface RunOutcome {
  manifest: RunManifest;
  dir: string;
  world: World;
  result: SimResult;
}

export async function runScene(req: RunRequest): Promise<RunOutcome> {
  const t0 = performance.now();
  const base = req.seed === undefined ? req.scene : { ...req.scene, seed: req.seed };
  const resolved = resolveScene(base, req.variant, req.edits ?? [], req.label);
  const world = buildWorld(resolved.scene, {
    axons: req.axons, steps: req.steps, edits: resolved.edits,
    onProgress: (m) => req.onProgress?.(m, 0, 1),
  });
  const recorder = new RunRecorder(world, { outDir: req.outDir, swc: req.swc });
  let result: SimResult;
  try {
    result = await simulate(world, {
      onFrame: recorder.onFrame,
      onStep: (s, total) => req.onProgress?.('growing', s, total),
      shouldStop: req.shouldStop,
    });
  } catch (e) {
    recorder.abort();
    throw e;
  }
  const metrics: Record<string, unknown> = { growth: growthMetrics(world) };
  const axonColumns = [];
  for (const rule of world.rules) {
    Object.assign(metrics, rule.metrics?.() ?? {});
    axonColumns.push(...(rule.axonColumns?.() ?? []));
  }
  const manifest = recorder.finish(result, {
    variant: resolved.variant, edits: resolved.edits, metrics, axonColumns,
    wallTimeS: (performance.now() - t0) / 1000,
  });
  return { manifest, dir: recorder.finalDir, world, result };
}
