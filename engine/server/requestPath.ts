// Turning a request URL into something the viewer server may answer, or null. Pure: the only
// job here is deciding, from the text of the URL alone, which of the two trees (the built viewer,
// the runs) a request names and by which segments. The file system checks that follow (the
// resolved file must really lie inside its tree once symbolic links are followed) live in
// staticServer.ts.
//
// Everything suspicious is refused rather than normalised: a segment starting with "." (so
// "..", ".", and hidden files), in any percent-encoding; an encoded "/" or "\" inside a segment; NUL; empty segments ("//"), which
// some path joins treat as a root. Normalising would mean agreeing with every later path
// function about what the result means; refusing means never having to.

import { isRunDirName } from '../io/runFormat.ts';

export type RequestTarget =
  | { tree: 'viewer'; segments: string[] }
  | { tree: 'run'; run: string; segments: string[] }
  | { tree: 'run-list' };

/** The URL prefix under which runs are served: /runs/<name>/<file>. */
export const RUNS_PREFIX = 'runs';

export function parseRequestPath(rawUrl: string): RequestTarget | null {
  const q = rawUrl.search(/[?#]/);
  const path = q < 0 ? rawUrl : rawUrl.slice(0, q);
  if (!path.startsWith('/') || path.startsWith('//')) return null;
  const raw = path.slice(1).split('/');
  // a trailing slash names the folder's index only at the root; elsewhere folders are not listed
  if (raw.length === 1 && raw[0] === '') return { tree: 'viewer', segments: ['index.html'] };
  const segments: string[] = [];
  for (const part of raw) {
    let s: string;
    try {
      s = decodeURIComponent(part);
    } catch {
      return null; // malformed percent-encoding
    }
    if (s === '' || s.startsWith('.') || /[/\\\0]/.test(s) || /[\\\0]/.test(part)) return null;
    segments.push(s);
  }
  if (segments[0] !== RUNS_PREFIX) return { tree: 'viewer', segments };
  if (segments.length === 2 && segments[1] === 'index.json') return { tree: 'run-list' };
  if (segments.length < 3 || !isRunDirName(segments[1])) return null;
  return { tree: 'run', run: segments[1], segments: segments.slice(2) };
}
