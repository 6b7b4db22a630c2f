// The viewer in real headless Chromium with software WebGL: the demo run, fixture runs with map
// columns, a variant side by side, a damaged run, and the server's refusals. Screenshots go to
// test-output/e2e/ (not in git) for a person to look at.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { request } from 'node:http';
import type { BrowserContext, Page } from 'playwright-core';
import { startViewerServer, type ViewerServer } from '../../engine/server/staticServer.ts';
import { readRun, fsLoader, type LoadedRun } from '../../engine/io/runReader.ts';
import { makeRun } from '../fixtures/makeRun.ts';
import { formatValue, formatHours } from '../../viewer/components/format.ts';
import { MAP_METRICS, PLOT, MARGIN } from '../../viewer/components/MapCheck.tsx';
import { ROOT, SHOTS, buildViewer, engineRun, scratchDir, launch, open, settled, canvasPixels, pixelDifference } from './harness.ts';

let server: ViewerServer;
let ctx: BrowserContext;
let runs: string;
let fx: LoadedRun;

beforeAll(async () => {
  const viewer = buildViewer();
  runs = join(scratchDir('e2e'), 'runs');
  engineRun(join(ROOT, 'scenes', 'demo.json'), join(runs, 'demo'));
  makeRun(join(runs, 'fx'), { axons: 1500, frames: 120, name: 'fx' });
  makeRun(join(runs, 'fx-shift'), { axons: 1500, frames: 120, name: 'fx-shift', variantShift: 0.15 });
  makeRun(join(runs, 'large'), { axons: 4000, frames: 300, name: 'large' });
  makeRun(join(runs, 'cut'), { axons: 200, frames: 40, name: 'cut', truncateFramesBy: 1000 });
  writeFileSync(join(runs, '..', 'secret.txt'), 'TOP SECRET');
  fx = await readRun(fsLoader(join(runs, 'fx')));
  server = await startViewerServer({ viewerDir: viewer, runDir: join(runs, 'demo'), port: 0 });
  ctx = await launch();
}, 180_000);

afterAll(async () => {
  await ctx?.close();
  await server?.close();
});

const url = (q: string) => `${server.origin}/${q}`;
const text = (page: Page, sel: string) => page.locator(sel).innerText();
const shot = (page: Page, name: string) => page.screenshot({ path: join(SHOTS, `${name}.png`) });

