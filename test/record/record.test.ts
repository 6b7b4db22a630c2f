// `axonloom record` end to end: the demo run (and a knockout of it) recorded in headless
// Chromium with software WebGL, the files judged by Debian's ffprobe and ffmpeg, which know
// nothing of ours: codec, width, height and the number of frames they decode, and the decoded
// pixels. Bad input must exit 2 with one line and leave no file behind.
import { describe, it, expect, beforeAll } from 'vitest';
import { existsSync, mkdirSync, readdirSync } from 'node:fs';
import { spawn } from 'node:child_process';
import { join } from 'node:path';
import { ROOT, engineRun, scratchDir } from '../e2e/harness.ts';
import { buildRecordViewer, record, probeVideo, decodeFrames, decodePng, differingShare, drawnShare, halvesDiffer, topLevelBoxes } from './harness.ts';

let viewer: string;
let runs: string;
let out: string;
const demo = () => join(runs, 'demo');

beforeAll(() => {
  viewer = buildRecordViewer();
  runs = join(scratchDir('record'), 'runs');
  engineRun(join(ROOT, 'scenes', 'demo.json'), join(runs, 'demo'));
  engineRun(join(ROOT, 'scenes', 'demo.json'), join(runs, 'demo-ko'), ['--perturb', JSON.stringify({ op: 'knockout', cue: 'thornin' })]);
  out = scratchDir('record-out');
}, 180_000);

/** Files in a folder, hidden ones (the temporary file) included. */
const filesIn = (dir: string) => readdirSync(dir);

describe('axonloom record in headless Chromium', () => {
  it('an MP4 of the demo: H.264 of the asked size with exactly fps × seconds frames, first and last differ', async () => {
    const file = join(out, 'demo.mp4');
    const r = await record([demo(), '--out', file, '--size', '320x240', '--fps', '10', '--seconds', '2', '--quiet'], viewer);
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
    expect(r.stdout).toMatch(/^wrote .*demo\.mp4: 320×240, 20 frames at 10 fps \(2 s\), H\.264/);
    const p = probeVideo(file);
    expect(p).toMatchObject({ codec: 'h264', width: 320, height: 240, frames: 20 });
    expect(p.format).toContain('mp4');
    expect(p.durationS).toBeCloseTo(2, 2);
    // the index (moov) before the media (mdat): "fast start", playable before it is all read
    // (the layout slide software and web players prefer; common practice, no source)
    expect(topLevelBoxes(file)).toEqual(['ftyp', 'moov', 'mdat']);
    const frames = decodeFrames(file, 320, 240);
    expect(frames.length).toBe(20);
    // the run grows between the first frame (start) and the last (end)
    expect(differingShare(frames[0], frames[19], 320, 240)).toBeGreaterThan(0.05);
    expect(filesIn(out)).toEqual(['demo.mp4']); // the temporary file was renamed, none left
  });

  it('a WebM (VP9) orbit: the asked size and frame count, every frame different', async () => {
    const file = join(out, 'orbit.webm');
    const r = await record([demo(), '--out', file, '--size', '256x144', '--fps', '8', '--seconds', '1.5', '--camera', 'orbit:top', '--quiet'], viewer);
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
    expect(probeVideo(file)).toMatchObject({ codec: 'vp9', width: 256, height: 144, frames: 12 });
    expect(probeVideo(file).format).toContain('webm');
    const frames = decodeFrames(file, 256, 144);
    for (let i = 1; i < frames.length; i++) expect(differingShare(frames[i - 1], frames[i], 256, 144)).toBeGreaterThan(0.005);
  });

  it('adding each frame’s new segments to the last gives the same frames as drawing every frame anew', async () => {
    const a = join(out, 'acc.mp4'), b = join(out, 'redraw.mp4');
    const args = ['--size', '320x240', '--fps', '6', '--seconds', '2', '--overlays', 'none', '--quiet'];
    expect((await record([demo(), '--out', a, ...args], viewer)).status).toBe(0);
    expect((await record([demo(), '--out', b, ...args, '--redraw'], viewer)).status).toBe(0);
    const fa = decodeFrames(a, 320, 240), fb = decodeFrames(b, 320, 240);
    expect(fa.length).toBe(12);
    expect(fb.length).toBe(12);
    for (let i = 0; i < 12; i++) expect(differingShare(fa[i], fb[i], 320, 240, 0, 320, 0)).toBeLessThan(0.001);
  });

  it('--compare shows both runs, side by side: each half drawn, the halves differ, and neither is the single-run picture', async () => {
    const single = join(out, 'single.mp4'), both = join(out, 'both.mp4');
    const args = ['--size', '320x240', '--fps', '4', '--seconds', '1', '--overlays', 'none', '--quiet'];
    expect((await record([demo(), '--out', single, ...args], viewer)).status).toBe(0);
    const r = await record([demo(), '--compare', 'demo-ko', '--out', both, ...args], viewer);
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
    expect(probeVideo(both)).toMatchObject({ codec: 'h264', width: 320, height: 240, frames: 4 });
    const last = decodeFrames(both, 320, 240)[3], alone = decodeFrames(single, 320, 240)[3];
    // the 2 px gap sits at x = 159, 160; the halves are 159 and 159 px wide
    expect(drawnShare(last, 320, 240, 0, 159)).toBeGreaterThan(0.02);
    expect(drawnShare(last, 320, 240, 161, 320)).toBeGreaterThan(0.02);
    // the knockout grew differently: the right half is not the left half again
    expect(halvesDiffer(last, 320, 240, 0, 159, 161)).toBeGreaterThan(0.01);
    // and a single run fills the whole width with one picture
    expect(differingShare(last, alone, 320, 240, 0, 159)).toBeGreaterThan(0.05);
    expect(differingShare(last, alone, 320, 240, 161, 320)).toBeGreaterThan(0.05);
  });

  it('--frame writes one PNG of the asked size', async () => {
    const file = join(out, 'still.png');
    const r = await record([demo(), '--out', file, '--frame', '0.5', '--size', '321x181', '--quiet'], viewer);
    expect(r.status).toBe(0);
    const png = decodePng(file);
    expect([png.width, png.height]).toEqual([321, 181]);
    expect(drawnShare(png.rgb, 321, 181)).toBeGreaterThan(0.02);
  });

  it('Ctrl-C while recording leaves neither the output nor a temporary file', async () => {
    const dir = join(out, 'interrupted');
    mkdirSync(dir);
    const file = join(dir, 'long.mp4');
    const child = spawn(process.execPath, [join(ROOT, 'bin', 'axonloom.js'), 'record', demo(), '--out', file, '--size', '640x360', '--seconds', '60', '--quiet'],
      { cwd: ROOT, env: { ...process.env, AXONLOOM_VIEWER_DIR: viewer } });
    let stderr = '';
    child.stderr.on('data', (d) => (stderr += d));
    const exited = new Promise<number | null>((resolve) => child.on('close', resolve));
    // the temporary file appears once the viewer is up and recording has begun
    const t0 = Date.now();
    while (!filesIn(dir).some((f) => f.endsWith('.tmp')) && Date.now() - t0 < 45_000) await new Promise((r) => setTimeout(r, 100));
    expect(filesIn(dir).some((f) => f.endsWith('.tmp'))).toBe(true);
    await new Promise((r) => setTimeout(r, 1000));
    child.kill('SIGINT');
    expect(await exited).toBe(130);
    expect(stderr).toContain('interrupted');
    expect(filesIn(dir)).toEqual([]);
  });
});

