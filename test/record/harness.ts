// Plumbing for the recording tests and benchmark: a private viewer build, the `axonloom record`
// command as a child process, and Debian's ffprobe/ffmpeg as the outside judge of what was
// written (codec, size, frame count, decoded pixels).
import { spawn, spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { ROOT } from '../e2e/harness.ts';

/** Builds the viewer into test-output/<name> (its own folder, so parallel builds do not meet). */
export function buildRecordViewer(name = 'record-viewer'): string {
  const out = join(ROOT, 'test-output', name);
  const vite = join(ROOT, 'node_modules', 'vite', 'bin', 'vite.js');
  const r = spawnSync(process.execPath, [vite, 'build', '--outDir', out, '--emptyOutDir', '--logLevel', 'warn'], { cwd: ROOT, encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`vite build failed:\n${r.stdout}\n${r.stderr}`);
  return out;
}

export interface CliResult {
  status: number | null;
  stdout: string;
  stderr: string;
}

/** Runs `axonloom record ARGS` with the given viewer build. */
export function record(args: string[], viewerDir: string, env: Record<string, string> = {}): Promise<CliResult> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, [join(ROOT, 'bin', 'axonloom.js'), 'record', ...args], {
      cwd: ROOT, env: { ...process.env, AXONLOOM_VIEWER_DIR: viewerDir, ...env },
    });
    let stdout = '', stderr = '';
    child.stdout.on('data', (d) => (stdout += d));
    child.stderr.on('data', (d) => (stderr += d));
    child.on('error', reject);
    child.on('close', (status) => resolve({ status, stdout, stderr }));
  });
}

export interface VideoProbe {
  codec: string;
  width: number;
  height: number;
  /** frames counted by decoding the whole stream (ffprobe -count_frames) */
  frames: number;
  format: string;
  durationS: number;
}

/** What ffprobe reads from a video file. */
export function probeVideo(file: string): VideoProbe {
  const r = spawnSync('ffprobe', ['-v', 'error', '-count_frames', '-select_streams', 'v:0', '-show_entries', 'stream=codec_name,width,height,nb_read_frames',
    '-show_entries', 'format=format_name,duration', '-of', 'json', file], { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`ffprobe failed on ${file}: ${r.stderr}`);
  const j = JSON.parse(r.stdout) as { streams: { codec_name: string; width: number; height: number; nb_read_frames: string }[]; format: { format_name: string; duration: string } };
  const s = j.streams[0];
  return { codec: s.codec_name, width: s.width, height: s.height, frames: Number(s.nb_read_frames), format: j.format.format_name, durationS: Number(j.format.duration) };
}

/** Every decoded frame as RGB bytes (ffmpeg), width × height × 3 each. */
export function decodeFrames(file: string, width: number, height: number): Uint8Array[] {
  const r = spawnSync('ffmpeg', ['-v', 'error', '-i', file, '-f', 'rawvideo', '-pix_fmt', 'rgb24', '-'], { maxBuffer: 1 << 30 });
  if (r.status !== 0) throw new Error(`ffmpeg failed on ${file}: ${r.stderr}`);
  const size = width * height * 3, out: Uint8Array[] = [];
  for (let o = 0; o + size <= r.stdout.length; o += size) out.push(new Uint8Array(r.stdout.buffer, r.stdout.byteOffset + o, size));
  return out;
}

/** A PNG decoded to RGB bytes (ffmpeg), with its size. */
export function decodePng(file: string): { width: number; height: number; rgb: Uint8Array } {
  const p = spawnSync('ffprobe', ['-v', 'error', '-show_entries', 'stream=width,height', '-of', 'csv=p=0', file], { encoding: 'utf8' });
  const [width, height] = p.stdout.trim().split(',').map(Number);
  const r = spawnSync('ffmpeg', ['-v', 'error', '-i', file, '-f', 'rawvideo', '-pix_fmt', 'rgb24', '-'], { maxBuffer: 1 << 30 });
  if (r.status !== 0) throw new Error(`ffmpeg failed on ${file}: ${r.stderr}`);
  return { width, height, rgb: new Uint8Array(r.stdout.buffer, r.stdout.byteOffset, r.stdout.length) };
}

/** Share of pixels in the column range [x0, x1) whose colour differs by more than `tol` (sum
 *  over channels) between two RGB images of the same size. */
export function differingShare(a: Uint8Array, b: Uint8Array, width: number, height: number, x0 = 0, x1 = width, tol = 30): number {
  let n = 0;
  for (let y = 0; y < height; y++) for (let x = x0; x < x1; x++) {
    const i = (y * width + x) * 3;
    if (Math.abs(a[i] - b[i]) + Math.abs(a[i + 1] - b[i + 1]) + Math.abs(a[i + 2] - b[i + 2]) > tol) n++;
  }
  return n / (height * (x1 - x0));
}

/** Share of pixels in columns [x0, x1) that differ clearly from the darkest background. */
export function drawnShare(a: Uint8Array, width: number, height: number, x0 = 0, x1 = width): number {
  let n = 0;
  for (let y = 0; y < height; y++) for (let x = x0; x < x1; x++) {
    const i = (y * width + x) * 3;
    if (a[i] + a[i + 1] + a[i + 2] > 60) n++;
  }
  return n / (height * (x1 - x0));
}

/** Columns [x0, x1) of one image compared with columns [y0, y0 + x1 − x0) of another. */
export function halvesDiffer(a: Uint8Array, width: number, height: number, x0: number, x1: number, y0: number, tol = 30): number {
  let n = 0;
  for (let y = 0; y < height; y++) for (let x = x0; x < x1; x++) {
    const i = (y * width + x) * 3, j = (y * width + (x - x0 + y0)) * 3;
    if (Math.abs(a[i] - a[j]) + Math.abs(a[i + 1] - a[j + 1]) + Math.abs(a[i + 2] - a[j + 2]) > tol) n++;
  }
  return n / (height * (x1 - x0));
}

/** The top-level boxes of an MP4 file in order (ISO/IEC 14496-12: each box starts with a 32-bit
 *  big-endian size and a four-letter type). */
export function topLevelBoxes(file: string): string[] {
  const b = readFileSync(file);
  const out: string[] = [];
  for (let i = 0; i + 8 <= b.length;) {
    const size = b.readUInt32BE(i);
    out.push(b.toString('latin1', i + 4, i + 8));
    if (size < 8) break;
    i += size;
  }
  return out;
}
