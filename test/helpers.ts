// Shared test helpers: temporary folders, running the CLI in a child process, scene builders.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { spawnSync } from 'node:child_process';

export const ROOT = resolve(import.meta.dirname, '..');

export function tempDir(prefix = 'axonloom-test-'): { dir: string; cleanup: () => void } {
  const dir = mkdtempSync(join(tmpdir(), prefix));
  return { dir, cleanup: () => rmSync(dir, { recursive: true, force: true }) };
}

/** Runs `axonloom ARGS` as a user would, from the repository root. */
export function cli(args: string[], opts: { cwd?: string; input?: string; timeout?: number } = {}) {
  const r = spawnSync(process.execPath, [join(ROOT, 'bin/axonloom.js'), ...args], {
    cwd: opts.cwd ?? ROOT, encoding: 'utf8', input: opts.input, timeout: opts.timeout ?? 120_000,
  });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** The minimal one-source scene every consumer of the format relies on (issue text, verbatim). */
export const ONE_SOURCE = {
  name: 'one-source', seed: 7,
  volume: { size: [600, 600, 600], voxel: 10 },
  cues: [{ name: 'attractant-1', kind: 'point', position: [300, 300, 300], diffusion: 50, decay: 0.0005, rate: 2.0 }],
};

/** A small scene with one population on a sheet and no cues: a pure random walk. */
export function walkScene(over: { count?: number; steps?: number; kappa?: number; seed?: number } = {}) {
  return {
    name: 'walk', seed: over.seed ?? 11,
    volume: { size: [4000, 4000, 4000], voxel: 100 },
    growth: { dt: 0.25, steps: over.steps ?? 50, frameEvery: 1, wallWeight: 0, stallSteps: 100000 },
    regions: [{ name: 'src', shape: 'sheet', origin: [1900, 1900, 2000], uAxis: [200, 0, 0], vAxis: [0, 200, 0] }],
    cues: [],
    populations: [{ name: 'p', count: over.count ?? 500, source: 'src', kappa: over.kappa ?? 10, speed: 40 }],
  };
}
