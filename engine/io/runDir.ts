// An atomic run directory (Node only). Everything of a run is written into a hidden sibling
// ".<name>.partial-<pid>-<rand>" and only renamed to <name> once complete and fsynced, so a
// directory named like a run is always a whole run: a crash, a kill or an exception leaves a
// dot-named partial directory, which readers skip (isRunDirName in runFormat.ts).
//
// Replacing an existing run: a directory cannot be renamed over a non-empty one (rename(2)
// fails with ENOTEMPTY, POSIX), so the old run is first renamed aside to ".<name>.replaced-…",
// the new one renamed in, then the old one removed. The final name is therefore absent only
// between two back-to-back renames in the same directory; the old run still exists, whole,
// under its aside name during that instant. Node has no portable exchange-rename to close it.

import { randomBytes } from 'node:crypto';
import { closeSync, existsSync, fsyncSync, mkdirSync, openSync, readdirSync, renameSync, rmSync, statSync, writeSync } from 'node:fs';
import { basename, dirname, isAbsolute, join, relative, resolve } from 'node:path';
import { RUN_FILES } from './runFormat.ts';

export class RunDirectory {
  /** Where the run will be once committed (absolute). */
  readonly finalDir: string;
  /** Where files are written until then (absolute, a sibling of finalDir). */
  readonly tmpDir: string;
  private state: 'open' | 'committed' | 'aborted' = 'open';

  private constructor(finalDir: string, tmpDir: string) {
    this.finalDir = finalDir;
    this.tmpDir = tmpDir;
  }

  /** Creates the temporary sibling directory (and finalDir's parent if needed). Fails early if
   *  finalDir exists but is not something a run may replace (see commit). */
  static begin(finalDir: string): RunDirectory {
    const final = resolve(finalDir);
    assertReplaceable(final);
    const parent = dirname(final);
    mkdirSync(parent, { recursive: true });
    const tmp = join(parent, siblingName(basename(final), 'partial'));
    mkdirSync(tmp); // not recursive: an existing directory of that random name is an error
    return new RunDirectory(final, tmp);
  }

  /** Absolute path of `rel` inside the temporary directory, creating its parent folders, for
   *  writers that open files themselves (e.g. NpyStreamWriter). */
  path(rel: string): string {
    this.assertOpen();
    if (isAbsolute(rel)) throw new Error(`run file path must be relative, got '${rel}'`);
    const abs = resolve(this.tmpDir, rel);
    const inside = relative(this.tmpDir, abs);
    if (inside === '' || inside.startsWith('..') || isAbsolute(inside)) {
      throw new Error(`run file path '${rel}' leaves the run directory`);
    }
    mkdirSync(dirname(abs), { recursive: true });
    return abs;
  }

  writeJson(rel: string, obj: unknown): void {
    this.writeText(rel, JSON.stringify(obj, null, 2) + '\n');
  }

  writeText(rel: string, text: string): void {
    this.writeBinary(rel, new TextEncoder().encode(text));
  }

  writeBinary(rel: string, bytes: Uint8Array): void {
    const fd = openSync(this.path(rel), 'w');
    try {
      let done = 0;
      while (done < bytes.byteLength) done += writeSync(fd, bytes, done, bytes.byteLength - done);
      fsyncSync(fd);
    } finally {
      closeSync(fd);
    }
  }

  /** Fsyncs every file and folder written, then moves the directory to finalDir, replacing a
   *  previous run there. Requires run.json: a run is complete only once its manifest exists. */
  commit(): void {
    this.assertOpen();
    if (!existsSync(join(this.tmpDir, RUN_FILES.manifest))) {
      throw new Error(`cannot commit ${this.finalDir}: ${RUN_FILES.manifest} was never written`);
    }
    fsyncTree(this.tmpDir);
    const parent = dirname(this.finalDir);
    assertReplaceable(this.finalDir);
    if (existsSync(this.finalDir)) {
      const aside = join(parent, siblingName(basename(this.finalDir), 'replaced'));
      renameSync(this.finalDir, aside);
      try {
        renameSync(this.tmpDir, this.finalDir);
      } catch (err) {
        renameSync(aside, this.finalDir); // put the old run back; the new one stays partial
        throw err;
      }
      fsyncDir(parent);
      this.state = 'committed';
      try {
        rmSync(aside, { recursive: true, force: true });
      } catch {
        // The new run is in place; a leftover dot-named aside folder is harmless (listings skip
        // it), and failing the commit now would report a good run as lost.
      }
    } else {
      renameSync(this.tmpDir, this.finalDir);
      fsyncDir(parent);
      this.state = 'committed';
    }
  }

  /** Removes the temporary directory and everything in it. Safe to call more than once, and
   *  after a failed commit; does nothing after a successful one. */
  abort(): void {
    if (this.state !== 'open') return;
    rmSync(this.tmpDir, { recursive: true, force: true });
    this.state = 'aborted';
  }

  private assertOpen(): void {
    if (this.state !== 'open') throw new Error(`run directory for ${this.finalDir} is already ${this.state}`);
  }
}

// --- private helpers ---

function siblingName(name: string, kind: 'partial' | 'replaced'): string {
  return `.${name}.${kind}-${process.pid}-${randomBytes(4).toString('hex')}`;
}

/** A run may replace nothing, an empty folder or a previous run (a folder with run.json).
 *  Anything else (a file, a folder of other things) is refused: the replace deletes it. */
function assertReplaceable(final: string): void {
  if (!existsSync(final)) return;
  const st = statSync(final);
  if (!st.isDirectory()) throw new Error(`cannot write a run to ${final}: it exists and is not a directory`);
  const entries = readdirSync(final);
  if (entries.length > 0 && !entries.includes(RUN_FILES.manifest)) {
    throw new Error(`refusing to replace ${final}: it is not empty and holds no ${RUN_FILES.manifest}, so it is not a run`);
  }
}

function fsyncTree(dir: string): void {
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, entry.name);
    if (entry.isDirectory()) fsyncTree(p);
    else if (entry.isFile()) fsyncPath(p);
  }
  fsyncDir(dir);
}

function fsyncPath(p: string): void {
  const fd = openSync(p, 'r');
  try {
    fsyncSync(fd);
  } finally {
    closeSync(fd);
  }
}

// Fsyncing a directory makes the names in it durable (Linux, macOS); Windows cannot open a
// directory for it, and there the rename itself is what it is.
function fsyncDir(dir: string): void {
  try {
    fsyncPath(dir);
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    if (code !== 'EISDIR' && code !== 'EPERM' && code !== 'EINVAL' && code !== 'EACCES') throw err;
  }
}
