// `axonloom compare`: every run is written, compare.json/csv agree with the runs' own
// run.json metrics (a mean is a mean; a paired mean difference of complete pairs is the
// difference of the means), the plot is written, and usage errors exit 2 with one line
// (command-line convention, common practice, no source).
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { readFileSync, existsSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { cli, ROOT, tempDir } from '../helpers.ts';
import { parseCsvObjects } from '../../engine/io/csv.ts';
import { MAP_METRIC_KEYS } from '../../engine/map/metrics.ts';

const tmp = tempDir('axonloom-compare-');
afterAll(() => tmp.cleanup());
const MAP = join(ROOT, 'scenes/map.json');
const out = join(tmp.dir, 'cmp');
let result: ReturnType<typeof cli>;

beforeAll(() => {
  result = cli(['compare', MAP, '--variants', 'normal,knockin', '--seeds', '2', '--axons', '60', '--out', out]);
});

describe('axonloom compare', () => {
  it('runs every variant over every seed and prints a table', () => {
    expect(result.code, result.stderr).toBe(0);
    expect(result.stderr).toMatch(/compare: 4\/4 runs done/);
    for (const key of MAP_METRIC_KEYS) expect(result.stdout).toContain(key);
    expect(result.stdout).toMatch(/difference from normal/);
    const seeds = JSON.parse(readFileSync(join(out, 'compare.json'), 'utf8')).seeds;
    expect(seeds).toHaveLength(2);
    for (const v of ['normal', 'knockin']) for (const s of seeds) expect(existsSync(join(out, v, `seed-${s}`, 'run.json'))).toBe(true);
  });
  it('compare.json: per variant and metric the mean over its runs, an interval around it, the paired difference from the first', () => {
    const c = JSON.parse(readFileSync(join(out, 'compare.json'), 'utf8'));
    expect(c.variants).toEqual(['normal', 'knockin']);
    const runMean = (v: string, key: string) => {
      const xs = c.runs[v].map((r: { dir: string }) => JSON.parse(readFileSync(join(out, r.dir, 'run.json'), 'utf8')).metrics.map[key]);
      return xs.reduce((a: number, b: number) => a + b, 0) / xs.length;
    };
    for (const key of MAP_METRIC_KEYS) {
      for (const v of c.variants) {
        const m = c.summary[v][key];
        expect(m.n).toBe(2);
        expect(m.mean).toBeCloseTo(runMean(v, key), 10);
        expect(m.ci95[0]).toBeLessThanOrEqual(m.mean + 1e-12);
        expect(m.ci95[1]).toBeGreaterThanOrEqual(m.mean - 1e-12);
      }
      expect(c.summary.normal[key].diff).toBeNull();
      expect(c.summary.knockin[key].diff.mean).toBeCloseTo(runMean('knockin', key) - runMean('normal', key), 10);
    }
    // the knock-in duplicates the map (Brown et al., Cell 102, 2000)
    expect(c.summary.knockin.duplicationIndex.diff.mean).toBeGreaterThan(0);
  });
  it('compare.csv: one row per variant and metric, the same numbers as compare.json', () => {
    const rows = parseCsvObjects(readFileSync(join(out, 'compare.csv'), 'utf8'));
    const c = JSON.parse(readFileSync(join(out, 'compare.json'), 'utf8'));
    expect(rows).toHaveLength(2 * MAP_METRIC_KEYS.length);
    for (const r of rows) {
      const m = c.summary[r.variant][r.metric];
      expect(Number(r.mean)).toBeCloseTo(m.mean, 10);
      expect(Number(r.ci95_low)).toBeCloseTo(m.ci95[0], 10);
      expect(r.diff_from_normal === '' ? null : Number(r.diff_from_normal)).toEqual(m.diff === null ? null : expect.closeTo(m.diff.mean, 10));
    }
  });
  it('compare.svg: one column per variant, both axes labelled with the sheets’ own axis names', () => {
    const svg = readFileSync(join(out, 'compare.svg'), 'utf8');
    expect(svg.startsWith('<svg xmlns="http://www.w3.org/2000/svg"')).toBe(true);
    expect(svg.trimEnd().endsWith('</svg>')).toBe(true);
    for (const s of ['>normal<', '>knockin<', 'source u (outer→inner)', 'target u (head→tail)', 'knock-in axons', 'expected map']) expect(svg).toContain(s);
  });
  it('usage errors exit 2 with one line', () => {
    const noVariants = join(tmp.dir, 'no-variants.json');
    const plain = JSON.parse(readFileSync(MAP, 'utf8'));
    delete plain.variants;
    writeFileSync(noVariants, JSON.stringify(plain));
    for (const args of [
      ['compare', MAP, '--variants', 'normal,knockon'],
      ['compare', MAP, '--seeds', '0'],
      ['compare'],
      ['compare', MAP, '--variants', 'normal,,knockin'],
      ['compare', noVariants], // no variants
    ]) {
      const r = cli(args);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.stderr.trim().split('\n'), args.join(' ')).toHaveLength(1);
    }
    expect(cli(['compare', MAP, '--variants', 'normal,knockon']).stderr).toMatch(/no variant named "knockon" in scene "map" \(there are: normal, knockin, knockout, flattened\)/);
  });
});
