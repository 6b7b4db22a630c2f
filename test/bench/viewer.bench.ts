// Viewer benchmark in headless Chromium with software WebGL (SwiftShader): a fixture run of
// 10,000 axons × 500 frames (test/fixtures/makeRun.ts; a synthetic growth, for timing only).
// Measures, from the page's own probe (window.__axonloom):
//   load     navigation start → first frame drawn (and where the time goes), over fresh loads;
//   scrub    the timeline dragged for a few seconds: frame draw times, frame intervals, and the
//            sample size the viewer chose while moving;
//   orbit    the camera turned by mouse drag, same figures;
//   complete how long after the motion stops every axon is drawn, and in how many frames.
// Usage: npx tsx test/bench/viewer.bench.ts [--json] [--axons N] [--frames F] [--loads K]
import { join } from 'node:path';
import { loadavg } from 'node:os';
import { statSync } from 'node:fs';
import { startViewerServer } from '../../engine/server/staticServer.ts';
import { makeRun } from '../fixtures/makeRun.ts';
import { buildViewer, scratchDir, launch, open, settled } from '../e2e/harness.ts';
import type { Page } from 'playwright-core';

const args = process.argv.slice(2);
const opt = (name: string, dflt: number) => {
  const i = args.indexOf(`--${name}`);
  return i >= 0 ? Number(args[i + 1]) : dflt;
};
const AXONS = opt('axons', 10_000), FRAMES = opt('frames', 500), LOADS = opt('loads', 3);
const log = (s: string) => process.stderr.write(s + '\n');

const viewer = buildViewer();
const runs = join(scratchDir('bench'), 'runs');
const tGen = performance.now();
makeRun(join(runs, 'big'), { axons: AXONS, frames: FRAMES, name: 'big' });
log(`fixture ${AXONS} axons × ${FRAMES} frames written in ${((performance.now() - tGen) / 1000).toFixed(1)} s`);
const server = await startViewerServer({ viewerDir: viewer, runDir: join(runs, 'big'), port: 0 });
const ctx = await launch();
const load0 = loadavg()[0];

