// The viewer's record dialog in headless Chromium: choose a size, rate, length, camera path,
// overlays and format, record, and take the browser's download; ffprobe judges the file.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { join } from 'node:path';
import type { BrowserContext } from 'playwright-core';
import { startViewerServer, type ViewerServer } from '../../engine/server/staticServer.ts';
import { ROOT, SHOTS, engineRun, scratchDir, launch, open } from '../e2e/harness.ts';
import { buildRecordViewer, probeVideo, decodePng } from './harness.ts';

let server: ViewerServer;
let ctx: BrowserContext;
let out: string;

beforeAll(async () => {
  const viewer = buildRecordViewer('record-dialog-viewer');
  const runs = join(scratchDir('record-dialog'), 'runs');
  engineRun(join(ROOT, 'scenes', 'demo.json'), join(runs, 'demo'), ['--axons', '800']);
  out = scratchDir('record-dialog-out');
  server = await startViewerServer({ viewerDir: viewer, runDir: join(runs, 'demo'), port: 0 });
  ctx = await launch();
}, 180_000);

afterAll(async () => {
  await ctx?.close();
  await server?.close();
});

describe('record dialog', () => {
  it('records a WebM orbit of the asked size and length and offers it for download; then a PNG still', async () => {
    const { page, state } = await open(ctx, server.url);
    expect(state).toBe('ready');
    await page.locator('[data-testid="record-open"]').click();
    const dialog = page.locator('[data-testid="record-dialog"]');
    await dialog.waitFor();
    await page.locator('[data-testid="record-size"]').selectOption('custom');
    await page.getByLabel('custom size').fill('320x240');
    await page.locator('[data-testid="record-fps"]').selectOption('24');
    await page.locator('[data-testid="record-seconds"]').fill('0.5');
    await page.locator('[data-testid="record-camera-orbit"]').check();
    await page.locator('[data-testid="record-overlay-labels"]').uncheck();
    await page.locator('[data-testid="record-webm"]').check();
    expect(await page.locator('[data-testid="record-summary"]').innerText()).toMatch(/^12 frames; demo's [\d.]+ h over 0\.5 s$/);
    await page.screenshot({ path: join(SHOTS, 'record-dialog.png') });

    const [download] = await Promise.all([page.waitForEvent('download', { timeout: 60_000 }), page.locator('[data-testid="record-start"]').click()]);
    expect(download.suggestedFilename()).toBe('demo-320x240.webm');
    const file = join(out, download.suggestedFilename());
    await download.saveAs(file);
    expect(probeVideo(file)).toMatchObject({ codec: 'vp9', width: 320, height: 240, frames: 12 });
    expect(await page.locator('[data-testid="record-done"]').innerText()).toMatch(/12 frames, VP9/);

    // an impossible choice is refused in the dialog, in words
    await page.getByLabel('custom size').fill('0x0');
    expect(await page.locator('[data-testid="record-summary"]').innerText()).toMatch(/width must be from 16 to 7680/);
    expect(await page.locator('[data-testid="record-start"]').isDisabled()).toBe(true);
    await page.getByLabel('custom size').fill('320x240');

    const [still] = await Promise.all([page.waitForEvent('download', { timeout: 60_000 }), page.locator('[data-testid="record-still-png"]').click()]);
    expect(still.suggestedFilename()).toMatch(/^demo-t1\.000-320x240\.png$/);
    const png = join(out, 'still.png');
    await still.saveAs(png);
    const img = decodePng(png);
    expect([img.width, img.height]).toEqual([320, 240]);
    await page.close();
  });
});
