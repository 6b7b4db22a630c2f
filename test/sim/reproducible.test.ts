// Runs are reproducible from a seed: same seed → byte-identical frames.npy; another seed →
// different (common practice, no source). numpy reads frames.npy with the shape the manifest
// states (NPY 1.0 as numpy.lib.format defines it), checked with Debian's python3-numpy.
import { describe, it, expect, afterAll } from 'vitest';
import { readFileSync, existsSync, writeFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { spawnSync, spawn } from 'node:child_process';
import { cli, tempDir, walkScene, ROOT } from '../helpers.ts';

const tmp = tempDir();
afterAll(() => tmp.cleanup());
const demo = join(ROOT, 'scenes/demo.json');

describe('run store', () => {
  it('same seed gives byte-identical frames; another seed differs', () => {
    const a = join(tmp.dir, 'a'), b = join(tmp.dir, 'b'), c = join(tmp.dir, 'c');
    for (const [out, seed] of [[a, '3'], [b, '3'], [c, '4']]) {
      const r = cli(['run', demo, '--axons', '300', '--steps', '60', '--seed', seed, '--out', out, '--quiet']);
      expect(r.stderr).toBe('');
      expect(r.code).toBe(0);
    }
    const fa = readFileSync(join(a, 'frames.npy')), fb = readFileSync(join(b, 'frames.npy')), fc = readFileSync(join(c, 'frames.npy'));
    expect(fa.equals(fb)).toBe(true);
    expect(fa.equals(fc)).toBe(false);
    expect(readFileSync(join(a, 'axons.csv'), 'utf8')).toBe(readFileSync(join(b, 'axons.csv'), 'utf8'));
  });

  it('numpy.load reads frames.npy with [frames, axons, 3] float32 and the manifest agrees', () => {
    const out = join(tmp.dir, 'np');
    const r = cli(['run', demo, '--axons', '250', '--steps', '40', '--out', out, '--quiet', '--swc']);
    expect(r.code).toBe(0);
    const manifest = JSON.parse(readFileSync(join(out, 'run.json'), 'utf8'));
    const py = spawnSync('/usr/bin/python3', ['-c', [
      'import numpy, sys, json',
      `a = numpy.load(${JSON.stringify(join(out, 'frames.npy'))})`,
      'print(json.dumps({"dtype": str(a.dtype), "shape": list(a.shape), "x0": float(a[0, 0, 0])}))',
    ].join('\n')], { encoding: 'utf8' });
    expect(py.stderr).toBe('');
    const got = JSON.parse(py.stdout);
    expect(got.dtype).toBe('float32');
    expect(got.shape).toEqual([manifest.frames, 250, 3]);
    expect(manifest.frames).toBe(21); // frame 0 and every 2nd of 40 steps
    const csv = readFileSync(join(out, 'axons.csv'), 'utf8').trim().split('\n');
    expect(csv.length).toBe(251);
    expect(csv[0].split(',')).toEqual(expect.arrayContaining(['id', 'source_u', 'source_v', 'receptor_GlimR', 'end_x', 'end_y', 'end_z', 'status', 'steps', 'path_length_um']));
    expect(existsSync(join(out, 'axons.swc'))).toBe(true);
    for (const f of manifest.fields) expect(existsSync(join(out, f.file))).toBe(true);
  });

  it('Ctrl-C writes what was computed, marked interrupted, and leaves no partial directory', async () => {
    const scene = join(tmp.dir, 'long.json');
    // a wide volume and a tortuous walk, so no axon leaves before the interrupt
    const long = walkScene({ count: 2000, steps: 90000, kappa: 5 }) as any;
    long.volume = { size: [100000, 100000, 100000], voxel: 2000 };
    long.regions[0].origin = [50000, 50000, 50000];
    writeFileSync(scene, JSON.stringify(long));
    const out = join(tmp.dir, 'runs', 'long');
    const child = spawn(process.execPath, [join(ROOT, 'bin/axonloom.js'), 'run', scene, '--out', out, '--quiet'], { cwd: ROOT });
    let stderr = '';
    child.stderr.on('data', (d) => (stderr += d));
    const exited = new Promise((r) => child.on('exit', r));
    await new Promise((r) => setTimeout(r, 3000));
    child.kill('SIGINT');
    const code = await exited;
    expect(stderr).toMatch(/interrupted/);
    expect(code).toBe(130);
    const manifest = JSON.parse(readFileSync(join(out, 'run.json'), 'utf8'));
    expect(manifest.status).toBe('interrupted');
    expect(manifest.stepsRun).toBeLessThan(90000);
    expect(manifest.statusCounts.interrupted).toBe(2000);
    const npy = readFileSync(join(out, 'frames.npy'));
    expect(npy.length).toBeGreaterThan(manifest.frames * 2000 * 12); // header + data for every frame listed
    expect(readdirSync(join(tmp.dir, 'runs')).filter((n) => n.startsWith('.'))).toEqual([]);
  });
});
