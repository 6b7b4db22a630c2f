// The map scene (scenes/map.json) against the published phenotypes it is meant to reproduce.
// Our axis names stand for the trade's: the sensory sheet's outer end (source u = 0) plays the
// temporal end of the retina and its inner end the nasal end; the relay plate's head end
// (target u = 0) plays the anterior end of the tectum and its tail end the posterior end.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { sampleRankCorrelation } from 'simple-statistics';
import { loadScene } from '../../engine/scene/load.ts';
import type { Scene } from '../../engine/scene/schema.ts';
import { runScene } from '../../engine/sim/runScene.ts';
import { axonTable, type AxonTable } from '../../engine/io/runReader.ts';
import { ROOT, tempDir } from '../helpers.ts';

const AXONS = 300;
const SEED = 4242;
const tmp = tempDir('axonloom-map-');
afterAll(() => tmp.cleanup());

interface Run { map: Record<string, number>; t: AxonTable; manifest: Awaited<ReturnType<typeof runScene>>['manifest'] }
async function run(scene: Scene, name: string, variant: string): Promise<Run> {
  const { manifest, dir } = await runScene({ scene, outDir: join(tmp.dir, name), variant, seed: SEED, axons: AXONS });
  return { map: manifest.metrics.map as Record<string, number>, t: axonTable(readFileSync(join(dir, 'axons.csv'), 'utf8')), manifest };
}

const mapScene = loadScene(join(ROOT, 'scenes/map.json'));
function withoutCompetition(s: Scene): Scene {
  const c = structuredClone(s);
  delete c.populations[0].mapping!.competition;
  return c;
}

/** rows where the axon ended on the plate */
function mapped(t: AxonTable, keep: (i: number) => boolean = () => true) {
  const tu = t.numbers('target_u'), su = t.numbers('source_u'), sv = t.numbers('source_v'), tv = t.numbers('target_v'), ki = t.numbers('knockin');
  const idx = [...Array(t.count).keys()].filter((i) => Number.isFinite(tu[i]) && keep(i));
  return { idx, tu, tv, su, sv, ki };
}

let normal: Run, knockin: Run, knockout: Run, normalFree: Run, knockinFree: Run;
beforeAll(async () => {
  normal = await run(mapScene, 'normal', 'normal');
  knockin = await run(mapScene, 'knockin', 'knockin');
  knockout = await run(mapScene, 'knockout', 'knockout');
  normalFree = await run(withoutCompetition(mapScene), 'normal-free', 'normal');
  knockinFree = await run(withoutCompetition(mapScene), 'knockin-free', 'knockin');
});

describe('normal map', () => {
  it('the scene names its axes as the test reads them', () => {
    const sheets = Object.fromEntries(mapScene.regions.map((r) => [r.name, r]));
    expect(sheets['sensory-sheet']).toMatchObject({ uName: 'outer→inner' });
    expect(sheets['relay-plate']).toMatchObject({ uName: 'head→tail' });
  });
  it('outer-end (temporal) axons end at the head (anterior) end, inner-end (nasal) ones at the tail (posterior) end (common practice, no source)', () => {
    const { idx, su, tu } = mapped(normal.t);
    expect(idx.length).toBeGreaterThan(0.95 * AXONS);
    const outer = idx.filter((i) => su[i] < 0.2), inner = idx.filter((i) => su[i] > 0.8);
    expect(outer.filter((i) => tu[i] < 1 / 3).length).toBeGreaterThan(0.9 * outer.length);
    expect(inner.filter((i) => tu[i] > 2 / 3).length).toBeGreaterThan(0.9 * inner.length);
  });
  it('|ρ| ≥ 0.9 on both axes, and run.json’s ρ equals simple-statistics’ sampleRankCorrelation of axons.csv', () => {
    expect(Math.abs(normal.map.spearmanU)).toBeGreaterThanOrEqual(0.9);
    expect(Math.abs(normal.map.spearmanV)).toBeGreaterThanOrEqual(0.9);
    const { idx, su, sv, tu, tv } = mapped(normal.t);
    // axons.csv rounds to 6 decimals, which could only reorder values closer than 1e-6
    expect(normal.map.spearmanU).toBeCloseTo(sampleRankCorrelation(idx.map((i) => su[i]), idx.map((i) => tu[i])), 6);
    expect(normal.map.spearmanV).toBeCloseTo(sampleRankCorrelation(idx.map((i) => sv[i]), idx.map((i) => tv[i])), 6);
  });
  it('axons.csv: error_um is the distance on the 300 µm plate from the expected place; ectopic beyond 15 % of its edge', () => {
    const t = normal.t;
    for (const c of ['target_u', 'target_v', 'expected_u', 'expected_v', 'error_um', 'ectopic']) expect(t.header).toContain(c);
    const { idx, su, sv, tu, tv } = mapped(t);
    const eu = t.numbers('expected_u'), ev = t.numbers('expected_v'), err = t.numbers('error_um'), ect = t.numbers('ectopic');
    for (const i of idx) {
      expect(eu[i]).toBeCloseTo(su[i], 5); // expectedMap: u from u, v from v, not reversed
      expect(ev[i]).toBeCloseTo(sv[i], 5);
      expect(err[i]).toBeCloseTo(300 * Math.hypot(tu[i] - eu[i], tv[i] - ev[i]), 1);
      expect(ect[i]).toBe(err[i] > 45 ? 1 : 0);
    }
    const sorted = idx.map((i) => err[i]).sort((a, b) => a - b);
    expect(normal.map.meanErrorUm).toBeCloseTo(sorted.reduce((a, b) => a + b, 0) / sorted.length, 2);
  });
});

