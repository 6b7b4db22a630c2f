// The corridor and sorting scenes, through runScene and the run store's run.json:
//  - removing the guidance cue from a corridor misroutes axons away from their normal path
//    (science brief §5: a fact of the trade, common practice, no source): reachedTargetFraction
//    falls sharply and misroutedFraction rises;
//  - two populations sorted by one midline cue (one attracted, one repelled) keep their paths
//    apart; with the cue knocked out their paths intermingle, so the segregation index falls to
//    about 0, its value for random mixing (Pielou 1961, from memory).
import { describe, it, expect, afterAll } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { tempDir, ROOT } from '../helpers.ts';
import { loadScene } from '../../engine/scene/load.ts';
import { runScene } from '../../engine/sim/runScene.ts';

const tmp = tempDir();
afterAll(() => tmp.cleanup());

async function pathfinding(file: string, variant: string | undefined, axons: number) {
  const out = join(tmp.dir, `${file}-${variant ?? 'normal'}`);
  await runScene({ scene: loadScene(join(ROOT, 'scenes', file)), outDir: out, variant, axons });
  return JSON.parse(readFileSync(join(out, 'run.json'), 'utf8')).metrics.pathfinding;
}

describe('corridor.json', () => {
  it('axons reach their target through the corridor; knocking the corridor cue out misroutes them', async () => {
    const normal = await pathfinding('corridor.json', undefined, 120);
    const none = await pathfinding('corridor.json', 'no-corridor', 120);
    // measured with 120 axons: 0.92 reached / 0.04 misrouted, and 0.00 / 0.66 without the corridor
    expect(normal.reachedTargetFraction).toBeGreaterThan(0.8);
    expect(none.reachedTargetFraction).toBeLessThan(0.15);
    expect(none.misroutedFraction - normal.misroutedFraction).toBeGreaterThan(0.4);
    expect(normal.populations['origo-axons'].destinations).toEqual(['sinus']);
    for (const m of [normal, none]) {
      expect(m.reachedTargetFraction + m.misroutedFraction + m.strandedFraction).toBeCloseTo(1, 12);
      expect(m.meanTortuosity).toBeGreaterThanOrEqual(1);
    }
  });
});

describe('sorting.json', () => {
  it('an attracted and a repelled population segregate; knocking the midline cue out intermingles them', async () => {
    const normal = await pathfinding('sorting.json', undefined, 200);
    const none = await pathfinding('sorting.json', 'no-midline', 200);
    // measured with 200 axons: 0.78 with the cue, −0.03 without
    expect(normal.segregationIndex).toBeGreaterThan(0.5);
    expect(Math.abs(none.segregationIndex)).toBeLessThan(0.1);
    expect(normal.segregation[0].populations).toEqual(['medial-axons', 'lateral-axons']);
    expect(normal.reachedTargetFraction).toBeNull(); // neither population has a target
  });
});
