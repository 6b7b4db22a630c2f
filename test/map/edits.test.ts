// Perturbations: bad edits exit 2 naming the edit (command-line convention of this project,
// common practice, no source); the "flatten" edit keeps a profile's mean (its integral over the
// sheet, checked by Simpson's rule) and shrinks its gradient by the factor.
import { describe, it, expect, afterAll, vi } from 'vitest';
import { writeFileSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { cli, ROOT, tempDir } from '../helpers.ts';
import { loadScene } from '../../engine/scene/load.ts';
import { resolveScene } from '../../engine/scene/edits.ts';
import { Profile } from '../../engine/scene/schema.ts';
import { profileLevel, profileMean } from '../../engine/fields/profile.ts';
import { main } from '../../engine/cli/main.ts';

const tmp = tempDir('axonloom-edits-');
afterAll(() => tmp.cleanup());
const MAP = join(ROOT, 'scenes/map.json');

/** `axonloom ARGS` in this process (as bin/axonloom.js runs it), for the quick failures */
async function inProcess(args: string[]): Promise<{ code: number; stderr: string }> {
  let stderr = '';
  const spy = vi.spyOn(process.stderr, 'write').mockImplementation((chunk: string | Uint8Array) => {
    stderr += String(chunk);
    return true;
  });
  try {
    return { code: await main(args), stderr };
  } finally {
    spy.mockRestore();
  }
}

describe('bad edits exit 2 and name the edit', () => {
  const cases: [string, string[], RegExp][] = [
    ['a bad op', ['--perturb', '{"op":"knockout","cue":"tavrin"}', '--perturb', '{"op":"explode","cue":"tavrin"}'], /--perturb\[1\]: op: must be one of/],
    ['an unknown cue', ['--perturb', '{"op":"knockout","cue":"tavrn"}'], /--perturb\[0\]\.cue: no cue named "tavrn" \(did you mean "tavrin"\?\)/],
    ['an unknown receptor', ['--perturb', '{"op":"knockin","receptor":"Tavx","fraction":0.5,"delta":1}'], /--perturb\[0\]\.receptor: no receptor named "Tavx"/],
    ['a fraction above 1', ['--perturb', '{"op":"knockin","receptor":"Tavr","fraction":1.5,"delta":1}'], /--perturb\[0\]: fraction: must be <= 1/],
    ['a negative fraction', ['--perturb', '{"op":"knockin","receptor":"Tavr","fraction":-0.1,"delta":1}'], /--perturb\[0\]: fraction: must be >= 0/],
    ['flatten on a point cue', ['--perturb', '{"op":"flatten","cue":"beckonin","factor":0.5}'], /--perturb\[0\]\.cue: "beckonin" is a point cue; "flatten" applies to expressed cues only/],
  ];
  for (const [what, args, message] of cases) {
    it(what, async () => {
      const r = await inProcess(['run', MAP, '--axons', '5', '--steps', '2', '--out', join(tmp.dir, 'never'), ...args]);
      expect(r.code).toBe(2);
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
      expect(r.stderr).toMatch(message);
    });
  }
  it('a scene variant with a bad edit names the variant and the edit', async () => {
    const scene = JSON.parse(readFileSync(MAP, 'utf8'));
    scene.variants.bad = [{ op: 'knockin', receptor: 'Tavr', fraction: 2, delta: 1 }];
    const file = join(tmp.dir, 'bad.json');
    writeFileSync(file, JSON.stringify(scene));
    const r = await inProcess(['run', file, '--axons', '5', '--steps', '2', '--out', join(tmp.dir, 'never')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/variants\.bad\[0\]\.fraction: must be <= 1/);
  });
  it('an unknown variant exits 2 listing the scene’s variants', async () => {
    const r = await inProcess(['run', MAP, '--variant', 'knockon', '--axons', '5', '--steps', '2', '--out', join(tmp.dir, 'never')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/no variant named "knockon" \(there are: normal, knockin, knockout, flattened\)/);
  });
  it('--reference that is not a run exits 2 with one line', async () => {
    const r = await inProcess(['run', MAP, '--axons', '5', '--steps', '2', '--out', join(tmp.dir, 'never'), '--reference', join(tmp.dir, 'nothing-here')]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/--reference: .*no run\.json/);
  });
});

describe('ad-hoc edits are applied and recorded', () => {
  it('--variant plus --perturb: run.json lists both in order, axons.csv marks the knock-in axons', () => {
    const out = join(tmp.dir, 'adhoc');
    const r = cli(['run', MAP, '--variant', 'knockout', '--perturb', '{"op":"knockin","receptor":"Dorr","fraction":0.25,"delta":2}', '--axons', '40', '--steps', '3', '--out', out, '--quiet']);
    expect(r.code, r.stderr).toBe(0);
    const m = JSON.parse(readFileSync(join(out, 'run.json'), 'utf8'));
    expect(m.variant).toBe('knockout');
    expect(m.edits).toEqual([{ op: 'knockout', cue: 'tavrin' }, { op: 'knockin', receptor: 'Dorr', fraction: 0.25, delta: 2 }]);
    expect(m.scene.cues.find((c: { name: string }) => c.name === 'tavrin').scale).toBe(0);
    const rows = readFileSync(join(out, 'axons.csv'), 'utf8').trim().split('\n');
    const col = rows[0].split(',').indexOf('knockin');
    expect(rows.slice(1).filter((l) => l.split(',')[col] === '1')).toHaveLength(10);
  });
  it('--reference: the expected map is the reference run’s terminations, recorded in run.json', () => {
    const ref = join(tmp.dir, 'ref'), out = join(tmp.dir, 'against-ref');
    expect(cli(['run', MAP, '--axons', '60', '--out', ref, '--quiet']).code).toBe(0);
    const r = cli(['run', MAP, '--axons', '60', '--seed', '99', '--out', out, '--reference', ref, '--quiet']);
    expect(r.code, r.stderr).toBe(0);
    const m = JSON.parse(readFileSync(join(out, 'run.json'), 'utf8'));
    expect(m.metrics.mapInfo.expected).toBe('reference');
    expect(m.scene.expectedMap.reference).toBe(ref);
    expect(Object.keys(m.metrics.map)).toHaveLength(8);
  });
});

describe('flatten', () => {
  const shapes = [
    Profile.parse({ shape: 'linear', amplitude: 2, offset: 0.5 }),
    Profile.parse({ shape: 'exponential', rate: 3, amplitude: 1.5, reversed: true }),
    Profile.parse({ shape: 'sigmoid', midpoint: 0.3, width: 0.08, axis: 'v' }),
    Profile.parse({ shape: 'constant', amplitude: 0.7, offset: 0.1 }),
  ];
  const simpson = (f: (t: number) => number, n = 2000) => {
    let s = f(0) + f(1);
    for (let k = 1; k < n; k++) s += (k % 2 ? 4 : 2) * f(k / n);
    return s / (3 * n);
  };
  it('profileMean is the integral of the profile over [0, 1] (Simpson’s rule)', () => {
    for (const p of shapes) {
      const along = (t: number) => (p.axis === 'u' ? profileLevel(p, t, 0.5) : profileLevel(p, 0.5, t));
      expect(profileMean(p)).toBeCloseTo(simpson(along), 8);
    }
  });
  it('the edit keeps the mean level and scales every difference by the factor', () => {
    const scene = loadScene(MAP);
    const before = scene.cues.find((c) => c.name === 'tavrin')!;
    const { scene: after } = resolveScene(scene, 'flattened');
    const cue = after.cues.find((c) => c.name === 'tavrin')!;
    if (cue.kind !== 'expressed' || before.kind !== 'expressed') throw new Error('tavrin is expressed');
    expect(profileMean(cue.profile)).toBeCloseTo(profileMean(before.profile), 12);
    const d = (p: Profile) => profileLevel(p, 0.9, 0) - profileLevel(p, 0.2, 0);
    expect(d(cue.profile)).toBeCloseTo(0.25 * d(before.profile), 12);
  });
});
