// Streaming NPY writer for an array whose leading dimension grows while the engine runs
// (frames.npy: one [axons, 3] block per recorded frame). Node only.
//
// The header is written first with the largest shape the run can reach, padded to a multiple of
// 64 bytes (NPY 1.0, numpy/lib/format.py). close() rewrites it in place, same length, with the
// count actually written. Until then the header claims more rows than the file holds, so a run
// killed mid-write leaves a file that decodeNpy reports as truncated rather than one that
// silently reads as shorter.

import { closeSync, fsyncSync, openSync, writeSync } from 'node:fs';
import { NPY_DTYPES, NpyError, dtypeOf, elementCount, npyHeader, type NpyDtype, type NpyTypedArray } from './npy.ts';

export class NpyStreamWriter {
  readonly path: string;
  readonly dtype: NpyDtype;
  readonly innerShape: readonly number[];
  readonly maxLeading: number;

  private fd: number | null;
  private readonly headerBytes: number;
  private readonly rowElements: number;
  private rows = 0;
  private position: number; // byte offset of the next append

  /** Creates (or truncates) `path` and writes a header sized for [maxLeading, ...innerShape]. */
  constructor(path: string, dtype: NpyDtype, innerShape: number[], maxLeading: number) {
    if (!Number.isSafeInteger(maxLeading) || maxLeading < 0) {
      throw new NpyError(`maxLeading must be a non-negative integer, got ${maxLeading}`);
    }
    this.path = path;
    this.dtype = dtype;
    this.innerShape = innerShape.slice();
    this.maxLeading = maxLeading;
    this.rowElements = elementCount(innerShape);
    const header = npyHeader(dtype, [maxLeading, ...innerShape]);
    this.headerBytes = header.length;
    this.fd = openSync(path, 'w');
    writeAll(this.fd, header, 0);
    this.position = header.length;
  }

  /** Rows written so far. */
  get count(): number {
    return this.rows;
  }

  /** Appends whole rows: `rows.length` must be a multiple of the inner shape's element count. */
  append(rows: NpyTypedArray): void {
    const fd = this.openFd();
    if (dtypeOf(rows) !== this.dtype) {
      throw new NpyError(`${this.path}: appending ${dtypeOf(rows)} data to a ${this.dtype} array`);
    }
    if (this.rowElements === 0 ? rows.length !== 0 : rows.length % this.rowElements !== 0) {
      throw new NpyError(`${this.path}: ${rows.length} values is not a whole number of rows of ${this.rowElements}`);
    }
    const added = this.rowElements === 0 ? 0 : rows.length / this.rowElements;
    if (this.rows + added > this.maxLeading) {
      throw new NpyError(`${this.path}: ${this.rows + added} rows exceed the ${this.maxLeading} reserved in the header`);
    }
    writeAll(fd, rows, this.position);
    this.position += rows.byteLength;
    this.rows += added;
  }

  /** Rewrites the header with the actual row count, fsyncs and closes. Returns the row count. */
  close(): number {
    const fd = this.openFd();
    const header = npyHeader(this.dtype, [this.rows, ...this.innerShape], this.headerBytes);
    writeAll(fd, header, 0);
    fsyncSync(fd);
    closeSync(fd);
    this.fd = null;
    return this.rows;
  }

  /** Bytes one row takes on disk. */
  get rowBytes(): number {
    return this.rowElements * NPY_DTYPES[this.dtype].bytes;
  }

  private openFd(): number {
    if (this.fd === null) throw new NpyError(`${this.path}: writer is already closed`);
    return this.fd;
  }
}

// writeSync may write fewer bytes than asked (rare on regular files, but allowed), so loop.
// Positional writes keep the header rewrite and the appends independent of the file pointer.
function writeAll(fd: number, data: NpyTypedArray, position: number): void {
  let done = 0;
  const total = data.byteLength;
  while (done < total) {
    done += writeSync(fd, data, done, total - done, position + done);
  }
}
