import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { RunDirectory } from '../../engine/io/runDir.ts';
import { NpyStreamWriter } from '../../engine/io/npyFileWriter.ts';
import { decodeNpy } from '../../engine/io/npy.ts';
import { RUN_FILES, isRunDirName } from '../../engine/io/runFormat.ts';

// What is checked: a directory named like a run only ever appears whole (rename(2) of a
// directory within one file system is atomic, POSIX), a crash leaves only a dot-named
// ".partial-" sibling that run listings skip, and replacing a run leaves no stray siblings.

const root = mkdtempSync(join(tmpdir(), 'axonloom-rundir-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

let k = 0;
function fresh(): string {
  const d = join(root, `case${k++}`);
  mkdirSync(d);
  return d;
}

describe('RunDirectory', () => {
  it('writes into a hidden sibling and appears under its name only on commit', () => {
    const runs = fresh();
    const final = join(runs, 'demo');
    const rd = RunDirectory.begin(final);
    expect(rd.tmpDir.startsWith(join(runs, '.demo.partial-'))).toBe(true);
    expect(rd.tmpDir).toMatch(new RegExp(`\\.partial-${process.pid}-[0-9a-f]{8}$`));
    rd.writeJson('axons-meta.json', { a: 1 });
    rd.writeText(RUN_FILES.axons, 'id\n0\n');
    rd.writeBinary('fields/cue.npy', new Uint8Array([1, 2, 3]));
    expect(existsSync(final)).toBe(false);
    expect(readdirSync(runs).filter(isRunDirName)).toEqual([]);
    rd.writeJson(RUN_FILES.manifest, { format: 'axonloom-run' });
    rd.commit();
    expect(readdirSync(runs)).toEqual(['demo']);
    expect(JSON.parse(readFileSync(join(final, RUN_FILES.manifest), 'utf8'))).toEqual({ format: 'axonloom-run' });
    expect(JSON.parse(readFileSync(join(final, 'axons-meta.json'), 'utf8'))).toEqual({ a: 1 });
    expect(readFileSync(join(final, RUN_FILES.axons), 'utf8')).toBe('id\n0\n');
    expect([...readFileSync(join(final, 'fields/cue.npy'))]).toEqual([1, 2, 3]);
    expect(() => rd.writeText('late.txt', 'x')).toThrow(/already committed/);
  });

  it('carries files that other writers open through path(), e.g. a streamed frames.npy', () => {
    const runs = fresh();
    const rd = RunDirectory.begin(join(runs, 'r'));
    const w = new NpyStreamWriter(rd.path(RUN_FILES.frames), '<f4', [2, 3], 10);
    w.append(new Float32Array(6).fill(1.5));
    w.close();
    rd.writeJson(RUN_FILES.manifest, {});
    rd.commit();
    const a = decodeNpy(readFileSync(join(runs, 'r', RUN_FILES.frames)));
    expect(a.shape).toEqual([1, 2, 3]);
  });

  it('replaces a previous run whole and leaves no siblings behind', () => {
    const runs = fresh();
    const final = join(runs, 'demo');
    const first = RunDirectory.begin(final);
    first.writeJson(RUN_FILES.manifest, { n: 1 });
    first.writeText('only-in-first.txt', 'old');
    first.commit();

    const second = RunDirectory.begin(final);
    second.writeJson(RUN_FILES.manifest, { n: 2 });
    // While the second is being written, the first is still there, untouched.
    expect(JSON.parse(readFileSync(join(final, RUN_FILES.manifest), 'utf8'))).toEqual({ n: 1 });
    second.commit();
    expect(readdirSync(runs)).toEqual(['demo']);
    expect(JSON.parse(readFileSync(join(final, RUN_FILES.manifest), 'utf8'))).toEqual({ n: 2 });
    expect(existsSync(join(final, 'only-in-first.txt'))).toBe(false);
  });

  it('will not commit without run.json, and abort removes everything', () => {
    const runs = fresh();
    const rd = RunDirectory.begin(join(runs, 'x'));
    rd.writeText('a.txt', 'a');
    expect(() => rd.commit()).toThrow(/run\.json was never written/);
    expect(existsSync(join(runs, 'x'))).toBe(false);
    rd.abort();
    expect(readdirSync(runs)).toEqual([]);
    rd.abort(); // idempotent
  });

  it('refuses paths that leave the directory', () => {
    const rd = RunDirectory.begin(join(fresh(), 'x'));
    expect(() => rd.path('../escape.txt')).toThrow(/leaves the run directory/);
    expect(() => rd.path('fields/../../escape.txt')).toThrow(/leaves the run directory/);
    expect(() => rd.path('/etc/passwd')).toThrow(/must be relative/);
    expect(() => rd.path('.')).toThrow(/leaves/);
    expect(rd.path('fields/a.npy')).toBe(join(rd.tmpDir, 'fields', 'a.npy'));
    rd.abort();
  });

  it('refuses to replace a folder that is not a run, before any work is done', () => {
    const runs = fresh();
    const notARun = join(runs, 'docs');
    mkdirSync(notARun);
    writeFileSync(join(notARun, 'thesis.tex'), 'precious');
    expect(() => RunDirectory.begin(notARun)).toThrow(/refusing to replace .*docs.*not a run/);
    writeFileSync(join(runs, 'file'), 'x');
    expect(() => RunDirectory.begin(join(runs, 'file'))).toThrow(/not a directory/);
    expect(readFileSync(join(notARun, 'thesis.tex'), 'utf8')).toBe('precious');
    // An empty folder may be used.
    mkdirSync(join(runs, 'empty'));
    const rd = RunDirectory.begin(join(runs, 'empty'));
    rd.writeJson(RUN_FILES.manifest, {});
    rd.commit();
    expect(readdirSync(join(runs, 'empty'))).toEqual([RUN_FILES.manifest]);
  });

  it('creates missing parent folders', () => {
    const final = join(fresh(), 'a', 'b', 'run');
    const rd = RunDirectory.begin(final);
    rd.writeJson(RUN_FILES.manifest, {});
    rd.commit();
    expect(existsSync(join(final, RUN_FILES.manifest))).toBe(true);
  });

  it('a process that dies before commit leaves only a .partial- directory, never the run', () => {
    const runs = fresh();
    const final = join(runs, 'crashed');
    const script = join(runs, 'crash.ts');
    const mod = resolve('engine/io/runDir.ts');
    writeFileSync(
      script,
      `import { RunDirectory } from ${JSON.stringify(mod)};
const rd = RunDirectory.begin(${JSON.stringify(final)});
rd.writeJson('run.json', { half: true });
rd.writeText('axons.csv', 'id\\n');
process.exit(3); // killed mid-run: no commit, no abort
`,
    );
    const r = spawnSync(process.execPath, ['--import', 'tsx', script], { encoding: 'utf8' });
    expect(r.stderr).toBe('');
    expect(r.status).toBe(3);
    const names = readdirSync(runs).filter((n) => n !== 'crash.ts');
    expect(existsSync(final)).toBe(false);
    expect(names).toHaveLength(1);
    expect(names[0]).toMatch(/^\.crashed\.partial-\d+-[0-9a-f]{8}$/);
    expect(names.filter(isRunDirName)).toEqual([]);
  });
});
