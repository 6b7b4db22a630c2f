// Recording benchmark in headless Chromium with software WebGL (SwiftShader): how many frames a
// second the viewer's recorder draws (every axon), composes and encodes, at 1280×720, for a
// fixture run of 10,000 axons × 500 frames (test/fixtures/makeRun.ts; synthetic growth, for
// timing only). The recorder is driven through its page API (window.__axonloomRecorder), as
// `axonloom record` drives it, the bytes counted instead of written.
// Reported: recordFps1280x720 (frames per second of the frame loop, set-up excluded, still
// camera: each frame adds its new path segments to the last), and for a still camera with every
// frame drawn anew and for an orbit (which must draw anew), the same, with the set-up time and
// the time split between drawing, composing and encoding.
// Usage: npx tsx test/bench/record.bench.ts [--json] [--axons N] [--frames F] [--video-frames K] [--redraw-frames K]
import { join } from 'node:path';
import { loadavg } from 'node:os';
import { startViewerServer } from '../../engine/server/staticServer.ts';
import { makeRun } from '../fixtures/makeRun.ts';
import { scratchDir, launch, open } from '../e2e/harness.ts';
import { buildRecordViewer } from '../record/harness.ts';
import type { VideoOptions } from '../../viewer/record/recordOptions.ts';
import type { PageOutcome } from '../../viewer/record/pageApi.ts';
import type { RecordStats } from '../../viewer/record/recorder.ts';

const args = process.argv.slice(2);
const opt = (name: string, dflt: number) => {
  const i = args.indexOf(`--${name}`);
  return i >= 0 ? Number(args[i + 1]) : dflt;
};
// 90 frames = 3 s at 30 fps, the still camera's case; drawing anew costs the same per frame
// whatever the count (each frame draws about half of all segments on average), so fewer will do
const AXONS = opt('axons', 10_000), FRAMES = opt('frames', 500), VIDEO_FRAMES = opt('video-frames', 90), REDRAW_FRAMES = opt('redraw-frames', 12);
const log = (s: string) => process.stderr.write(s + '\n');

const viewer = buildRecordViewer('record-bench-viewer');
const runs = join(scratchDir('record-bench'), 'runs');
makeRun(join(runs, 'big'), { axons: AXONS, frames: FRAMES, name: 'big' });
const server = await startViewerServer({ viewerDir: viewer, runDir: join(runs, 'big'), port: 0 });
const ctx = await launch();
const load0 = loadavg()[0];

try {
  const { page, state } = await open(ctx, server.url);
  if (state !== 'ready') throw new Error(`viewer state ${state}`);
  let bytes = 0;
  await page.exposeFunction('__benchWrite', (_pos: number, b64: string) => void (bytes += Math.floor((b64.length * 3) / 4)));
  const record = async (camera: VideoOptions['camera'], frames: number, redraw = false): Promise<RecordStats> => {
    const opts: VideoOptions = { width: 1280, height: 720, fps: 30, seconds: frames / 30, container: 'mp4', camera, overlays: ['title', 'time', 'scale', 'legend', 'variant', 'labels'], title: 'benchmark', redraw };
    const r = await page.evaluate(`window.__axonloomRecorder.record(${JSON.stringify(opts)}, (p, d) => window.__benchWrite(p, d))`) as PageOutcome<RecordStats>;
    if (!r.ok) throw new Error(r.message);
    return r.value;
  };
  const still = await record({ kind: 'still', preset: 'oblique' }, VIDEO_FRAMES);
  log(`still camera: ${still.frames} frames at 1280×720 in ${(still.ms / 1000).toFixed(1)} s: ${still.framesPerSecond.toFixed(2)} frames/s (set-up ${(still.setupMs / 1000).toFixed(1)} s, drawing ${(still.drawMs / still.frames).toFixed(0)} ms/frame, composing ${(still.composeMs / still.frames).toFixed(0)} ms/frame, encoding ${(still.encodeMs / still.frames).toFixed(0)} ms/frame)`);
  const redrawn = await record({ kind: 'still', preset: 'oblique' }, REDRAW_FRAMES, true);
  log(`still camera, every frame drawn anew: ${redrawn.framesPerSecond.toFixed(2)} frames/s (drawing ${(redrawn.drawMs / redrawn.frames).toFixed(0)} ms/frame)`);
  const orbit = await record({ kind: 'orbit', preset: 'oblique', turns: 1 }, REDRAW_FRAMES);
  log(`orbit: ${orbit.framesPerSecond.toFixed(2)} frames/s (drawing ${(orbit.drawMs / orbit.frames).toFixed(0)} ms/frame, encoding ${(orbit.encodeMs / orbit.frames).toFixed(0)} ms/frame)`);
  const summary = (s: RecordStats) => ({
    frames: s.frames, framesPerSecond: +s.framesPerSecond.toFixed(3), totalMs: Math.round(s.ms), setupMs: Math.round(s.setupMs),
    drawMsPerFrame: Math.round(s.drawMs / s.frames), composeMsPerFrame: Math.round(s.composeMs / s.frames), encodeMsPerFrame: Math.round(s.encodeMs / s.frames), bytes: s.bytes, codec: s.codec,
  });
  const result = {
    recordFps1280x720: +still.framesPerSecond.toFixed(3),
    record: {
      fixture: { axons: AXONS, frames: FRAMES },
      browser: 'Debian chromium, headless, --use-angle=swiftshader (software WebGL), WebCodecs H.264',
      still: summary(still),
      stillRedrawn: summary(redrawn),
      orbit: summary(orbit),
      bytesReceived: bytes,
      loadAverage1m: { before: +load0.toFixed(2), after: +loadavg()[0].toFixed(2) },
    },
  };
  process.stdout.write(args.includes('--json') ? JSON.stringify(result) + '\n' : JSON.stringify(result, null, 2) + '\n');
} finally {
  await ctx.close();
  await server.close();
}
