// Scene errors a user can act on: every line names the file, the JSON path and the reason,
// e.g. `demo.json: cues[1].decay: must be > 0 (got -3)`. No stack traces for user mistakes.
import type { z } from 'zod';

export interface SceneProblem {
  path: (string | number)[];
  message: string;
}

export class SceneError extends Error {
  readonly file: string;
  readonly problems: SceneProblem[];
  constructor(file: string, problems: SceneProblem[]) {
    super(problems.map((p) => formatProblem(file, p)).join('\n'));
    this.name = 'SceneError';
    this.file = file;
    this.problems = problems;
  }
}

export function formatProblem(file: string, p: SceneProblem): string {
  const where = formatPath(p.path);
  return where ? `${file}: ${where}: ${p.message}` : `${file}: ${p.message}`;
}

/** ["cues", 1, "decay"] → "cues[1].decay" */
export function formatPath(path: readonly PropertyKey[]): string {
  let out = '';
  for (const part of path) {
    if (typeof part === 'number') out += `[${part}]`;
    else out += (out ? '.' : '') + String(part);
  }
  return out;
}

/** Turns zod issues into problems with messages in the project's words. `root` is the schema
 *  and `data` the parsed JSON, used to find the known keys for "did you mean" hints. */
export function problemsFromZod(issues: readonly z.core.$ZodIssue[], root: z.ZodType, data: unknown): SceneProblem[] {
  const out: SceneProblem[] = [];
  for (const issue of issues) {
    const path = issue.path.map((p) => (typeof p === 'symbol' ? String(p) : p)) as (string | number)[];
    if (issue.code === 'unrecognized_keys') {
      const known = knownKeysAt(root, data, path);
      for (const key of issue.keys) {
        const hint = closest(key, known);
        out.push({ path: [...path, key], message: `unknown key${hint ? ` (did you mean "${hint}"?)` : ''}` });
      }
      continue;
    }
    out.push({ path, message: describeIssue(issue, valueAt(data, path)) });
  }
  return out;
}

function describeIssue(issue: z.core.$ZodIssue, input: unknown): string {
  const got = ` (got ${show(input)})`;
  switch (issue.code) {
    case 'invalid_type':
      if (input === undefined) return 'is required';
      return `must be ${article(issue.expected)}${got}`;
    case 'too_small': {
      const op = issue.inclusive ? '>=' : '>';
      if (issue.origin === 'array') return Number(issue.minimum) === 1 ? 'must not be empty' : `must have at least ${issue.minimum} items`;
      if (issue.origin === 'string') return Number(issue.minimum) === 1 ? 'must not be empty' : `must be at least ${issue.minimum} characters`;
      return `must be ${op} ${issue.minimum}${got}`;
    }
    case 'too_big': {
      const op = issue.inclusive ? '<=' : '<';
      if (issue.origin === 'array') return `must have at most ${issue.maximum} items`;
      if (issue.origin === 'string') return `must be at most ${issue.maximum} characters`;
      return `must be ${op} ${issue.maximum}${got}`;
    }
    case 'invalid_union': {
      const u = issue as z.core.$ZodIssueInvalidUnion & { options?: unknown[]; discriminator?: string };
      if (u.options) return `must be one of ${u.options.map((o) => JSON.stringify(o)).join(', ')}${got}`;
      return `does not match any allowed form${got}`;
    }
    case 'invalid_value':
      return `must be one of ${issue.values.map((v) => JSON.stringify(v)).join(', ')}${got}`;
    case 'not_multiple_of':
      return `must be a multiple of ${issue.divisor}${got}`;
    case 'invalid_format':
      return `${issue.message}${got}`;
    default:
      return `${issue.message}${input === undefined ? '' : got}`;
  }
}

function article(expected: string): string {
  if (expected === 'int') return 'a whole number';
  if (expected === 'array' || expected === 'object') return `an ${expected}`;
  if (expected === 'tuple') return 'an array';
  return `a ${expected}`;
}

