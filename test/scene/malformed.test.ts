// Malformed scenes: every one exits 2 with the file, the JSON path and the reason on one line,
// and no stack trace. (Error wording is ours; the requirement that user mistakes name the
// offending field is common practice, no source.)
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { cli, tempDir, ONE_SOURCE } from '../helpers.ts';

const tmp = tempDir();
afterAll(() => tmp.cleanup());

function scene(mutate: (s: any) => void): string {
  const s = structuredClone(ONE_SOURCE) as any;
  mutate(s);
  return JSON.stringify(s, null, 2);
}

const cases: { name: string; text: string; expect: RegExp }[] = [
  { name: 'negative-decay', text: scene((s) => (s.cues[0].decay = -3)), expect: /^bad\.json: cues\[0\]\.decay: must be > 0 \(got -3\)$/m },
  { name: 'wrong-type', text: scene((s) => (s.cues[0].rate = 'fast')), expect: /cues\[0\]\.rate: must be a number \(got "fast"\)/ },
  { name: 'unknown-key', text: scene((s) => (s.cues[0].difusion = 5)), expect: /cues\[0\]\.difusion: unknown key \(did you mean "diffusion"\?\)/ },
  { name: 'unknown-top-key', text: scene((s) => (s.popultions = [])), expect: /popultions: unknown key \(did you mean "populations"\?\)/ },
  { name: 'missing-name', text: scene((s) => delete s.cues[0].name), expect: /cues\[0\]\.name: is required/ },
  { name: 'duplicate-cue', text: scene((s) => s.cues.push({ ...s.cues[0] })), expect: /cues\[1\]\.name: duplicate cue name "attractant-1"/ },
  { name: 'empty', text: '', expect: /bad\.json: file is empty/ },
  { name: 'bad-json', text: '{\n  "name": "x",\n  "seed": 7,,\n}', expect: /invalid JSON at line 3, column 13/ },
  { name: 'absurd-size', text: scene((s) => (s.volume = { size: [1e6, 1e6, 1e6], voxel: 1 })), expect: /volume\.voxel: gives a grid of .* nodes, more than/ },
  { name: 'bad-kind', text: scene((s) => (s.cues[0].kind = 'pointy')), expect: /cues\[0\]\.kind: must be one of "point", "region", "expressed", "relay"(, "[a-z]+")* \(got "pointy"\)/ },
  { name: 'outside-volume', text: scene((s) => (s.cues[0].position = [300, 900, 300])), expect: /cues\[0\]\.position\[1\]: must lie inside the volume \[0, 600\] \(got 900\)/ },
  { name: 'bad-reference', text: scene((s) => { s.regions = [{ name: 'sheetA', shape: 'sheet', origin: [0, 0, 0], uAxis: [100, 0, 0], vAxis: [0, 100, 0] }]; s.populations = [{ name: 'p', count: 10, source: 'sheetB' }]; }), expect: /populations\[0\]\.source: no region named "sheetB" \(did you mean "sheetA"\?\)/ },
  { name: 'negative-rate', text: scene((s) => (s.cues[0].rate = -1)), expect: /cues\[0\]\.rate: must be >= 0 \(got -1\)/ },
  { name: 'short-vector', text: scene((s) => (s.cues[0].position = [1, 2])), expect: /cues\[0\]\.position/ },
];

describe('malformed scenes exit 2 naming the JSON path', () => {
  for (const c of cases) {
    it(c.name, () => {
      const file = join(tmp.dir, 'bad.json');
      writeFileSync(file, c.text);
      const r = cli(['run', file, '--out', join(tmp.dir, 'out-' + c.name), '--quiet']);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(c.expect);
      expect(r.stderr).not.toMatch(/\n\s+at /); // no stack trace
      expect(r.stdout).toBe('');
    });
  }
});

describe('the minimal one-source scene', () => {
  let file: string;
  beforeAll(() => {
    file = join(tmp.dir, 'one.json');
    writeFileSync(file, JSON.stringify(ONE_SOURCE));
  });
  it('is valid and probe-able', () => {
    const r = cli(['probe', file, '--cue', 'attractant-1', '--at', '300,300,400']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const line = JSON.parse(r.stdout.trim());
    expect(line.cue).toBe('attractant-1');
    expect(line.at).toEqual([300, 300, 400]);
  });
  it('an unknown cue in probe exits 2 naming the cues that exist', () => {
    const r = cli(['probe', file, '--cue', 'nope', '--at', '1,2,3']);
    expect(r.code).toBe(2);
    expect(r.stderr.trim()).toBe('axonloom: probe: no cue named "nope" (cues: attractant-1)');
  });
});
