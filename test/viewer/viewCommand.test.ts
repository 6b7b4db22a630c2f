// `axonloom view`: checks the run and the build before serving, serves on 127.0.0.1, stops
// cleanly on Ctrl-C (SIGINT). Run as a child process, as a person would run it.
import { describe, it, expect, beforeAll } from 'vitest';
import { spawn, spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { makeRun } from '../fixtures/makeRun.ts';

const ROOT = resolve(import.meta.dirname, '../..');
const BIN = join(ROOT, 'bin', 'axonloom.js');
let base: string, viewer: string;

beforeAll(() => {
  base = mkdtempSync(join(tmpdir(), 'axl-viewcmd-'));
  viewer = join(base, 'viewer');
  mkdirSync(viewer);
  writeFileSync(join(viewer, 'index.html'), '<!doctype html><title>stand-in viewer</title>');
  makeRun(join(base, 'runs', 'fx'), { axons: 20, frames: 6 });
  makeRun(join(base, 'runs', 'other'), { axons: 20, frames: 6 });
  makeRun(join(base, 'runs', 'cut'), { axons: 20, frames: 6, truncateFramesBy: 10 });
});

const run = (args: string[], env: Record<string, string> = {}) =>
  spawnSync(process.execPath, [BIN, 'view', ...args], { encoding: 'utf8', env: { ...process.env, AXONLOOM_VIEWER_DIR: viewer, ...env } });

describe('axonloom view', () => {
  it('--check reads the run, finds the build and says what it would serve', () => {
    const r = run([join(base, 'runs', 'fx'), '--check', '--port', '7999']);
    expect(r.status).toBe(0);
    expect(r.stdout).toContain('20 axons, 6 frames');
    expect(r.stdout).toContain('ok: would serve http://127.0.0.1:7999/?run=fx (and 2 other runs beside it)');
  });

  it('refuses a damaged run, a missing build and bad options with clear messages', () => {
    const cut = run([join(base, 'runs', 'cut'), '--check']);
    expect(cut.status).toBe(1);
    expect(cut.stderr).toMatch(/frames\.npy is truncated/);
    const nobuild = run([join(base, 'runs', 'fx'), '--check'], { AXONLOOM_VIEWER_DIR: join(base, 'nowhere') });
    expect(nobuild.status).toBe(1);
    expect(nobuild.stderr).toMatch(/the viewer is not built .*npx vite build/);
    expect(run([join(base, 'runs', 'fx'), '--port', 'x']).status).toBe(2);
    expect(run([join(base, 'nothing')]).stderr).toMatch(/no such run directory/);
    expect(run([]).status).toBe(2);
  });

  it('serves on 127.0.0.1, prints the URL, and stops on SIGINT', async () => {
    const child = spawn(process.execPath, [BIN, 'view', join(base, 'runs', 'fx'), '--port', '0'], { env: { ...process.env, AXONLOOM_VIEWER_DIR: viewer } });
    let out = '';
    const url = await new Promise<string>((ok, fail) => {
      child.stdout.on('data', (d) => {
        out += d;
        const m = /viewer: (http:\/\/127\.0\.0\.1:\d+\/\?run=fx)/.exec(out);
        if (m) ok(m[1]);
      });
      child.on('exit', () => fail(new Error(`exited early: ${out}`)));
    });
    const origin = new URL(url).origin;
    expect((await fetch(`${origin}/`)).status).toBe(200);
    const m = await (await fetch(`${origin}/runs/fx/run.json`)).json();
    expect(m.axons).toBe(20);
    const code = await new Promise<number | null>((ok) => {
      child.on('exit', (c) => ok(c));
      child.kill('SIGINT');
    });
    expect(code).toBe(0);
  });
});
