// Reading a scene: JSON text → validated, resolved Scene, or a SceneError that names the file,
// the JSON path and the reason for every problem found.
import { readFileSync } from 'node:fs';
import { basename } from 'node:path';
import { Scene, Edit } from './schema.ts';
import type { Scene as SceneT, Edit as EditT, Cue as CueT, BorderSpecies as BorderSpeciesT } from './schema.ts';
import { SceneError, problemsFromZod, closest, type SceneProblem } from './errors.ts';
import { checkMapping } from '../map/check.ts';

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
  // A border cue's species are cue names too (receptors bind them, edits and probe name them).
  const species = borderSpecies(scene);
  const speciesNames = new Set<string>();
  for (const { index, j, sp } of species) {
    if (cues.has(sp.name) || speciesNames.has(sp.name)) push(['cues', index, 'species', j, 'name'], `duplicate cue name "${sp.name}"`);
    speciesNames.add(sp.name);
  }

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
    } else if (r.shape === 'domain') {
      problems.push(...checkDomain(scene, r, i, species));
    }
  });

  const refRegion = (path: (string | number)[], nameRef: string, shapes: string[]) => {
    const r = regions.get(nameRef);
    if (!r) push(path, `no region named "${nameRef}"${suggest(nameRef, [...regions.keys()])}`);
    else if (!shapes.includes(r.shape)) push(path, `region "${nameRef}" is a ${r.shape}; expected ${shapes.join(' or ')}`);
  };
  const refCue = (path: (string | number)[], nameRef: string) => {
    const border = scene.cues.find((c) => c.name === nameRef && c.kind === 'border');
    if (border?.kind === 'border') push(path, `"${nameRef}" is a border cue; bind one of its species (${border.species.map((s) => `"${s.name}"`).join(' or ')})`);
    else if (!cues.has(nameRef) && !speciesNames.has(nameRef)) push(path, `no cue named "${nameRef}"${suggest(nameRef, [...cues.keys(), ...speciesNames])}`);
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
    } else if (c.kind === 'region') refRegion(['cues', i, 'region'], c.region, ['box', 'ellipsoid', 'tube']);
    else if (c.kind === 'border') c.species.forEach((sp, j) => refRegion(['cues', i, 'species', j, 'region'], sp.region, ['box', 'ellipsoid', 'tube']));
    else if (c.kind === 'lining') {
      refRegion(['cues', i, 'region'], c.region, ['tube']);
      if (c.profile.axis !== 'u') push(['cues', i, 'profile', 'axis'], `must be "u" (along the tube) for a lining (got "${c.profile.axis}")`);
    }
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
    if (p.target !== undefined) refRegion(['populations', i, 'target'], p.target, ['box', 'ellipsoid', 'sheet', 'tube', 'domain']);
    if (p.direction && Math.hypot(...p.direction) === 0) push(['populations', i, 'direction'], 'must not be zero');
    const seen = new Set<string>();
    p.receptors.forEach((r, j) => {
      if (seen.has(r.name)) push(['populations', i, 'receptors', j, 'name'], `duplicate receptor name "${r.name}"`);
      seen.add(r.name);
      receptorNames.add(r.name);
      refCue(['populations', i, 'receptors', j, 'binds'], r.binds);
    });
  });

  problems.push(...checkAdhesion(scene));
  for (const [variant, edits] of Object.entries(scene.variants)) {
    edits.forEach((e, j) => problems.push(...checkEdit(scene, e, ['variants', variant, j], receptorNames)));
  }
  problems.push(...checkMapping(scene));
  return problems;
}

/** Adhesion classes: every class a population adheres to must be some population's class, or
 *  its cones would look for shafts that can never exist. */
function checkAdhesion(scene: SceneT): SceneProblem[] {
  const problems: SceneProblem[] = [];
  const classes = [...new Set(scene.populations.flatMap((p) => (p.adhesion ? [p.adhesion.class] : [])))];
  scene.populations.forEach((p, i) => {
    p.adhesion?.adheresTo.forEach((c, j) => {
      if (!classes.includes(c)) {
        problems.push({ path: ['populations', i, 'adhesion', 'adheresTo', j], message: `no population has adhesion class "${c}"${suggest(c, classes)}` });
      }
    });
  });
  return problems;
}

