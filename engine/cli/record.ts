// `axonloom record RUN_DIR --out FILE.mp4|FILE.webm|FILE.png` — a video (or a still) of a replay,
// made by the viewer's own recorder (viewer/record) in headless Chromium: the viewer is served
// on 127.0.0.1, opened with playwright-core, and its window.__axonloomRecorder draws, encodes
// and muxes; the bytes come back here and are written to a temporary file beside the output,
// renamed into place only when complete. Every option is checked before Chromium starts.
import { closeSync, existsSync, mkdtempSync, openSync, renameSync, rmSync, statSync, unlinkSync, writeFileSync, writeSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { basename, dirname, join, relative, resolve } from 'node:path';
import type { Command } from './args.ts';
import { parseOptions, UsageError } from './args.ts';
import { ProgressBar } from './progress.ts';
import { viewerBuildDir } from './view.ts';
import { readRun, fsLoader, RunReadError } from '../io/runReader.ts';
import { RUN_FILES } from '../io/runFormat.ts';
import { startViewerServer, type ViewerServer } from '../server/staticServer.ts';
import { parseCameraPath, CAMERA_PATH_HELP } from '../../viewer/record/cameraPath.ts';
import {
  OVERLAYS, RecordOptionError, checkFraction, checkStillOptions, checkVideoOptions, frameCount, outputKind, parseOverlays, parseSize,
  type PictureOptions, type StillOptions, type VideoOptions,
} from '../../viewer/record/recordOptions.ts';
import type { PageOutcome } from '../../viewer/record/pageApi.ts';
import type { RecordStats } from '../../viewer/record/recorder.ts';

/** Debian's package; AXONLOOM_CHROMIUM points elsewhere. */
export const DEFAULT_CHROMIUM = '/usr/bin/chromium';
/** The page's own size: the interactive view it shows is not what is recorded, so small. */
const PAGE_VIEWPORT = { width: 800, height: 500 };
const READY_TIMEOUT_MS = 180_000;

const help = `Usage: axonloom record RUN_DIR --out FILE.mp4|FILE.webm [options]
       axonloom record RUN_DIR --out FILE.png --frame T [options]

Records a replay of the run in RUN_DIR frame by frame (not in real time: no frame is dropped
however slow the machine), with every axon drawn, in headless Chromium through the viewer's
own recorder. The video holds exactly fps × seconds frames of the asked size, the run's whole
duration spread over them. The container follows the extension: .mp4 is H.264 (plays best in
slide software), .webm is VP9. With --frame, writes one PNG instead.

Options:
  --out FILE          the video (.mp4, .webm) or still (.png) to write; its folder must exist
  --fps N             frames per second, 1–120 (default 30)
  --seconds S         length of the video (default 10)
  --size WxH          frame size in pixels, 16–7680 a side, even for video (default 1920x1080)
  --camera PATH       ${CAMERA_PATH_HELP} (default oblique)
  --title TEXT        title burnt into the picture (default: the run's name)
  --compare OTHER     a second run, shown to the right on the same timeline and camera; a run
                      directory beside RUN_DIR (its name or its path)
  --overlays LIST     what to burn in: ${OVERLAYS.join(', ')}; or all, none (default all)
  --frame T           write one PNG at time fraction T of the run (0 = start, 1 = end)
  --redraw            draw every frame anew instead of adding each frame's new path segments
                      to the last (the same picture, several times slower; for checking)
  --quiet             no progress bar
  -h, --help          this help

Needs Chromium (Debian: apt-get install chromium; or set AXONLOOM_CHROMIUM to its path) and the
built viewer (npx vite build; AXONLOOM_VIEWER_DIR points elsewhere).
Exit status: 0 success, 2 bad options, 1 anything else (no partial file is left behind).`;

export const command: Command = {
  name: 'record',
  summary: 'record a video (MP4, WebM) or a still (PNG) of a replay',
  help,
  async run(argv) {
    const { values, positionals } = parseOptions(negativeValues(argv), {
      out: { type: 'string' }, fps: { type: 'string' }, seconds: { type: 'string' }, size: { type: 'string' }, camera: { type: 'string' },
      title: { type: 'string' }, compare: { type: 'string' }, overlays: { type: 'string' }, frame: { type: 'string' }, quiet: { type: 'boolean' },
      redraw: { type: 'boolean' },
    }, 'record');
    const job = usage(() => checkRequest(positionals, values));

    const chromium = process.env.AXONLOOM_CHROMIUM ?? DEFAULT_CHROMIUM;
    if (!existsSync(chromium)) {
      process.stderr.write(`axonloom: record: no Chromium at ${chromium}; install it (Debian/Ubuntu: sudo apt-get install chromium) or set AXONLOOM_CHROMIUM to a Chromium or Chrome binary\n`);
      return 1;
    }
    const viewerDir = viewerBuildDir();
    if (!existsSync(join(viewerDir, 'index.html'))) {
      process.stderr.write(`axonloom: record: the viewer is not built (no ${join(viewerDir, 'index.html')}); build it with 'npx vite build'\n`);
      return 1;
    }
    // Read the runs here, so a damaged run is reported in the terminal, naming its file.
    const names: string[] = [];
    for (const dir of [job.runDir, job.compareDir].filter((d): d is string => d !== null)) {
      try {
        names.push((await readRun(fsLoader(dir))).manifest.name);
      } catch (e) {
        if (!(e instanceof RunReadError)) throw e;
        process.stderr.write(`axonloom: record: ${relative(process.cwd(), dir) || dir}: ${e.file}: ${e.message}\n`);
        return 1;
      }
    }
    const picture: PictureOptions = { ...job.picture, title: job.picture.title ?? names[0] };
    return await recordInBrowser(job, picture, chromium, viewerDir, !values.quiet);
  },
};

// --- private helpers ---

interface Job {
  runDir: string;
  compareDir: string | null;
  out: string;
  kind: 'mp4' | 'webm' | 'png';
  picture: Omit<PictureOptions, 'title'> & { title: string | undefined };
  fps: number;
  seconds: number;
  at: number | null;
  redraw: boolean;
}

type Values = Record<string, string | boolean | undefined>;

/** Every check that needs no browser, in the order a person would fix them. */
function checkRequest(positionals: string[], values: Values): Job {
  if (positionals.length !== 1) throw new UsageError(`record: expected one run directory (got ${positionals.length}; see 'axonloom record --help')`);
  const runDir = resolve(positionals[0]);
  checkRunDir(runDir, positionals[0], 'record');
  const outText = values.out as string | undefined;
  if (!outText) throw new UsageError("record: --out FILE.mp4, FILE.webm or FILE.png is required (see 'axonloom record --help')");
  const out = resolve(outText);
  const kind = outputKind(out);
  if (!kind) throw new UsageError(`record: --out must end in .mp4 (H.264), .webm (VP9) or .png (a still, with --frame) (got "${outText}")`);
  const folder = dirname(out);
  if (!existsSync(folder) || !statSync(folder).isDirectory()) throw new UsageError(`record: --out: the folder ${dirname(outText) || '.'} does not exist`);
  if (existsSync(out) && statSync(out).isDirectory()) throw new UsageError(`record: --out: ${outText} is a folder`);
  const frameText = values.frame as string | undefined;
  if (kind === 'png' && frameText === undefined) throw new UsageError('record: a .png output is a still: give --frame T (time fraction 0–1)');
  if (kind !== 'png' && frameText !== undefined) throw new UsageError(`record: --frame writes a still: give --out FILE.png (got "${outText}")`);

  const video = kind !== 'png';
  const { width, height } = parseSize((values.size as string | undefined) ?? '1920x1080', video);
  const fps = numberOption(values.fps, '--fps', 30);
  const seconds = numberOption(values.seconds, '--seconds', 10);
  const at = frameText === undefined ? null : numberOption(frameText, '--frame', 1);
  const cameraText = (values.camera as string | undefined) ?? 'oblique';
  let camera;
  try {
    camera = parseCameraPath(cameraText);
  } catch (e) {
    throw new UsageError(`record: ${(e as Error).message}`);
  }
  const overlays = parseOverlays((values.overlays as string | undefined) ?? 'all');
  const title = values.title as string | undefined;
  let compareDir: string | null = null;
  if (values.compare !== undefined) compareDir = compareRun(values.compare as string, runDir);

  const picture = { width, height, camera, overlays, title };
  if (video) {
    frameCount(fps, seconds);
    checkVideoOptions({ ...picture, title: title ?? '', container: kind, fps, seconds });
  } else {
    checkFraction(at!);
    checkStillOptions({ ...picture, title: title ?? '', at: at! });
  }
  return { runDir, compareDir, out, kind, picture, fps, seconds, at, redraw: values.redraw === true };
}

/** The second run: a path, or a name beside the first; the server serves one folder of runs,
 *  so it must sit beside RUN_DIR. */
function compareRun(text: string, runDir: string): string {
  const asPath = resolve(text);
  const beside = join(dirname(runDir), text);
  const dir = existsSync(asPath) ? asPath : existsSync(beside) ? beside : null;
  if (!dir) throw new UsageError(`record: --compare: no such run directory: ${text}`);
  checkRunDir(dir, text, 'record: --compare');
  if (resolve(dirname(dir)) !== resolve(dirname(runDir))) {
    throw new UsageError(`record: --compare: ${text} must sit in the same folder as ${basename(runDir)} (${dirname(runDir)}); move or copy it there`);
  }
  if (basename(dir) === basename(runDir)) throw new UsageError('record: --compare names the same run as RUN_DIR');
  return dir;
}

function checkRunDir(dir: string, text: string, what: string): void {
  if (!existsSync(dir) || !statSync(dir).isDirectory()) throw new UsageError(`${what}: no such run directory: ${text}`);
  if (!existsSync(join(dir, RUN_FILES.manifest))) throw new UsageError(`${what}: ${text} is not a run directory (it has no ${RUN_FILES.manifest})`);
}

/** "--seconds -1" → "--seconds=-1": parseArgs takes a value that starts with a dash for an
 *  option, and the person would read "ambiguous" instead of what is wrong with the number. */
function negativeValues(argv: string[]): string[] {
  const out: string[] = [];
  for (let i = 0; i < argv.length; i++) {
    if (/^--(fps|seconds|frame|size)$/.test(argv[i]) && /^-[\d.]/.test(argv[i + 1] ?? '')) out.push(`${argv[i]}=${argv[++i]}`);
    else out.push(argv[i]);
  }
  return out;
}

function numberOption(text: string | boolean | undefined, what: string, dflt: number): number {
  if (text === undefined) return dflt;
  const s = String(text).trim();
  const n = Number(s);
  if (s === '' || !Number.isFinite(n)) throw new UsageError(`record: ${what} must be a number (got "${text}")`);
  return n;
}

/** Runs `f`, turning the shared option checks' errors into usage errors (exit 2). */
function usage<T>(f: () => T): T {
  try {
    return f();
  } catch (e) {
    if (e instanceof RecordOptionError) throw new UsageError(`record: ${e.message}`);
    throw e;
  }
}

async function recordInBrowser(job: Job, picture: PictureOptions, executablePath: string, viewerDir: string, progress: boolean): Promise<number> {
  const { chromium } = await import('playwright-core');
  const temp = join(dirname(job.out), `.${basename(job.out)}.${process.pid}.tmp`);
  const profile = mkdtempSync(join(tmpdir(), 'axonloom-record-'));
  let server: ViewerServer | null = null;
  let browser: Awaited<ReturnType<typeof chromium.launchPersistentContext>> | null = null;
  let fd: number | null = null;
  let interrupted = false;
  const bar = new ProgressBar(`record ${basename(job.out)}`, progress);
  const onSignal = () => {
    interrupted = true;
    void browser?.close().catch(() => {});
  };
  process.on('SIGINT', onSignal);
  process.on('SIGTERM', onSignal);
  const t0 = performance.now();
  try {
    server = await startViewerServer({ viewerDir, runDir: job.runDir, port: 0 });
    browser = await chromium.launchPersistentContext(profile, {
      headless: true,
      executablePath,
      viewport: PAGE_VIEWPORT,
      args: ['--no-sandbox', '--disable-quic', '--use-angle=swiftshader', '--enable-unsafe-swiftshader', '--disable-background-networking',
        '--disable-component-update', '--disable-sync', '--no-first-run'],
    });
    const page = await browser.newPage();
    const pageErrors: string[] = [];
    page.on('pageerror', (e) => pageErrors.push(e.message));
    // the page's own view at the start of the run: few segments, so it is drawn and done with
    // quickly and does not compete with the recorder for the (software) GPU
    const q = new URLSearchParams({ run: basename(job.runDir), t: '0' });
    if (job.compareDir) q.set('compare', basename(job.compareDir));
    bar.message('record: opening the viewer in headless Chromium…');
    await page.goto(`${server.origin}/?${q}`, { waitUntil: 'commit' });
    await page.waitForSelector('#axonloom[data-run-state="ready"], #axonloom[data-run-state="error"]', { timeout: READY_TIMEOUT_MS });
    if ((await page.getAttribute('#axonloom', 'data-run-state')) === 'error') {
      const text = (await page.locator('[data-testid="error"]').innerText().catch(() => '')).split('\n').filter(Boolean).slice(0, 2).join(': ');
      throw new Error(`the viewer could not open the run: ${text || pageErrors[0] || 'unknown error'}`);
    }
    const hasRecorder = await page.waitForFunction(() => window.__axonloomRecorder?.version === 1, undefined, { timeout: 15_000 }).then(() => true, () => false);
    if (!hasRecorder) throw new Error(`the viewer build in ${viewerDir} has no recorder (built before 'record' existed?); rebuild it with 'npx vite build'`);

    let outcome: PageOutcome<{ frames?: number; bytes: number }>;
    if (job.kind === 'png') {
      const opts: StillOptions = { ...picture, at: job.at! };
      const r = await page.evaluate(`window.__axonloomRecorder.still(${JSON.stringify(opts)})`) as PageOutcome<{ png: string; bytes: number }>;
      if (r.ok) writeFileSync(temp, Buffer.from(r.value.png, 'base64'));
      outcome = r;
    } else {
      fd = openSync(temp, 'w');
      const out = fd;
      await page.exposeFunction('__axonloomRecordWrite', (position: number, base64: string) => {
        const buf = Buffer.from(base64, 'base64');
        let off = 0;
        while (off < buf.length) off += writeSync(out, buf, off, buf.length - off, position + off);
      });
      await page.exposeFunction('__axonloomRecordProgress', (done: number, total: number) => bar.update(done, total, `frame ${done}/${total}`));
      const opts: VideoOptions = { ...picture, container: job.kind, fps: job.fps, seconds: job.seconds, redraw: job.redraw };
      bar.message('record: preparing the first frame…');
      outcome = await page.evaluate(`window.__axonloomRecorder.record(${JSON.stringify(opts)},
        (p, d) => window.__axonloomRecordWrite(p, d), (d, n) => window.__axonloomRecordProgress(d, n))`) as PageOutcome<RecordStats>;
      closeSync(fd);
      fd = null;
    }
    bar.done();
    if (!outcome.ok) {
      process.stderr.write(`axonloom: record: ${outcome.message}\n`);
      return 1;
    }
    renameSync(temp, job.out);
    const rel = relative(process.cwd(), job.out) || job.out;
    const secs = (performance.now() - t0) / 1000;
    if (job.kind === 'png') {
      process.stdout.write(`wrote ${rel}: ${picture.width}×${picture.height} PNG at time fraction ${job.at} (${(outcome.value.bytes / 1024).toFixed(0)} KB) in ${secs.toFixed(1)} s\n`);
    } else {
      const s = outcome.value as RecordStats;
      process.stdout.write(`wrote ${rel}: ${s.width}×${s.height}, ${s.frames} frames at ${s.fps} fps (${s.seconds} s), ${s.codecLabel} ${s.codec} in ${s.container.toUpperCase()}, `
        + `${(s.bytes / 2 ** 20).toFixed(2)} MB, in ${secs.toFixed(1)} s (${s.framesPerSecond.toFixed(2)} frames/s drawn and encoded)\n`);
    }
    return 0;
  } catch (e) {
    bar.done();
    if (interrupted) {
      process.stderr.write('axonloom: record: interrupted; nothing written\n');
      return 130;
    }
    const msg = (e as Error).message.split('\n')[0];
    process.stderr.write(`axonloom: record: ${msg}\n`);
    return 1;
  } finally {
    process.off('SIGINT', onSignal);
    process.off('SIGTERM', onSignal);
    if (fd !== null) closeSync(fd);
    if (existsSync(temp)) unlinkSync(temp);
    await browser?.close().catch(() => {});
    await server?.close();
    rmSync(profile, { recursive: true, force: true });
  }
}
