// The viewer server answers only for the viewer's files and files inside run directories.
// The attack strings are the classic path-traversal forms ("../", percent-encoded "%2e%2e",
// encoded separators "%2f" / "%5c", absolute paths, symbolic links pointing out), as listed in
// OWASP's "Path Traversal" attack page (from memory). Requests are sent with node:http and a raw
// path, because fetch() would normalise "../" away before it ever reached the server.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { request } from 'node:http';
import { mkdirSync, mkdtempSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { startViewerServer, type ViewerServer } from '../../engine/server/staticServer.ts';
import { parseRequestPath } from '../../engine/server/requestPath.ts';
import { makeRun } from '../fixtures/makeRun.ts';

function get(port: number, path: string, opts: { method?: string; host?: string } = {}): Promise<{ status: number; body: string }> {
  return new Promise((resolve, reject) => {
    const req = request({ host: '127.0.0.1', port, path, method: opts.method ?? 'GET', headers: { host: opts.host ?? `127.0.0.1:${port}` } }, (res) => {
      let body = '';
      res.setEncoding('latin1');
      res.on('data', (c) => (body += c));
      res.on('end', () => resolve({ status: res.statusCode ?? 0, body }));
    });
    req.on('error', reject);
    req.end();
  });
}

describe('parseRequestPath', () => {
  it('maps the two trees', () => {
    expect(parseRequestPath('/')).toEqual({ tree: 'viewer', segments: ['index.html'] });
    expect(parseRequestPath('/assets/app.js?x=1')).toEqual({ tree: 'viewer', segments: ['assets', 'app.js'] });
    expect(parseRequestPath('/runs/demo/fields/a%20b.npy')).toEqual({ tree: 'run', run: 'demo', segments: ['fields', 'a b.npy'] });
    expect(parseRequestPath('/runs/index.json')).toEqual({ tree: 'run-list' });
  });
  it('refuses traversal in every spelling', () => {
    for (const p of [
      '/../etc/passwd', '/runs/demo/../../x', '/runs/demo/%2e%2e/%2e%2e/x', '/runs/demo/%2E%2E/x', '/runs/%2e%2e/x/y',
      '/runs/demo/..%2fx', '/runs/demo/..%5cx', '/runs/demo/a\\..\\x', '//etc/passwd', '/runs/demo/x%00.json', '/runs/demo//x',
      '/runs/.demo.partial-1-ab/run.json', '/runs/demo/.hidden', '/%e0%a4%a', 'etc/passwd', '/runs/demo',
    ]) expect(parseRequestPath(p), p).toBeNull();
  });
});

describe('viewer server', () => {
  let server: ViewerServer;
  let base: string;
  beforeAll(async () => {
    base = mkdtempSync(join(tmpdir(), 'axl-srv-'));
    const viewer = join(base, 'viewer');
    mkdirSync(join(viewer, 'assets'), { recursive: true });
    writeFileSync(join(viewer, 'index.html'), '<!doctype html><title>v</title>');
    writeFileSync(join(viewer, 'assets', 'app.js'), 'console.log(1)');
    writeFileSync(join(base, 'secret.txt'), 'TOP SECRET');
    const runs = join(base, 'runs');
    makeRun(join(runs, 'fx'), { axons: 8, frames: 4 });
    makeRun(join(runs, 'other'), { axons: 8, frames: 4 });
    writeFileSync(join(runs, 'beside.txt'), 'TOP SECRET');
    mkdirSync(join(runs, 'notarun'));
    writeFileSync(join(runs, 'notarun', 'data.txt'), 'TOP SECRET');
    symlinkSync(join(base, 'secret.txt'), join(runs, 'fx', 'link-out.csv'));
    symlinkSync(join(runs, 'fx', 'run.json'), join(runs, 'fx', 'link-in.json'));
    symlinkSync(join(base, 'secret.txt'), join(viewer, 'assets', 'leak.js'));
    // a "run" that is a link to a folder outside the runs tree
    const outside = join(base, 'outside-run');
    makeRun(outside, { axons: 8, frames: 4 });
    writeFileSync(join(outside, 'notes.txt'), 'TOP SECRET');
    symlinkSync(outside, join(runs, 'linked'));
    server = await startViewerServer({ viewerDir: viewer, runDir: join(runs, 'fx'), port: 0 });
  });
  afterAll(async () => server?.close());

  it('binds to 127.0.0.1 and prints a URL that opens the run', () => {
    expect(server.url).toBe(`http://127.0.0.1:${server.port}/?run=fx`);
  });

  it('serves the viewer, the run and the runs beside it', async () => {
    expect((await get(server.port, '/')).body).toContain('<title>v</title>');
    expect((await get(server.port, '/assets/app.js')).status).toBe(200);
    const m = await get(server.port, '/runs/fx/run.json');
    expect(m.status).toBe(200);
    expect(JSON.parse(m.body).axons).toBe(8);
    expect((await get(server.port, '/runs/other/axons.csv')).status).toBe(200);
    expect((await get(server.port, '/runs/fx/link-in.json')).status).toBe(200); // a link that stays inside
    expect(JSON.parse((await get(server.port, '/runs/index.json')).body)).toEqual({ default: 'fx', runs: ['fx', 'other'] });
  });

  it('refuses every escape with 404 and leaks nothing', async () => {
    const attempts = [
      '/../secret.txt', '/runs/fx/../../secret.txt', '/runs/fx/%2e%2e/%2e%2e/secret.txt', '/runs/fx/%2E%2E%2F%2E%2E%2Fsecret.txt',
      '/%2e%2e/secret.txt', '/runs/fx/..%5c..%5csecret.txt', '//' + join(base, 'secret.txt'), join(base, 'secret.txt'),
      '/runs/fx/link-out.csv', '/assets/leak.js', '/runs/beside.txt', '/runs/notarun/data.txt', '/runs/linked/notes.txt',
      '/runs/linked/run.json', '/runs/fx/%252e%252e/secret.txt', '/runs/fx/', '/runs/fx/fields', '/etc/passwd',
    ];
    for (const p of attempts) {
      const r = await get(server.port, p);
      expect(r.status, p).toBe(404);
      expect(r.body, p).not.toContain('TOP SECRET');
    }
  });

  it('refuses other methods and foreign Host headers (DNS rebinding)', async () => {
    expect((await get(server.port, '/runs/fx/run.json', { method: 'POST' })).status).toBe(405);
    expect((await get(server.port, '/runs/fx/run.json', { host: 'evil.example:80' })).status).toBe(404);
  });
});
