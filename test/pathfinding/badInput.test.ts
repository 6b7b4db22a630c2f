// Malformed corridors exit 2 with the file, the JSON path and the reason (the project's rule for
// user mistakes; naming the offending field is common practice, no source).
import { describe, it, expect, afterAll } from 'vitest';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { cli, tempDir } from '../helpers.ts';

const tmp = tempDir();
afterAll(() => tmp.cleanup());

const BASE = {
  name: 'bad-corridor', seed: 1,
  volume: { size: [300, 100, 100], voxel: 10 },
  regions: [
    { name: 'src', shape: 'sheet', origin: [20, 30, 30], uAxis: [0, 40, 0], vAxis: [0, 0, 40] },
    { name: 'via', shape: 'tube', from: [20, 50, 50], to: [280, 50, 50], radius: 15 },
    { name: 'slab', shape: 'box', min: [20, 40, 0], max: [280, 60, 100] },
  ],
  cues: [
    { name: 'lin', kind: 'lining', region: 'via', profile: { shape: 'linear' } },
    { name: 'sec', kind: 'region', region: 'slab', diffusion: 10, decay: 0.1, rate: 0.01 },
  ],
  populations: [{ name: 'p', count: 5, source: 'src', target: 'via', receptors: [{ name: 'R', binds: 'lin', kd: 1, response: 'attract' }] }],
};

function scene(mutate: (s: any) => void): string {
  const s = structuredClone(BASE) as any;
  mutate(s);
  return JSON.stringify(s);
}

const cases = [
  { name: 'tube-zero-width', text: scene((s) => (s.regions[1].radius = 0)), expect: /^bad\.json: regions\[1\]\.radius: must be > 0 \(got 0\)$/m },
  { name: 'slab-zero-width', text: scene((s) => (s.regions[2].max[1] = 40)), expect: /^bad\.json: regions\[2\]\.max\[1\]: must be greater than min\[1\] \(got 40 ≤ 40\)$/m },
  { name: 'lining-on-a-box', text: scene((s) => (s.cues[0].region = 'slab')), expect: /cues\[0\]\.region: region "slab" is a box; expected tube/ },
  { name: 'lining-across-the-tube', text: scene((s) => (s.cues[0].profile.axis = 'v')), expect: /cues\[0\]\.profile\.axis: must be "u" \(along the tube\)/ },
];

describe('malformed corridors exit 2 naming the JSON path', () => {
  for (const c of cases) {
    it(c.name, () => {
      const file = join(tmp.dir, 'bad.json');
      writeFileSync(file, c.text);
      const r = cli(['run', file, '--out', join(tmp.dir, 'out-' + c.name), '--quiet']);
      expect(r.stderr).toMatch(c.expect);
      expect(r.code).toBe(2);
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