/** An edit refers to things that exist; shared by variants and ad-hoc `--perturb` edits. */
export function checkEdit(scene: SceneT, e: EditT, path: (string | number)[], receptors?: Set<string>): SceneProblem[] {
  const problems: SceneProblem[] = [];
  const cueNames = [...scene.cues.map((c) => c.name), ...borderSpecies(scene).map((s) => s.sp.name)];
  if ('cue' in e && !cueNames.includes(e.cue)) {
    problems.push({ path: [...path, 'cue'], message: `no cue named "${e.cue}"${suggest(e.cue, cueNames)}` });
  }
  if (e.op === 'source') {
    const cue = scene.cues.find((c) => c.name === e.cue);
    if (cue && cue.kind !== 'point') problems.push({ path: [...path, 'cue'], message: `"${e.cue}" is a ${cue.kind} cue; "source" moves point cues only` });
    const owner = borderSpecies(scene).find((s) => s.sp.name === e.cue);
    if (owner) problems.push({ path: [...path, 'cue'], message: `"${e.cue}" is a species of border cue "${owner.cue.name}"; "source" moves point cues only` });
    e.position.forEach((x, a) => {
      if (x < 0 || x > scene.volume.size[a]) problems.push({ path: [...path, 'position', a], message: `must lie inside the volume [0, ${scene.volume.size[a]}] (got ${x})` });
    });
  }
  if (e.op === 'flatten') {
    const cue = scene.cues.find((c) => c.name === e.cue);
    if (cue && cue.kind !== 'expressed') problems.push({ path: [...path, 'cue'], message: `"${e.cue}" is a ${cue.kind} cue; "flatten" applies to expressed cues only` });
  }
  if (e.op === 'adhesion') {
    const withAdhesion = scene.populations.filter((p) => p.adhesion).map((p) => p.name);
    if (e.population === undefined) {
      if (!withAdhesion.length) problems.push({ path, message: '"adhesion" edits fasciculation, but no population has an adhesion block' });
    } else if (!scene.populations.some((p) => p.name === e.population)) {
      problems.push({ path: [...path, 'population'], message: `no population named "${e.population}"${suggest(e.population, scene.populations.map((p) => p.name))}` });
    } else if (!withAdhesion.includes(e.population)) {
      problems.push({ path: [...path, 'population'], message: `population "${e.population}" has no adhesion block` });
    }
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

/** Every species of every border cue, with where it sits in the scene. */
function borderSpecies(scene: SceneT) {
  const out: { cue: Extract<CueT, { kind: 'border' }>; index: number; j: number; sp: BorderSpeciesT }[] = [];
  scene.cues.forEach((c, index) => {
    if (c.kind === 'border') c.species.forEach((sp, j) => out.push({ cue: c, index, j, sp }));
  });
  return out;
}

/** A domain region names a species of a border cue, says which side it means, and keeps its
 *  thresholds inside the range the species can take: 0 < level < rate·scale/decay, the
 *  unrepressed level of a region producing everywhere (no steady level can exceed it, by the
 *  maximum principle), so a threshold outside it is never crossed or always is. */
function checkDomain(scene: SceneT, r: Extract<SceneT['regions'][number], { shape: 'domain' }>, i: number, species: ReturnType<typeof borderSpecies>): SceneProblem[] {
  const out: SceneProblem[] = [];
  const at = (key: string, message: string) => out.push({ path: ['regions', i, key], message });
  const owner = species.find((s) => s.sp.name === r.species);
  if (!owner) {
    at('species', `no border species named "${r.species}"${suggest(r.species, species.map((s) => s.sp.name))}`);
    return out;
  }
  if (r.cue !== undefined && r.cue !== owner.cue.name) at('cue', `species "${r.species}" belongs to border cue "${owner.cue.name}", not "${r.cue}"`);
  if (r.dominant === undefined && r.above === undefined && r.below === undefined) {
    out.push({ path: ['regions', i], message: 'a domain needs "dominant", "above" or "below" to say which part of the border cue it is' });
  }
  const top = (owner.sp.rate * owner.sp.scale * owner.cue.scale) / owner.sp.decay;
  for (const key of ['above', 'below'] as const) {
    const t = r[key];
    if (t !== undefined && !(t > 0 && t < top)) {
      at(key, `must lie inside the range of species "${r.species}", 0 < level < ${fmtNum(top)} (rate × scale / decay: the most it can reach); got ${t}`);
    }
  }
  if (r.above !== undefined && r.below !== undefined && !(r.above < r.below)) at('below', `must be greater than "above" (got ${r.below} ≤ ${r.above})`);
  if (r.within !== undefined) {
    const w = scene.regions.find((x) => x.name === r.within);
    if (!w) at('within', `no region named "${r.within}"${suggest(r.within, scene.regions.map((x) => x.name))}`);
    else if (!['box', 'ellipsoid', 'tube'].includes(w.shape)) at('within', `region "${r.within}" is a ${w.shape}; expected box, ellipsoid or tube`);
  }
  return out;
}

function fmtNum(v: number): string {
  return Number(v.toPrecision(4)).toString();
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