describe('viewer in headless Chromium', () => {
  it('the demo run loads, reaches ready and draws a picture that is not blank', async () => {
    const { page, state, errors } = await open(ctx, server.url);
    expect(state).toBe('ready');
    await settled(page);
    const px = await canvasPixels(page);
    // A drawn run covers a good part of the view with many colours (paths in the 2-D colour
    // map, regions, labels); a blank or single-colour canvas has one or two.
    expect(px.drawn).toBeGreaterThan(0.05);
    expect(px.colours).toBeGreaterThan(100);
    expect(await text(page, '[data-testid="time-0"]')).toMatch(/^t = [\d.]+ h/);
    expect(await text(page, '[data-testid="scale-bar"]')).toMatch(/^\d+ (µm|mm)$/);
    expect(await text(page, '[data-testid="draw-note"]')).toContain('all 3,000 axons');
    expect(errors).toEqual([]);
    await shot(page, 'demo');
    await page.close();
  });

  it('scrubbing changes the picture without rebuilding it: going back gives the same picture', async () => {
    const { page } = await open(ctx, url('?run=fx&t=1'));
    await settled(page);
    const end = await canvasPixels(page);
    const stampEnd = await page.locator('[data-testid="time-0"]').innerText();
    await page.locator('[data-testid="scrub"]').fill(String(0.3 * fx.manifest.frameTimesH.at(-1)!));
    await settled(page);
    const mid = await canvasPixels(page);
    const stampMid = await page.locator('[data-testid="time-0"]').innerText();
    expect(stampMid).not.toBe(stampEnd);
    expect(await pixelDifference(page, end, mid)).toBeGreaterThan(0.02);
    await shot(page, 'fx-scrubbed');
    await page.locator('[data-testid="scrub"]').fill(String(fx.manifest.frameTimesH.at(-1)!));
    await settled(page);
    expect(await pixelDifference(page, end, await canvasPixels(page))).toBeLessThan(0.002);
    await page.close();
  });

  it("the map panel shows run.json's summary numbers, and axons.csv agrees with its mean error", async () => {
    const { page } = await open(ctx, url('?run=fx'));
    await page.waitForSelector('[data-testid="map-metrics"]');
    const map = fx.manifest.metrics.map as Record<string, number>;
    const cell = page.locator('[data-testid="metric-meanErrorUm-0"]');
    expect(Number(await cell.getAttribute('data-value'))).toBe(map.meanErrorUm);
    expect(await cell.innerText()).toBe(`${formatValue(map.meanErrorUm)} µm`);
    for (const m of MAP_METRICS) expect(Number(await page.locator(`[data-testid="metric-${m.key}-0"]`).getAttribute('data-value'))).toBe(map[m.key]);
    // the histogram's mean is computed in the page from the error_um column: an independent path
    const histMean = Number(await page.locator('[data-testid="error-histogram"]').getAttribute('data-mean'));
    expect(histMean).toBeCloseTo(map.meanErrorUm, 6);
    await shot(page, 'fx-map');
    await page.close();
  });

  it('clicking an axon in 3D or on the source sheet selects it and shows its axons.csv row', async () => {
    const { page } = await open(ctx, url('?run=fx&t=1&cam=side'));
    await settled(page);
    // click where a growing axon's cone is, as the page's own camera projects it
    const F = fx.frames.frames, N = fx.frames.axons;
    const status = fx.axons.strings('status');
    const a = status.indexOf('growing');
    const p = fx.frames.data.subarray(((F - 1) * N + a) * 3, ((F - 1) * N + a) * 3 + 3);
    const [x, y] = await page.evaluate(([px, py, pz]) => window.__axonloom!.views[0].project(px, py, pz), [p[0], p[1], p[2]] as const);
    await page.mouse.click(x, y);
    const record = page.locator('[data-testid="axon-record"]');
    await record.waitFor({ state: 'visible' });
    const picked = Number(await record.getAttribute('data-axon'));
    // the picked axon's path passes within the pick radius of the click (it may be a neighbour)
    let best = Infinity;
    for (let f = 0; f < F; f++) {
      const q = fx.frames.data.subarray((f * N + picked) * 3, (f * N + picked) * 3 + 3);
      const [sx, sy] = await page.evaluate(([qx, qy, qz]) => window.__axonloom!.views[0].project(qx, qy, qz), [q[0], q[1], q[2]] as const);
      best = Math.min(best, Math.hypot(sx - x, sy - y));
      if (best < 9) break;
    }
    expect(best).toBeLessThan(9.5);
    expect(await record.locator('td[data-col="id"]').innerText()).toBe(fx.axons.row(picked).id);
    expect(await record.locator('td[data-col="status"]').innerText()).toBe(fx.axons.row(picked).status);
    await settled(page);
    await shot(page, 'fx-selected-3d');

    // on the source sheet plot: the dot of axon 7, at its (source_u, source_v)
    const plot = page.locator('[data-testid="plot-source"]');
    const box = (await plot.boundingBox())!;
    const u = fx.axons.numbers('source_u'), v = fx.axons.numbers('source_v');
    const k = 7;
    await page.mouse.click(box.x + MARGIN.l + u[k] * PLOT, box.y + MARGIN.t + (1 - v[k]) * PLOT);
    await page.waitForFunction((prev) => document.querySelector('[data-testid="axon-record"]')?.getAttribute('data-axon') !== prev, String(picked));
    const chosen = Number(await record.getAttribute('data-axon'));
    expect(Math.hypot((u[chosen] - u[k]) * PLOT, (v[chosen] - v[k]) * PLOT)).toBeLessThan(7.5);
    expect(await record.locator('td[data-col="source_u"]').innerText()).toBe(fx.axons.row(chosen).source_u);
    await page.close();
  });

  it('a run with a truncated frames.npy shows a clear error and no blank page', async () => {
    const { page, state } = await open(ctx, url('?run=cut'));
    expect(state).toBe('error');
    const box = page.locator('[data-testid="error"]');
    expect(await box.isVisible()).toBe(true);
    const msg = await box.innerText();
    expect(msg).toContain('Could not open run “cut” (problem in frames.npy)');
    expect(msg).toMatch(/frames\.npy is truncated: header says 40×200×3 float32 \(96000 bytes\) but only 95000 bytes of data/);
    await shot(page, 'cut-error');
    await page.close();
  });

  it('two runs side by side share one timeline and one camera', async () => {
    const { page, state } = await open(ctx, url('?run=fx&compare=fx-shift&t=0.6'));
    expect(state).toBe('ready');
    await settled(page, 0);
    await settled(page, 1);
    expect(await page.locator('[data-testid="time-0"]').innerText()).toBe(await page.locator('[data-testid="time-1"]').innerText());
    const [a, b] = [await canvasPixels(page, 0), await canvasPixels(page, 1)];
    expect(a.drawn).toBeGreaterThan(0.03);
    expect(b.drawn).toBeGreaterThan(0.03);
    expect(await pixelDifference(page, a, b)).toBeGreaterThan(0.005); // the variant grew differently
    // turning the camera in one view turns the other: a point projects to the same place in each
    const box0 = (await page.locator('[data-testid="view-0"] canvas').boundingBox())!;
    await page.mouse.move(box0.x + box0.width / 2, box0.y + box0.height / 2);
    await page.mouse.down();
    await page.mouse.move(box0.x + box0.width / 2 + 120, box0.y + box0.height / 2 + 40, { steps: 6 });
    await page.mouse.up();
    const [p0, p1] = await page.evaluate(() => [window.__axonloom!.views[0].project(300, 200, 200), window.__axonloom!.views[1].project(300, 200, 200)]);
    const dx = (await page.locator('[data-testid="view-1"]').boundingBox())!.x - box0.x;
    expect(Math.abs(p1[0] - dx - p0[0])).toBeLessThan(1);
    expect(Math.abs(p1[1] - p0[1])).toBeLessThan(1);
    await settled(page, 0);
    await settled(page, 1);
    const shifted = JSON.parse(readFileSync(join(runs, 'fx-shift', 'run.json'), 'utf8')).metrics.map.meanErrorUm;
    expect(Number(await page.locator('[data-testid="metric-meanErrorUm-1"]').getAttribute('data-value'))).toBe(shifted);
    await shot(page, 'compare');
    await page.close();
  });

  it('URL parameters set the time and the camera preset; a large run says when it shows a sample', async () => {
    const { page } = await open(ctx, url('?run=large&t=0.5&cam=top'));
    // t is a fraction of the duration; the view shows the last frame at or before that time
    const times = JSON.parse(readFileSync(join(runs, 'large', 'run.json'), 'utf8')).frameTimesH as number[];
    const half = times.filter((h) => h <= times.at(-1)! / 2 + 1e-9).at(-1)!;
    expect(await text(page, '[data-testid="time-0"]')).toContain(`t = ${formatHours(half)} h`);
    expect(await page.locator('[data-testid="cam-top"]').getAttribute('class')).toMatch(/\bon\b/);
    // drag the time slider continuously: while it moves the view draws a representative sample
    // and says so; once it stops, every axon is drawn
    const slider = (await page.locator('[data-testid="scrub"]').boundingBox())!;
    await page.mouse.move(slider.x + slider.width * 0.5, slider.y + slider.height / 2);
    await page.mouse.down();
    const modes = new Set<string>();
    for (let i = 1; i <= 12; i++) {
      await page.mouse.move(slider.x + slider.width * (0.5 + i * 0.04), slider.y + slider.height / 2);
      await page.waitForTimeout(60);
      modes.add((await page.locator('[data-testid="draw-note"]').getAttribute('data-mode')) ?? '');
    }
    const noteWhileMoving = await page.locator('[data-testid="draw-note"]').innerText();
    await page.mouse.up();
    expect(modes.has('sample')).toBe(true);
    expect(noteWhileMoving).toMatch(/sample of [\d,]+ \/ 4,000 axons while moving|completing/);
    await settled(page);
    expect(await text(page, '[data-testid="draw-note"]')).toContain('all 4,000 axons');
    await shot(page, 'large-top');
    await page.close();
  });

  it('play advances the time; hiding a population removes its axons from the picture and the plots', async () => {
    const { page } = await open(ctx, url('?run=fx&t=0'));
    await settled(page);
    const t0 = await page.evaluate(() => window.__axonloom!.store!.get().timeH);
    await page.locator('[data-testid="play"]').click();
    await page.waitForTimeout(1500);
    await page.locator('[data-testid="play"]').click(); // pause
    const t1 = await page.evaluate(() => window.__axonloom!.store!.get().timeH);
    // speed 1× plays the whole run in 12 s (viewer/state/viewState.ts PLAY_SECONDS)
    const dur = fx.manifest.frameTimesH.at(-1)!;
    expect(t1 - t0).toBeGreaterThan(dur * (1 / 12) * 0.5);
    expect(t1 - t0).toBeLessThan(dur * (2.5 / 12));
    expect(await text(page, '[data-testid="time-0"]')).not.toBe('t = 0.0 h');

    await page.evaluate((h) => window.__axonloom!.store!.set({ timeH: h }), dur);
    await settled(page);
    const all = await canvasPixels(page);
    await page.locator('[data-testid="pop-late"]').uncheck();
    await settled(page);
    const early = await canvasPixels(page);
    expect(await pixelDifference(page, all, early)).toBeGreaterThan(0.01);
    expect(await text(page, '[data-testid="draw-note"]')).toContain(`all ${fx.manifest.populations[0].count.toLocaleString('en-US')} axons`);
    const shown = await page.locator('[data-testid="error-histogram"]').getAttribute('data-mean');
    // the histogram now summarises the remaining population only: its mean is theirs
    const err = fx.axons.numbers('error_um'), pop = fx.axons.strings('population');
    let sum = 0, n = 0;
    for (let a = 0; a < err.length; a++) if (pop[a] === 'early') { sum += err[a]; n++; }
    expect(Number(shown)).toBeCloseTo(sum / n, 6);
    await shot(page, 'fx-early-only');
    await page.close();
  });

  it('path escapes are refused with 404, also when asked by the page', async () => {
    const raw = (path: string) => new Promise<number>((resolve, reject) => {
      const req = request({ host: '127.0.0.1', port: server.port, path }, (res) => {
        res.resume();
        resolve(res.statusCode ?? 0);
      });
      req.on('error', reject);
      req.end();
    });
    for (const p of ['/runs/demo/../../secret.txt', '/runs/demo/%2e%2e/%2e%2e/secret.txt', '/%2e%2e/%2e%2e/secret.txt', '/runs/demo/..%2f..%2fsecret.txt', '//etc/passwd', '/runs/.hidden/run.json']) {
      expect(await raw(p), p).toBe(404);
    }
    const { page } = await open(ctx, url('?run=fx'));
    const status = await page.evaluate(async () => (await fetch('runs/fx/%2e%2e/%2e%2e/secret.txt')).status);
    expect(status).toBe(404);
    expect(await page.evaluate(async () => (await fetch('runs/fx/run.json')).status)).toBe(200);
    await page.close();
    expect(readFileSync(join(runs, '..', 'secret.txt'), 'utf8')).toBe('TOP SECRET'); // the file is there to be leaked
  });
});
