// Malformed border scenes exit 2 with the file, the JSON path and the reason on one line and no
// stack trace (the project's rule for user mistakes; naming the offending field is common
// practice, no source). The species' range used for thresholds is 0 < level < rate·scale/decay:
// no steady level can exceed the unrepressed level of a region producing everywhere
// (maximum principle for D∇²c − kc + s = 0, Crank 1975).
import { describe, it, expect, afterAll } from 'vitest';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { cli, tempDir } from '../helpers.ts';

const tmp = tempDir();
afterAll(() => tmp.cleanup());

const BASE = {
  name: 'bad-border', seed: 1,
  volume: { size: [200, 50, 50], voxel: 10 },
  regions: [
    { name: 'west', shape: 'box', min: [0, 0, 0], max: [30, 50, 50] },
    { name: 'east', shape: 'box', min: [170, 0, 0], max: [200, 50, 50] },
    { name: 'west-side', shape: 'domain', species: 'wa', dominant: true },
    { name: 'src', shape: 'sheet', origin: [100, 10, 10], uAxis: [0, 30, 0], vAxis: [0, 0, 30] },
  ],
  cues: [{
    name: 'edge', kind: 'border', species: [
      { name: 'wa', region: 'west', rate: 0.05, diffusion: 50, decay: 0.005, repression: 0.1 },
      { name: 'eb', region: 'east', rate: 0.05, diffusion: 50, decay: 0.005, repression: 0.1 },
    ],
  }],
  populations: [{ name: 'p', count: 5, source: 'src', target: 'west-side', receptors: [{ name: 'R', binds: 'eb', kd: 1, response: 'repel' }] }],
};

function scene(mutate: (s: any) => void): string {
  const s = structuredClone(BASE) as any;
  mutate(s);
  return JSON.stringify(s);
}

const cases: { name: string; text: string; expect: RegExp; args?: string[] }[] = [
  { name: 'one-species', text: scene((s) => s.cues[0].species.pop()), expect: /^bad\.json: cues\[0\]\.species: must have at least 2 items$/m },
  { name: 'threshold-above-range', text: scene((s) => { delete s.regions[2].dominant; s.regions[2].above = 20; }),
    expect: /^bad\.json: regions\[2\]\.above: must lie inside the range of species "wa", 0 < level < 10 .*got 20$/m },
  { name: 'threshold-negative', text: scene((s) => { delete s.regions[2].dominant; s.regions[2].below = -1; }), expect: /regions\[2\]\.below: must lie inside the range of species "wa"/ },
  { name: 'domain-unknown-species', text: scene((s) => (s.regions[2].species = 'wb')), expect: /regions\[2\]\.species: no border species named "wb" \(did you mean "wa"\?\)/ },
  { name: 'domain-no-condition', text: scene((s) => delete s.regions[2].dominant), expect: /regions\[2\]: a domain needs "dominant", "above" or "below"/ },
  { name: 'receptor-binds-border', text: scene((s) => (s.populations[0].receptors[0].binds = 'edge')),
    expect: /populations\[0\]\.receptors\[0\]\.binds: "edge" is a border cue; bind one of its species \("wa" or "eb"\)/ },
  { name: 'species-name-clash', text: scene((s) => (s.cues[0].species[1].name = 'edge')), expect: /cues\[0\]\.species\[1\]\.name: duplicate cue name "edge"/ },
  { name: 'species-region-sheet', text: scene((s) => (s.cues[0].species[0].region = 'src')), expect: /cues\[0\]\.species\[0\]\.region: region "src" is a sheet; expected box or ellipsoid or tube/ },
  { name: 'source-edit-on-species', text: scene(() => {}), args: ['--perturb', '{"op":"source","cue":"wa","position":[1,1,1]}'],
    expect: /--perturb\[0\]\.cue: "wa" is a species of border cue "edge"; "source" moves point cues only/ },
];

describe('malformed border scenes exit 2 naming the JSON path', () => {
  for (const c of cases) {
    it(c.name, () => {
      const file = join(tmp.dir, 'bad.json');
      writeFileSync(file, c.text);
      const r = cli(['run', file, '--out', join(tmp.dir, 'out-' + c.name), '--quiet', ...(c.args ?? [])]);
      expect(r.stderr).toMatch(c.expect);
      expect(r.code).toBe(2);
      expect(r.stderr).not.toMatch(/\n\s+at /);
      expect(r.stdout).toBe('');
    });
  }
  it('the well-formed base scene runs', () => {
    const file = join(tmp.dir, 'good.json');
    writeFileSync(file, scene(() => {}));
    const r = cli(['run', file, '--out', join(tmp.dir, 'out-good'), '--quiet', '--steps', '5']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
  });
});
