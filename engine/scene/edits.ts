// Perturbations: a variant's edits (and ad-hoc `--perturb` edits) applied to a parsed scene
// before anything is built, so every later stage sees one resolved scene.
import type { Scene, Edit } from './schema.ts';
import { SceneError, type SceneProblem } from './errors.ts';
import { checkEdit } from './load.ts';
import { profileMean } from '../fields/profile.ts';

export interface ResolvedScene {
  scene: Scene;
  variant?: string;
  /** every edit applied, in order: the variant's, then the ad-hoc ones */
  edits: Edit[];
}

/** Applies `variant` (a name in scene.variants) and then `extra` edits to a copy of `scene`.
 *  Cue edits change the scene; knock-ins are kept in `edits` for the population builder. */
export function resolveScene(scene: Scene, variant?: string, extra: Edit[] = [], label = 'scene'): ResolvedScene {
  const problems: SceneProblem[] = [];
  let edits: Edit[] = [];
  if (variant !== undefined) {
    const list = scene.variants[variant];
    if (!list) {
      const names = Object.keys(scene.variants);
      throw new SceneError(label, [{
        path: ['variants'],
        message: `no variant named "${variant}" (${names.length ? `there are: ${names.join(', ')}` : 'the scene defines none'})`,
      }]);
    }
    edits = [...list];
  }
  extra.forEach((e, i) => problems.push(...checkEdit(scene, e, [`--perturb[${i}]`])));
  if (problems.length) throw new SceneError(label, problems);
  edits = [...edits, ...extra];

  const out: Scene = structuredClone(scene);
  for (const e of edits) applyEdit(out, e);
  return { scene: out, variant, edits };
}

function applyEdit(scene: Scene, e: Edit): void {
  switch (e.op) {
    case 'knockout':
      scalableNamed(scene, e.cue).scale = 0;
      return;
    case 'scale':
      scalableNamed(scene, e.cue).scale *= e.factor;
      return;
    case 'source': {
      const cue = cueNamed(scene, e.cue);
      if (cue.kind === 'point') cue.position = [...e.position];
      return;
    }
    case 'knockin':
      return; // per-axon: applied when the population's receptor levels are built
    case 'adhesion':
      for (const p of scene.populations) if (p.adhesion && (e.population === undefined || p.name === e.population)) p.adhesion.weight = e.weight;
      return;
    case 'flatten': {
      // level → m + f·(level − m) around the mean m: amplitude·f, the rest moved into the offset
      const cue = cueNamed(scene, e.cue);
      if (cue.kind !== 'expressed') return;
      const p = cue.profile;
      const m = profileMean(p) - p.offset;
      p.offset += (1 - e.factor) * m;
      p.amplitude *= e.factor;
      return;
    }
  }
}

function cueNamed(scene: Scene, name: string) {
  const cue = scene.cues.find((c) => c.name === name);
  if (!cue) throw new Error(`internal: edit names unknown cue "${name}" after checking`);
  return cue;
}

/** The cue, or the border species, called `name`: both carry the `scale` that knockout and
 *  scale edit (a species' scale multiplies its production inside the coupled border solve). */
function scalableNamed(scene: Scene, name: string): { scale: number } {
  const species = scene.cues.flatMap((c) => (c.kind === 'border' ? c.species : [])).find((s) => s.name === name);
  return species ?? cueNamed(scene, name);
}
