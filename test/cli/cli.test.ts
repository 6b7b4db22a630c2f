// Command-line conventions (common practice, no source): --help exits 0, usage errors exit 2
// with one line, success 0.
import { describe, it, expect } from 'vitest';
import { cli } from '../helpers.ts';

describe('axonloom command line', () => {
  it('lists commands and every one has --help', () => {
    const r = cli(['--help']);
    expect(r.code).toBe(0);
    const names = [...r.stdout.matchAll(/^  (\w+) /gm)].map((m) => m[1]);
    expect(names).toEqual(expect.arrayContaining(['run', 'probe']));
    for (const n of names) {
      const h = cli([n, '--help']);
      expect(h.code, n).toBe(0);
      expect(h.stdout, n).toMatch(/^Usage: axonloom /);
    }
  });
  it('unknown command, unknown option and a missing scene exit 2 with one line', () => {
    for (const args of [['frobnicate'], ['run', 'scenes/demo.json', '--sped', '3'], ['run', 'nope.json'], ['run'], ['probe', 'scenes/demo.json', '--cue', 'glimmerin', '--at', '1,2']]) {
      const r = cli(args);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.stderr.trim().split('\n').length, args.join(' ')).toBe(1);
    }
  });
});
