// Reading a scene: JSON text → validated, resolved Scene, or a SceneError that names the file,
// the JSON path and the reason for every problem found.
import { readFileSync } from 'node:fs';
import { basename } from 'node:path';
import { Scene, Edit } from './schema.ts';
import type { Scene as SceneT, Edit as EditT } from './schema.ts';
import { SceneError, problemsFromZod, closest, type SceneProblem } from './errors.ts';

/** Largest grid the engine will solve or store: 64 M nodes (≈ 0.5 GB as float64). */
export const MAX_GRID_NODES = 64_000_000;

export function loadScene(file: string): SceneT {
  const label = basename(file);
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new SceneError(label, [{ path: [], message: code === 'ENOENT' ? `no such file (${file})` : `cannot read (${code})` }]);
  }
  return parseScene(text, label);
}

export function parseScene(text: string, label = 'scene.json'): SceneT {
  const data = parseJson(text, label);
  const result = Scene.safeParse(data, { reportInput: true });
  if (!result.success) throw new SceneError(label, problemsFromZod(result.error.issues, Scene, data));
  const scene = resolveDefaults(result.data);
  const problems = checkScene(scene);
  if (problems.length) throw new SceneError(label, problems);
  return scene;
}

/** JSON.parse with the failure given as line and column. */
export function parseJson(text: string, label: string): unknown {
  if (text.trim() === '') throw new SceneError(label, [{ path: [], message: 'file is empty (expected a JSON object)' }]);
  try {
    return JSON.parse(text);
  } catch (e) {
    const msg = (e as Error).message;
    const m = /at position (\d+)/.exec(msg);
    const pos = m ? Number(m[1]) : text.length;
    const before = text.slice(0, pos);
    const line = before.split('\n').length;
    const column = pos - before.lastIndexOf('\n');
    const reason = msg.replace(/ in JSON at position \d+.*$/, '').replace(/^Unexpected end of JSON input$/, 'unexpected end of file');
    throw new SceneError(label, [{ path: [], message: `invalid JSON at line ${line}, column ${column}: ${reason}` }]);
  }
}

/** Parses an edit given on the command line (`--perturb '<json>'`). */
export function parseEdit(text: string, label = '--perturb'): EditT {
  const data = parseJson(text, label);
  const r = Edit.safeParse(data, { reportInput: true });
  if (!r.success) throw new SceneError(label, problemsFromZod(r.error.issues, Edit, data));
  return r.data;
}

function resolveDefaults(scene: SceneT): SceneT {
  for (const cue of scene.cues) {
    if (cue.kind === 'point') {
      cue.radius ??= scene.volume.voxel;
      if (cue.solve === 'grid') cue.boundary ??= 'absorbing';
    }
  }
  return scene;
}