function show(v: unknown): string {
  if (v === undefined) return 'nothing';
  if (v === null) return 'null';
  if (Array.isArray(v)) return v.length > 4 ? `an array of ${v.length}` : JSON.stringify(v);
  if (typeof v === 'object') return 'an object';
  const s = JSON.stringify(v);
  return s.length > 40 ? s.slice(0, 37) + '…' : s;
}

export function valueAt(data: unknown, path: readonly (string | number)[]): unknown {
  let v: unknown = data;
  for (const p of path) {
    if (v === null || typeof v !== 'object') return undefined;
    v = (v as Record<string | number, unknown>)[p];
  }
  return v;
}

/** Walks the schema along a data path (choosing discriminated-union options by the data) and
 *  returns the keys the object there accepts. */
function knownKeysAt(root: z.ZodType, data: unknown, path: readonly (string | number)[]): string[] {
  let s: unknown = root;
  let v: unknown = data;
  for (let i = 0; i <= path.length; i++) {
    s = unwrap(s, v);
    if (i === path.length) break;
    const def = (s as { def?: { type: string } }).def;
    const key = path[i];
    v = v !== null && typeof v === 'object' ? (v as Record<string | number, unknown>)[key] : undefined;
    if (!def) return [];
    if (def.type === 'object') s = (s as z.ZodObject).shape[key as string];
    else if (def.type === 'array') s = (s as z.ZodArray<z.ZodType>).element;
    else if (def.type === 'record') s = (def as unknown as { valueType: unknown }).valueType;
    else if (def.type === 'tuple') s = (def as unknown as { items: unknown[] }).items[key as number];
    else return [];
  }
  const def = (s as { def?: { type: string } }).def;
  return def?.type === 'object' ? Object.keys((s as z.ZodObject).shape) : [];
}

function unwrap(s: unknown, value: unknown): unknown {
  for (let guard = 0; guard < 20; guard++) {
    const def = (s as { def?: { type: string; innerType?: unknown; in?: unknown; options?: unknown[]; discriminator?: string } }).def;
    if (!def) return s;
    if (def.type === 'optional' || def.type === 'default' || def.type === 'nullable' || def.type === 'prefault' || def.type === 'readonly') {
      s = def.innerType;
    } else if (def.type === 'pipe') {
      s = def.in;
    } else if (def.type === 'union' && def.options) {
      const disc = def.discriminator;
      const tag = disc && value && typeof value === 'object' ? (value as Record<string, unknown>)[disc] : undefined;
      const match = def.options.find((o) => {
        const f = (o as z.ZodObject).shape?.[disc ?? ''] as { def?: { values?: unknown[] } } | undefined;
        return f?.def?.values?.includes(tag);
      });
      if (!match) return s;
      s = match;
    } else return s;
  }
  return s;
}

/** The candidate within edit distance ≤ max(2, len/3) of `word`, if any (Levenshtein). */
export function closest(word: string, candidates: readonly string[]): string | undefined {
  let best: string | undefined;
  let bestD = Math.max(2, Math.floor(word.length / 3)) + 1;
  for (const c of candidates) {
    const d = editDistance(word.toLowerCase(), c.toLowerCase());
    if (d < bestD) {
      bestD = d;
      best = c;
    }
  }
  return best;
}

function editDistance(a: string, b: string): number {
  const prev = new Array<number>(b.length + 1);
  for (let j = 0; j <= b.length; j++) prev[j] = j;
  for (let i = 1; i <= a.length; i++) {
    let diag = prev[0];
    prev[0] = i;
    for (let j = 1; j <= b.length; j++) {
      const up = prev[j];
      prev[j] = Math.min(prev[j] + 1, prev[j - 1] + 1, diag + (a[i - 1] === b[j - 1] ? 0 : 1));
      diag = up;
    }
  }
  return prev[b.length];
}
