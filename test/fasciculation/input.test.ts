// Bad adhesion input: every mistake names the JSON path and the reason, and the CLI exits 2
// without a stack trace (that user mistakes name the offending field is common practice, no
// source; the wording is ours). The "adhesion" edit: checked and applied like the other edits.
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { parseScene, parseEdit } from '../../engine/scene/load.ts';
import { resolveScene } from '../../engine/scene/edits.ts';
import { SceneError } from '../../engine/scene/errors.ts';
import { ROOT, cli, tempDir } from '../helpers.ts';

const RAW = JSON.parse(readFileSync(join(ROOT, 'scenes/bundles.json'), 'utf8'));
const tmp = tempDir();
afterAll(() => tmp.cleanup());

function problems(mutate: (s: any) => void): string {
  const s = structuredClone(RAW);
  mutate(s);
  try {
    parseScene(JSON.stringify(s), 'bad.json');
  } catch (e) {
    if (e instanceof SceneError) return e.message;
    throw e;
  }
  return '';
}

describe('adhesion blocks that cannot work are refused with their JSON path', () => {
  it('a negative radius (zod)', () => {
    expect(problems((s) => (s.populations[1].adhesion.radius = -5)))
      .toMatch(/^bad\.json: populations\[1\]\.adhesion\.radius: must be > 0 \(got -5\)$/m);
  });

  it('a zero radius', () => {
    expect(problems((s) => (s.populations[0].adhesion.radius = 0))).toMatch(/populations\[0\]\.adhesion\.radius: must be > 0/);
  });

  it('an unknown class, with a hint', () => {
    expect(problems((s) => (s.populations[1].adhesion.adheresTo = ['pionneer'])))
      .toMatch(/^bad\.json: populations\[1\]\.adhesion\.adheresTo\[0\]: no population has adhesion class "pionneer" \(did you mean "pioneer"\?\)$/m);
  });

  it('a class list that names no population: each entry is named', () => {
    const m = problems((s) => (s.populations[1].adhesion.adheresTo = ['trunk', 'branch']));
    expect(m).toMatch(/populations\[1\]\.adhesion\.adheresTo\[0\]: no population has adhesion class "trunk"/);
    expect(m).toMatch(/populations\[1\]\.adhesion\.adheresTo\[1\]: no population has adhesion class "branch"/);
  });

  it('an empty class list', () => {
    expect(problems((s) => (s.populations[1].adhesion.adheresTo = []))).toMatch(/populations\[1\]\.adhesion\.adheresTo:/);
  });

  it('a class only a population without adhesion could have had', () => {
    expect(problems((s) => { delete s.populations[0].adhesion; }))
      .toMatch(/populations\[1\]\.adhesion\.adheresTo\[0\]: no population has adhesion class "pioneer"/);
  });

  it('a negative weight and an unknown key', () => {
    expect(problems((s) => (s.populations[1].adhesion.weight = -1))).toMatch(/populations\[1\]\.adhesion\.weight: must be >= 0 \(got -1\)/);
    expect(problems((s) => (s.populations[1].adhesion.raduis = 5))).toMatch(/populations\[1\]\.adhesion\.raduis: unknown key \(did you mean "radius"\?\)/);
  });

  it('the CLI exits 2 with the path and no stack trace', () => {
    const s = structuredClone(RAW);
    s.populations[1].adhesion.radius = -5;
    s.populations[0].adhesion.adheresTo = ['nobody'];
    const file = join(tmp.dir, 'bad.json');
    writeFileSync(file, JSON.stringify(s, null, 2));
    const r = cli(['run', file, '--out', join(tmp.dir, 'out'), '--quiet']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/bad\.json: populations\[1\]\.adhesion\.radius: must be > 0 \(got -5\)/);
    expect(r.stdout).toBe('');
    expect(r.stderr).not.toMatch(/\n\s+at /);
    // semantic checks run once the schema passes
    s.populations[1].adhesion.radius = 5;
    writeFileSync(file, JSON.stringify(s, null, 2));
    const r2 = cli(['run', file, '--out', join(tmp.dir, 'out'), '--quiet']);
    expect(r2.code).toBe(2);
    expect(r2.stderr).toMatch(/bad\.json: populations\[0\]\.adhesion\.adheresTo\[0\]: no population has adhesion class "nobody"/);
  });
});

describe('the "adhesion" edit', () => {
  const scene = parseScene(JSON.stringify(RAW), 'bundles.json');

  it('sets one population’s weight, or every adhesive population’s', () => {
    const one = resolveScene(scene, undefined, [parseEdit('{"op":"adhesion","population":"followers","weight":0.25}')]);
    expect(one.scene.populations.map((p) => p.adhesion!.weight)).toEqual([RAW.populations[0].adhesion.weight, 0.25]);
    const all = resolveScene(scene, undefined, [parseEdit('{"op":"adhesion","weight":0}')]);
    expect(all.scene.populations.map((p) => p.adhesion!.weight)).toEqual([0, 0]);
  });

  it('refuses an unknown population, one without adhesion, and a negative weight', () => {
    expect(() => resolveScene(scene, undefined, [parseEdit('{"op":"adhesion","population":"folowers","weight":0}')]))
      .toThrow(/--perturb\[0\]\.population: no population named "folowers" \(did you mean "followers"\?\)/);
    const s = structuredClone(RAW);
    delete s.populations[0].adhesion;
    s.populations[1].adhesion.adheresTo = ['follower'];
    const plain = parseScene(JSON.stringify(s), 'x.json');
    expect(() => resolveScene(plain, undefined, [parseEdit('{"op":"adhesion","population":"pioneers","weight":0}')]))
      .toThrow(/--perturb\[0\]\.population: population "pioneers" has no adhesion block/);
    expect(() => parseEdit('{"op":"adhesion","weight":-1}')).toThrow(/weight: must be >= 0 \(got -1\)/);
  });

  it('a variant naming an unknown population is refused when the scene loads', () => {
    const s = structuredClone(RAW);
    s.variants.broken = [{ op: 'adhesion', population: 'ghosts', weight: 0 }];
    expect(() => parseScene(JSON.stringify(s), 'bad.json')).toThrow(/variants\.broken\[0\]\.population: no population named "ghosts"/);
  });
});