describe('knock-in of the forward receptor in half the axons (Brown et al., Cell 102, 2000)', () => {
  it('run.json records the variant and its edits; half the axons are marked in axons.csv', () => {
    expect(knockin.manifest.variant).toBe('knockin');
    expect(knockin.manifest.edits).toEqual(mapScene.variants.knockin);
    const ki = knockin.t.numbers('knockin');
    expect(ki.reduce((a, b) => a + b, 0)).toBe(AXONS / 2);
    // the knock-in raised Tavr by delta = 1 on exactly those axons
    const r0 = normal.t.numbers('receptor_Tavr'), r1 = knockin.t.numbers('receptor_Tavr');
    for (let i = 0; i < AXONS; i++) expect(r1[i] - r0[i]).toBeCloseTo(ki[i] === 1 ? 1 : 0, 5);
  });
  it('two ordered sub-maps, the knock-in one anterior of its wild-type neighbours from the same source position', () => {
    const ki = mapped(knockin.t, (i) => knockin.t.numbers('knockin')[i] === 1);
    const wt = mapped(knockin.t, (i) => knockin.t.numbers('knockin')[i] === 0);
    expect(sampleRankCorrelation(ki.idx.map((i) => ki.su[i]), ki.idx.map((i) => ki.tu[i]))).toBeGreaterThan(0.9);
    expect(sampleRankCorrelation(wt.idx.map((i) => wt.su[i]), wt.idx.map((i) => wt.tu[i]))).toBeGreaterThan(0.9);
    let anterior = 0, compared = 0;
    for (const i of ki.idx) {
      const near = wt.idx.filter((j) => Math.hypot(wt.su[j] - ki.su[i], wt.sv[j] - ki.sv[i]) < 0.08);
      if (near.length === 0) continue;
      compared++;
      if (ki.tu[i] < near.reduce((a, j) => a + wt.tu[j], 0) / near.length) anterior++;
    }
    expect(compared).toBeGreaterThan(0.8 * ki.idx.length);
    expect(anterior).toBeGreaterThan(0.9 * compared);
    // the duplicated map shows in the duplication index (Sarle's 5/9 threshold)
    expect(knockin.map.duplicationIndex).toBeGreaterThan(5 / 9);
    expect(normal.map.duplicationIndex).toBeLessThan(5 / 9);
  });
  it('with competition on, the wild-type map is pushed posterior relative to normal; without it, it does not move', () => {
    const shifts = (a: Run, b: Run) => {
      const ki = b.t.numbers('knockin'), t0 = a.t.numbers('target_u'), t1 = b.t.numbers('target_u');
      return [...Array(AXONS).keys()].filter((i) => ki[i] === 0 && Number.isFinite(t0[i]) && Number.isFinite(t1[i])).map((i) => t1[i] - t0[i]);
    };
    const d = shifts(normal, knockin);
    const mean = d.reduce((a, b) => a + b, 0) / d.length;
    const se = Math.sqrt(d.reduce((a, b) => a + (b - mean) ** 2, 0) / (d.length - 1) / d.length);
    expect(mean).toBeGreaterThan(0.03);
    expect(mean / se).toBeGreaterThan(4);
    // without competition a wild-type terminal's moves depend on its own cues and random stream only
    const free = shifts(normalFree, knockinFree);
    expect(Math.max(...free.map(Math.abs))).toBeLessThan(1e-9);
  });
});

describe('ligand knockout (Frisén et al., Neuron 20, 1998; Feldheim et al., Neuron 25, 2000)', () => {
  it('ectopic terminations several times the normal share, and a less ordered map', () => {
    expect(knockout.manifest.edits).toEqual([{ op: 'knockout', cue: 'tavrin' }]);
    expect(knockout.map.ectopicFraction).toBeGreaterThan(0.1);
    expect(knockout.map.ectopicFraction).toBeGreaterThan(3 * Math.max(normal.map.ectopicFraction, 1 / AXONS));
    expect(knockout.map.spearmanU).toBeLessThan(normal.map.spearmanU);
    expect(knockout.map.orderFlipFraction).toBeGreaterThan(1.3 * normal.map.orderFlipFraction);
  });
});

describe('gradient balance on the map scene', () => {
  it('the balance rule (no competition) also orders the map, |ρ| ≥ 0.9 (common practice, no source)', async () => {
    const s = withoutCompetition(mapScene);
    s.populations[0].mapping!.rule = 'balance';
    const r = await run(s, 'balance', 'normal');
    expect(Math.abs(r.map.spearmanU)).toBeGreaterThanOrEqual(0.9);
    expect(Math.abs(r.map.spearmanV)).toBeGreaterThanOrEqual(0.9);
    expect(r.manifest.statusCounts.terminated).toBeGreaterThan(0.95 * AXONS);
  });
});