/** Checks that zod cannot: names unique and references resolvable, geometry sane, sizes sane. */
export function checkScene(scene: SceneT): SceneProblem[] {
  const problems: SceneProblem[] = [];
  const push = (path: (string | number)[], message: string) => problems.push({ path, message });
  const { size, voxel } = scene.volume;

  const nodes = size.reduce((n, s) => n * (Math.round(s / voxel) + 1), 1);
  if (nodes > MAX_GRID_NODES) {
    push(['volume', 'voxel'], `gives a grid of ${fmtInt(nodes)} nodes, more than the ${fmtInt(MAX_GRID_NODES)} allowed; use a larger voxel`);
  }
  if (size.some((s) => s < voxel)) push(['volume', 'voxel'], `must not exceed the volume size (got ${voxel})`);

  const regions = uniqueNames(scene.regions, 'regions', 'region', push);
  const cues = uniqueNames(scene.cues, 'cues', 'cue', push);
  uniqueNames(scene.populations, 'populations', 'population', push);

  scene.regions.forEach((r, i) => {
    if (r.shape === 'box') {
      for (let a = 0; a < 3; a++) if (!(r.max[a] > r.min[a])) push(['regions', i, 'max', a], `must be greater than min[${a}] (got ${r.max[a]} ≤ ${r.min[a]})`);
    } else if (r.shape === 'sheet') {
      const [ux, uy, uz] = r.uAxis;
      const [vx, vy, vz] = r.vAxis;
      const cx = uy * vz - uz * vy, cy = uz * vx - ux * vz, cz = ux * vy - uy * vx;
      if (Math.hypot(ux, uy, uz) === 0) push(['regions', i, 'uAxis'], 'must not be zero');
      else if (Math.hypot(vx, vy, vz) === 0) push(['regions', i, 'vAxis'], 'must not be zero');
      else if (Math.hypot(cx, cy, cz) < 1e-9 * Math.hypot(ux, uy, uz) * Math.hypot(vx, vy, vz)) push(['regions', i, 'vAxis'], 'must not be parallel to uAxis');
    }
  });

  const refRegion = (path: (string | number)[], nameRef: string, shapes: string[]) => {
    const r = regions.get(nameRef);
    if (!r) push(path, `no region named "${nameRef}"${suggest(nameRef, [...regions.keys()])}`);
    else if (!shapes.includes(r.shape)) push(path, `region "${nameRef}" is a ${r.shape}; expected ${shapes.join(' or ')}`);
  };
  const refCue = (path: (string | number)[], nameRef: string) => {
    if (!cues.has(nameRef)) push(path, `no cue named "${nameRef}"${suggest(nameRef, [...cues.keys()])}`);
  };

  scene.cues.forEach((c, i) => {
    if (c.kind === 'point') {
      c.position.forEach((x, a) => {
        if (x < 0 || x > size[a]) push(['cues', i, 'position', a], `must lie inside the volume [0, ${size[a]}] (got ${x})`);
      });
      (c.extraSources ?? []).forEach((e, j) => e.position.forEach((x, a) => {
        if (x < 0 || x > size[a]) push(['cues', i, 'extraSources', j, 'position', a], `must lie inside the volume [0, ${size[a]}] (got ${x})`);
      }));
      if (c.solve === 'analytic' && c.boundary) push(['cues', i, 'boundary'], 'applies only with solve "grid"');
    } else if (c.kind === 'region') refRegion(['cues', i, 'region'], c.region, ['box', 'ellipsoid']);
    else if (c.kind === 'expressed') refRegion(['cues', i, 'region'], c.region, ['sheet']);
    else if (c.kind === 'relay') {
      const r = regions.get(c.region);
      refRegion(['cues', i, 'region'], c.region, ['sheet', 'box']);
      if (r?.shape === 'sheet' && !['u', 'v'].includes(c.axis)) push(['cues', i, 'axis'], `must be "u" or "v" for a sheet (got "${c.axis}")`);
      if (r?.shape === 'box' && !['x', 'y', 'z'].includes(c.axis)) push(['cues', i, 'axis'], `must be "x", "y" or "z" for a box (got "${c.axis}")`);
    }
  });

  const receptorNames = new Set<string>();
  scene.populations.forEach((p, i) => {
    refRegion(['populations', i, 'source'], p.source, ['sheet']);
    if (p.target !== undefined) refRegion(['populations', i, 'target'], p.target, ['box', 'ellipsoid', 'sheet']);
    if (p.direction && Math.hypot(...p.direction) === 0) push(['populations', i, 'direction'], 'must not be zero');
    const seen = new Set<string>();
    p.receptors.forEach((r, j) => {
      if (seen.has(r.name)) push(['populations', i, 'receptors', j, 'name'], `duplicate receptor name "${r.name}"`);
      seen.add(r.name);
      receptorNames.add(r.name);
      refCue(['populations', i, 'receptors', j, 'binds'], r.binds);
    });
  });

  for (const [variant, edits] of Object.entries(scene.variants)) {
    edits.forEach((e, j) => problems.push(...checkEdit(scene, e, ['variants', variant, j], receptorNames)));
  }
  return problems;
}

/** An edit refers to things that exist; shared by variants and ad-hoc `--perturb` edits. */
export function checkEdit(scene: SceneT, e: EditT, path: (string | number)[], receptors?: Set<string>): SceneProblem[] {
  const problems: SceneProblem[] = [];
  const cueNames = scene.cues.map((c) => c.name);
  if ('cue' in e && !cueNames.includes(e.cue)) {
    problems.push({ path: [...path, 'cue'], message: `no cue named "${e.cue}"${suggest(e.cue, cueNames)}` });
  }
  if (e.op === 'source') {
    const cue = scene.cues.find((c) => c.name === e.cue);
    if (cue && cue.kind !== 'point') problems.push({ path: [...path, 'cue'], message: `"${e.cue}" is a ${cue.kind} cue; "source" moves point cues only` });
    e.position.forEach((x, a) => {
      if (x < 0 || x > scene.volume.size[a]) problems.push({ path: [...path, 'position', a], message: `must lie inside the volume [0, ${scene.volume.size[a]}] (got ${x})` });
    });
  }
  if (e.op === 'knockin') {
    const all = receptors ?? new Set(scene.populations.flatMap((p) => p.receptors.map((r) => r.name)));
    if (!all.has(e.receptor)) problems.push({ path: [...path, 'receptor'], message: `no receptor named "${e.receptor}"${suggest(e.receptor, [...all])}` });
    if (e.population !== undefined && !scene.populations.some((p) => p.name === e.population)) {
      problems.push({ path: [...path, 'population'], message: `no population named "${e.population}"` });
    }
  }
  return problems;
}

function uniqueNames<T extends { name: string }>(
  items: T[], key: string, what: string, push: (path: (string | number)[], m: string) => void,
): Map<string, T> {
  const map = new Map<string, T>();
  items.forEach((item, i) => {
    if (map.has(item.name)) push([key, i, 'name'], `duplicate ${what} name "${item.name}"`);
    else map.set(item.name, item);
  });
  return map;
}

function suggest(word: string, options: string[]): string {
  const hint = closest(word, options);
  if (hint) return ` (did you mean "${hint}"?)`;
  return options.length ? ` (there are: ${options.join(', ')})` : '';
}

function fmtInt(n: number): string {
  return Math.round(n).toLocaleString('en-US');
}
