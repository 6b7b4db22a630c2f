// `axonloom view RUN_DIR` — serve the built viewer and a run on 127.0.0.1 and print the URL.
import { existsSync } from 'node:fs';
import { resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parseOptions, parseIntOption, UsageError, type Command } from './args.ts';
import { readRun, fsLoader, RunReadError } from '../io/runReader.ts';
import { startViewerServer, listRuns } from '../server/staticServer.ts';

const DEFAULT_PORT = 7317;
/** dist/viewer, built by `vite build` from viewer/ (vite.config.ts); AXONLOOM_VIEWER_DIR
 *  points elsewhere (tests, installs that keep the build apart). */
export function viewerBuildDir(): string {
  return resolve(process.env.AXONLOOM_VIEWER_DIR ?? fileURLToPath(new URL('../../dist/viewer/', import.meta.url)));
}

export const command: Command = {
  name: 'view',
  summary: 'replay a run in the browser viewer (serves on 127.0.0.1)',
  help: `Usage: axonloom view RUN_DIR [--port N] [--check]

Serves the viewer and the run in RUN_DIR (and the runs beside it, for comparing) on
127.0.0.1 only, prints the URL and serves until interrupted (Ctrl-C).

Options:
  --port N     port to listen on (default ${DEFAULT_PORT}; 0 picks a free one)
  --check      read the run and check the viewer build, print the URL it would serve,
               and exit without serving (for scripts)

URL parameters the viewer understands:
  ?run=NAME             which run beside RUN_DIR to open
  &t=0.5                time as a fraction of the run's duration
  &cam=PRESET           camera: oblique, top, side, end-on
  &compare=OTHER        show a second run side by side on the same timeline
`,
  async run(argv) {
    const { values, positionals } = parseOptions(argv, { port: { type: 'string' }, check: { type: 'boolean' } }, 'view');
    if (positionals.length !== 1) throw new UsageError(`view: expected one run directory (got ${positionals.length}; see 'axonloom view --help')`);
    const runDir = resolve(positionals[0]);
    const port = parseIntOption(values.port, '--port', 0, 65535) ?? DEFAULT_PORT;
    if (!existsSync(runDir)) throw new UsageError(`view: no such run directory: ${positionals[0]}`);

    // Read the whole run once here, so a broken run is reported in the terminal, not only in
    // the browser.
    try {
      const run = await readRun(fsLoader(runDir));
      process.stdout.write(`run "${run.manifest.name}"${run.manifest.variant ? ` (variant ${run.manifest.variant})` : ''}: ${run.manifest.axons} axons, ${run.manifest.frames} frames\n`);
    } catch (e) {
      if (e instanceof RunReadError) {
        process.stderr.write(`axonloom: view: ${runDir}: ${e.message}\n`);
        return 1;
      }
      throw e;
    }
    const viewerDir = viewerBuildDir();
    if (!existsSync(resolve(viewerDir, 'index.html'))) {
      process.stderr.write(`axonloom: view: the viewer is not built (no ${resolve(viewerDir, 'index.html')}); build it with 'npx vite build'\n`);
      return 1;
    }
    if (values.check) {
      const others = (await listRuns(resolve(runDir, '..'))).length - 1;
      process.stdout.write(`ok: would serve http://127.0.0.1:${port}/?run=${encodeURIComponent(runDir.split('/').pop() ?? '')}` +
        (others > 0 ? ` (and ${others} other run${others > 1 ? 's' : ''} beside it)` : '') + '\n');
      return 0;
    }

    const server = await startViewerServer({ viewerDir, runDir, port }).catch((e: Error) => {
      throw new UsageError(`view: ${e.message}`);
    });
    process.stdout.write(`viewer: ${server.url}\n(serving on 127.0.0.1 only; Ctrl-C to stop)\n`);
    await new Promise<void>((done) => {
      const stop = () => {
        process.off('SIGINT', stop);
        process.off('SIGTERM', stop);
        void server.close().then(done);
      };
      process.on('SIGINT', stop);
      process.on('SIGTERM', stop);
    });
    return 0;
  },
};