try {
  // --- load ---
  const loads: Record<string, number>[] = [];
  let page: Page | null = null;
  for (let i = 0; i < LOADS; i++) {
    if (page) await page.close();
    const t0 = performance.now();
    ({ page } = await open(ctx, server.url));
    const wall = performance.now() - t0;
    const t = await page.evaluate(() => window.__axonloom!.timings);
    loads.push({
      firstFrameMs: t['firstFrame:0'], wallMs: wall, scriptStartMs: t.start, readMs: t['read:big'], modelMs: t['model:big'],
      loadedMs: t.loaded, uploadMs: t['upload:0'], firstDrawMs: t['firstDraw:0'], warmUpMs: t['warmUp:0'] ?? NaN,
    });
    log(`load ${i + 1}: first frame at ${t['firstFrame:0'].toFixed(0)} ms after navigation (read ${t['read:big'].toFixed(0)}, model ${t['model:big'].toFixed(0)}, upload ${t['upload:0'].toFixed(0)}, first draw ${t['firstDraw:0'].toFixed(0)} ms)`);
  }
  const p = page!;
  const tAll = performance.now();
  await settled(p);
  const firstComplete = performance.now() - tAll;

  // --- scrub: move the time through the run at the display's pace, as a dragged slider does ---
  const scrub = await p.evaluate(async () => {
    const probe = window.__axonloom!;
    const s = probe.store!;
    const n0 = probe.reports[0].length;
    const dur = s.get().timeH;
    const t0 = performance.now();
    await new Promise<void>((done) => {
      const tick = () => {
        const e = performance.now() - t0;
        s.set({ timeH: dur * (0.2 + 0.6 * ((e / 3000) % 1)), lastMotion: performance.now() });
        if (e < 3000) requestAnimationFrame(tick);
        else done();
      };
      requestAnimationFrame(tick);
    });
    return probe.reports[0].slice(n0);
  });
  await settled(p);

  // --- orbit: drag the camera ---
  const box = (await p.locator('[data-testid="view-0"] canvas').boundingBox())!;
  const n0 = await p.evaluate(() => window.__axonloom!.reports[0].length);
  await p.mouse.move(box.x + box.width / 2, box.y + box.height / 2);
  await p.mouse.down();
  const tOrbit = performance.now();
  for (let i = 0; performance.now() - tOrbit < 3000; i++) {
    await p.mouse.move(box.x + box.width / 2 + 200 * Math.sin(i / 10), box.y + box.height / 2 + 60 * Math.cos(i / 13));
    await p.waitForTimeout(16);
  }
  await p.mouse.up();
  const tStop = performance.now();
  const orbit = await p.evaluate((n) => window.__axonloom!.reports[0].slice(n), n0);
  await settled(p);
  const completeMs = performance.now() - tStop;
  const afterStop = await p.evaluate((n) => window.__axonloom!.reports[0].slice(n).filter((r) => r.mode !== 'sample'), n0 + orbit.length);

  const moving = (rs: typeof scrub) => rs.filter((r) => r.mode === 'sample');
  const summary = (rs: typeof scrub) => {
    const m = moving(rs);
    return {
      frames: rs.length,
      movingFrames: m.length,
      drawMs: quantiles(m.map((r) => r.frameMs)),
      intervalMs: quantiles(m.map((r) => r.intervalMs).filter((x) => x > 0)),
      sampleAxons: quantiles(m.map((r) => r.axonsDrawn)),
      segments: quantiles(m.map((r) => r.segments)),
    };
  };
  const result = {
    viewer: {
      fixture: { axons: AXONS, frames: FRAMES, framesNpyMB: +(statSync(join(runs, 'big', 'frames.npy')).size / 2 ** 20).toFixed(1) },
      browser: 'Debian chromium, headless, --use-angle=swiftshader (software WebGL)',
      loadAverage1m: { before: +load0.toFixed(2), after: +loadavg()[0].toFixed(2) },
      load: { firstFrameMs: quantiles(loads.map((l) => l.firstFrameMs)), runs: loads.map(roundAll) },
      firstCompleteMs: Math.round(firstComplete),
      scrub: summary(scrub),
      orbit: summary(orbit),
      complete: { msAfterStop: Math.round(completeMs), frames: afterStop.length, drawMs: quantiles(afterStop.map((r) => r.frameMs)) },
    },
  };
  const v = result.viewer;
  log(`first frame: median ${v.load.firstFrameMs.p50} ms; all axons drawn ${v.firstCompleteMs} ms after that page was ready`);
  log(`scrub: ${v.scrub.movingFrames} sampled frames, draw p50 ${v.scrub.drawMs.p50} ms (p95 ${v.scrub.drawMs.p95}), interval p50 ${v.scrub.intervalMs.p50} ms, sample ${v.scrub.sampleAxons.p50} axons`);
  log(`orbit: ${v.orbit.movingFrames} sampled frames, draw p50 ${v.orbit.drawMs.p50} ms (p95 ${v.orbit.drawMs.p95}), interval p50 ${v.orbit.intervalMs.p50} ms, sample ${v.orbit.sampleAxons.p50} axons`);
  log(`complete: every axon drawn ${v.complete.msAfterStop} ms after the drag ended, in ${v.complete.frames} frames`);
  log(`load average (1 min): ${v.loadAverage1m.before} before, ${v.loadAverage1m.after} after (2 cores shared with everything else)`);
  process.stdout.write(args.includes('--json') ? JSON.stringify(result) + '\n' : JSON.stringify(result, null, 2) + '\n');
} finally {
  await ctx.close();
  await server.close();
}

function quantiles(xs: number[]): { n: number; p50: number; p95: number; max: number } {
  const s = xs.filter(Number.isFinite).sort((a, b) => a - b);
  const q = (p: number) => (s.length ? s[Math.min(s.length - 1, Math.round(p * (s.length - 1)))] : NaN);
  return { n: s.length, p50: Math.round(q(0.5)), p95: Math.round(q(0.95)), max: Math.round(s.at(-1) ?? NaN) };
}

function roundAll(o: Record<string, number>): Record<string, number> {
  return Object.fromEntries(Object.entries(o).map(([k, x]) => [k, Math.round(x)]));
}
