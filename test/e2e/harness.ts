// End-to-end plumbing: build the viewer, write the runs, serve them, drive headless Chromium.
// Chromium is Debian's /usr/bin/chromium (installed by .ci/run), driven by playwright-core; it
// renders WebGL in software (SwiftShader), as on a machine without a GPU.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';

export const ROOT = resolve(import.meta.dirname, '../..');
export const SHOTS = join(ROOT, 'test-output', 'e2e');
export const CHROMIUM = process.env.AXONLOOM_CHROMIUM ?? '/usr/bin/chromium';

/** Builds the viewer into a private folder (so a running `axonloom view` keeps its build). */
export function buildViewer(): string {
  const out = join(ROOT, 'test-output', 'e2e-viewer');
  const vite = join(ROOT, 'node_modules', 'vite', 'bin', 'vite.js');
  const r = spawnSync(process.execPath, [vite, 'build', '--outDir', out, '--emptyOutDir', '--logLevel', 'warn'], { cwd: ROOT, encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`vite build failed:\n${r.stdout}\n${r.stderr}`);
  return out;
}

/** Runs the engine on a scene (`axonloom run`), writing the run to outDir. */
export function engineRun(scene: string, outDir: string, extra: string[] = []): void {
  const r = spawnSync(process.execPath, [join(ROOT, 'bin', 'axonloom.js'), 'run', scene, '--out', outDir, '--quiet', ...extra], { cwd: ROOT, encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`axonloom run ${scene} failed (${r.status}):\n${r.stdout}\n${r.stderr}`);
}

export function scratchDir(tag: string): string {
  return mkdtempSync(join(tmpdir(), `axl-${tag}-`));
}

export async function launch(): Promise<BrowserContext> {
  if (!existsSync(CHROMIUM)) throw new Error(`no Chromium at ${CHROMIUM} (Debian package "chromium"; .ci/run installs it)`);
  mkdirSync(SHOTS, { recursive: true });
  const ctx = await chromium.launchPersistentContext(scratchDir('chromium'), {
    headless: true,
    executablePath: CHROMIUM,
    viewport: { width: 1440, height: 900 },
    args: ['--no-sandbox', '--disable-quic', '--use-angle=swiftshader', '--enable-unsafe-swiftshader', '--disable-background-networking',
      '--disable-component-update', '--disable-sync', '--no-first-run'],
  });
  // tsx (esbuild) names functions through a __name helper; functions sent to page.evaluate
  // carry those calls into the page, which has no such helper.
  await ctx.addInitScript('window.__name = function (f) { return f; };');
  return ctx;
}

/** Opens the viewer and waits for the root element's data-run-state to leave "loading". */
export async function open(ctx: BrowserContext, url: string): Promise<{ page: Page; state: string | null; errors: string[] }> {
  const page = await ctx.newPage();
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(e.message));
  await page.goto(url, { waitUntil: 'commit' });
  await page.waitForSelector('#axonloom[data-run-state="ready"], #axonloom[data-run-state="error"]', { timeout: 60_000 });
  return { page, state: await page.getAttribute('#axonloom', 'data-run-state'), errors };
}

/** Waits until view `view` has drawn its full picture after the last change, and has kept it
 *  for STILL_MS with no newer report: on a loaded machine a change can start redrawing after
 *  an earlier full picture was reported, and that report alone would pass. */
export async function settled(page: Page, view = 0): Promise<void> {
  const before = await page.evaluate((v) => window.__axonloom?.reports[v]?.length ?? 0, view);
  await page.waitForTimeout(350); // longer than the viewer's settle delay
  await page.waitForFunction(([v, n, still]) => {
    const r = window.__axonloom?.reports[v];
    const w = window as unknown as { __settle?: Record<number, { length: number; since: number } | undefined> };
    const seen = (w.__settle ??= {});
    if (!r || r.length < n || r[r.length - 1].mode !== 'all') {
      seen[v] = undefined;
      return false;
    }
    const last = seen[v];
    if (!last || last.length !== r.length) {
      seen[v] = { length: r.length, since: performance.now() };
      return false;
    }
    return performance.now() - last.since >= still;
  }, [view, before, STILL_MS] as const, { timeout: 60_000, polling: 100 });
}

const STILL_MS = 400;

export interface PixelStats {
  width: number;
  height: number;
  /** share of pixels that differ clearly from the background colour */
  drawn: number;
  /** distinct colours after rounding each channel to 4 bits */
  colours: number;
  /** name under which the pixels stay in the page, for pixelDifference */
  snapshot: string;
}

/** Reads view `view`'s WebGL canvas (its drawing buffer is preserved) into pixel statistics; the
 *  pixels stay in the page under `snapshot` (moving megabytes out of the page is slow). */
export function canvasPixels(page: Page, view = 0, snapshot = `s${Math.random()}`): Promise<PixelStats> {
  return page.evaluate(([v, name]) => {
    const gl = document.querySelector(`[data-testid="view-${v}"] canvas`) as HTMLCanvasElement;
    const c = document.createElement('canvas');
    c.width = gl.width;
    c.height = gl.height;
    const ctx = c.getContext('2d', { willReadFrequently: true })!;
    ctx.drawImage(gl, 0, 0);
    const d = ctx.getImageData(0, 0, c.width, c.height).data;
    const w = window as unknown as { __e2eSnaps?: Record<string, Uint8ClampedArray> };
    (w.__e2eSnaps ??= {})[name] = d;
    const bg = [0x0f, 0x13, 0x18];
    let drawn = 0;
    const seen = new Set<number>();
    for (let i = 0; i < d.length; i += 4) {
      if (Math.abs(d[i] - bg[0]) + Math.abs(d[i + 1] - bg[1]) + Math.abs(d[i + 2] - bg[2]) > 30) drawn++;
      seen.add(((d[i] >> 4) << 8) | ((d[i + 1] >> 4) << 4) | (d[i + 2] >> 4));
    }
    return { width: c.width, height: c.height, drawn: drawn / (d.length / 4), colours: seen.size, snapshot: name };
  }, [view, snapshot] as const);
}

/** Share of pixels whose colour changed by more than `tol` (sum over channels) between two
 *  snapshots taken with canvasPixels on the same page. */
export function pixelDifference(page: Page, a: PixelStats, b: PixelStats, tol = 24): Promise<number> {
  return page.evaluate(([x, y, t]) => {
    const snaps = (window as unknown as { __e2eSnaps: Record<string, Uint8ClampedArray> }).__e2eSnaps;
    const p = snaps[x], q = snaps[y];
    if (p.length !== q.length) return 1;
    let n = 0;
    for (let i = 0; i < p.length; i += 4) if (Math.abs(p[i] - q[i]) + Math.abs(p[i + 1] - q[i + 1]) + Math.abs(p[i + 2] - q[i + 2]) > t) n++;
    return n / (p.length / 4);
  }, [a.snapshot, b.snapshot, tol] as const);
}