describe('axonloom record refuses bad input before starting Chromium', () => {
  const bad: [string, string[], RegExp][] = [
    ['a missing run directory', ['no-such-run', '--out', 'OUT/x.mp4'], /no such run directory: no-such-run/],
    ['a size of 0x0', ['RUN', '--out', 'OUT/x.mp4', '--size', '0x0'], /--size: the width must be from 16 to 7680 pixels \(got 0x0\)/],
    ['a size of 99999x99999', ['RUN', '--out', 'OUT/x.mp4', '--size', '99999x99999'], /--size: the width must be from 16 to 7680/],
    ['a negative duration', ['RUN', '--out', 'OUT/x.mp4', '--seconds', '-1'], /--seconds must be more than 0/],
    ['an output folder that does not exist', ['RUN', '--out', 'OUT/nowhere/x.mp4'], /--out: the folder .*nowhere does not exist/],
    ['an odd size for H.264', ['RUN', '--out', 'OUT/x.mp4', '--size', '321x240'], /even width/],
    ['an unknown extension', ['RUN', '--out', 'OUT/x.avi'], /--out must end in \.mp4/],
    ['--frame with a video name', ['RUN', '--out', 'OUT/x.mp4', '--frame', '0.5'], /--frame writes a still/],
    ['a fractional frame count', ['RUN', '--out', 'OUT/x.mp4', '--fps', '30', '--seconds', '0.51'], /whole number of frames/],
    ['an unknown camera', ['RUN', '--out', 'OUT/x.mp4', '--camera', 'dolly'], /--camera: unknown preset "dolly"/],
    ['a compare run that does not exist', ['RUN', '--out', 'OUT/x.mp4', '--compare', 'nope'], /--compare: no such run directory: nope/],
  ];
  for (const [what, args, message] of bad) {
    it(`${what}: exit 2, one line, no file`, async () => {
      const dir = scratchDir('record-bad');
      const r = await record(args.map((a) => a.replace('RUN', demo()).replace('OUT', dir)), viewer, { AXONLOOM_CHROMIUM: '/nonexistent/chromium' });
      expect(r.status).toBe(2);
      expect(r.stdout).toBe('');
      expect(r.stderr.trimEnd().split('\n')).toHaveLength(1);
      expect(r.stderr).toMatch(message);
      expect(existsSync(dir) ? filesIn(dir) : []).toEqual([]);
    });
  }

  it('Chromium missing: one line that says how to install it', async () => {
    const dir = scratchDir('record-nochromium');
    const r = await record([demo(), '--out', join(dir, 'x.mp4')], viewer, { AXONLOOM_CHROMIUM: '/nonexistent/chromium' });
    expect(r.status).toBe(1);
    expect(r.stderr.trimEnd().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/no Chromium at \/nonexistent\/chromium; install it \(Debian\/Ubuntu: sudo apt-get install chromium\)/);
    expect(filesIn(dir)).toEqual([]);
  });
});
