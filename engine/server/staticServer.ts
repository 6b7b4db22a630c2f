// The viewer's HTTP server (Node only): the built viewer's files, the run being viewed and the
// runs beside it, read-only, on 127.0.0.1. Nothing else on the disk is reachable: a request is
// first parsed by parseRequestPath (which refuses "..", encoded escapes and the like), then the
// file it names is resolved with symbolic links followed and must still lie inside its tree.
// Every refusal is a plain 404, so a probe learns nothing about what exists outside.

import { createServer, type IncomingMessage, type Server, type ServerResponse } from 'node:http';
import { createReadStream } from 'node:fs';
import { readdir, realpath, stat } from 'node:fs/promises';
import { basename, dirname, extname, join, relative, sep, isAbsolute } from 'node:path';
import { parseRequestPath } from './requestPath.ts';
import { RUN_FILES, isRunDirName } from '../io/runFormat.ts';

export interface ViewerServerOptions {
  /** the built viewer (dist/viewer) */
  viewerDir: string;
  /** the run to open by default; the folder it sits in is the runs tree */
  runDir: string;
  /** 0 picks a free port */
  port?: number;
}

export interface ViewerServer {
  /** http://127.0.0.1:PORT/?run=NAME */
  url: string;
  origin: string;
  port: number;
  runName: string;
  close(): Promise<void>;
}

/** The only address the server listens on: the viewer is for the person at this machine. */
export const VIEWER_HOST = '127.0.0.1';

export async function startViewerServer(opts: ViewerServerOptions): Promise<ViewerServer> {
  const viewerRoot = await realpath(opts.viewerDir);
  const runReal = await realpath(opts.runDir);
  const runsRoot = dirname(runReal);
  const runName = basename(runReal);
  if (!isRunDirName(runName)) throw new Error(`cannot serve ${opts.runDir}: a run directory's name may not start with "."`);

  const server = createServer((req, res) => {
    handle(req, res, viewerRoot, runsRoot, runName).catch(() => send(res, 500, 'internal error'));
  });
  const port = await listen(server, opts.port ?? 0);
  const origin = `http://${VIEWER_HOST}:${port}`;
  return {
    url: `${origin}/?run=${encodeURIComponent(runName)}`,
    origin,
    port,
    runName,
    close: () => new Promise<void>((resolve) => {
      server.close(() => resolve());
      server.closeAllConnections();
    }),
  };
}

/** Run directories in the runs tree: visible names that hold a run.json. */
export async function listRuns(runsRoot: string): Promise<string[]> {
  const out: string[] = [];
  for (const e of await readdir(runsRoot, { withFileTypes: true })) {
    if (!isRunDirName(e.name) || !e.isDirectory()) continue;
    const s = await stat(join(runsRoot, e.name, RUN_FILES.manifest)).catch(() => null);
    if (s?.isFile()) out.push(e.name);
  }
  return out.sort();
}

// --- private helpers ---

const TYPES: Record<string, string> = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.json': 'application/json; charset=utf-8',
  '.csv': 'text/csv; charset=utf-8',
  '.swc': 'text/plain; charset=utf-8',
  '.txt': 'text/plain; charset=utf-8',
  '.svg': 'image/svg+xml',
  '.png': 'image/png',
  '.ico': 'image/x-icon',
  '.map': 'application/json; charset=utf-8',
  '.npy': 'application/octet-stream',
  '.webm': 'video/webm',
};

async function handle(req: IncomingMessage, res: ServerResponse, viewerRoot: string, runsRoot: string, runName: string): Promise<void> {
  if (req.method !== 'GET' && req.method !== 'HEAD') {
    res.setHeader('Allow', 'GET, HEAD');
    return send(res, 405, 'method not allowed');
  }
  // A page on another site could point a name it controls at 127.0.0.1 (DNS rebinding); such
  // requests carry that name in Host, so anything but our own address is refused.
  const host = req.headers.host ?? '';
  if (!/^(127\.0\.0\.1|localhost)(:\d+)?$/.test(host)) return send(res, 404, 'not found');

  const target = parseRequestPath(req.url ?? '');
  if (!target) return send(res, 404, 'not found');
  if (target.tree === 'run-list') {
    const body = JSON.stringify({ default: runName, runs: await listRuns(runsRoot) });
    res.writeHead(200, { 'Content-Type': TYPES['.json'], 'Cache-Control': 'no-store', 'X-Content-Type-Options': 'nosniff' });
    res.end(req.method === 'HEAD' ? undefined : body);
    return;
  }
  let root: string;
  let file: string | null;
  if (target.tree === 'viewer') {
    root = viewerRoot;
    file = await insideFile(viewerRoot, target.segments);
  } else {
    // The run folder must be a real folder directly in the runs tree (not a link to elsewhere)
    // holding run.json, and the file must lie inside that one run.
    root = runsRoot;
    const runDir = await realpath(join(runsRoot, target.run)).catch(() => null);
    const ok = runDir !== null && dirname(runDir) === runsRoot && (await insideFile(runDir, [RUN_FILES.manifest])) !== null;
    file = ok ? await insideFile(runDir, target.segments) : null;
  }
  if (!file) return send(res, 404, 'not found');
  const st = await stat(file);
  res.writeHead(200, {
    'Content-Type': TYPES[extname(file).toLowerCase()] ?? 'application/octet-stream',
    'Content-Length': st.size,
    'Cache-Control': root === viewerRoot ? 'no-cache' : 'no-store',
    'X-Content-Type-Options': 'nosniff',
  });
  if (req.method === 'HEAD') return void res.end();
  await new Promise<void>((resolve) => {
    const stream = createReadStream(file, { highWaterMark: 1 << 20 }); // 1 MiB reads: frame files are tens of MB
    stream.on('error', () => {
      res.destroy();
      resolve();
    });
    stream.on('end', resolve);
    stream.pipe(res);
  });
}

/** The regular file at root/segments, only if it lies inside root after following symbolic
 *  links; null otherwise (absent, a folder, or outside). `root` is already a real path. */
async function insideFile(root: string, segments: string[]): Promise<string | null> {
  const joined = join(root, ...segments);
  if (!isInside(root, joined)) return null;
  let real: string;
  try {
    real = await realpath(joined);
  } catch {
    return null;
  }
  if (!isInside(root, real)) return null;
  const st = await stat(real).catch(() => null);
  return st?.isFile() ? real : null;
}

function isInside(root: string, p: string): boolean {
  const rel = relative(root, p);
  return rel !== '' && !rel.startsWith('..' + sep) && rel !== '..' && !isAbsolute(rel);
}

function send(res: ServerResponse, code: number, text: string): void {
  if (res.headersSent) return void res.destroy();
  res.writeHead(code, { 'Content-Type': 'text/plain; charset=utf-8', 'X-Content-Type-Options': 'nosniff' });
  res.end(text + '\n');
}

function listen(server: Server, port: number): Promise<number> {
  return new Promise((resolve, reject) => {
    const onError = (e: NodeJS.ErrnoException) => {
      reject(e.code === 'EADDRINUSE' ? new Error(`port ${port} on ${VIEWER_HOST} is already in use (pick another with --port, or --port 0 for any free one)`) : e);
    };
    server.once('error', onError);
    server.listen(port, VIEWER_HOST, () => {
      server.off('error', onError);
      const addr = server.address();
      resolve(typeof addr === 'object' && addr ? addr.port : port);
    });
  });
}
