// Perturbations: a variant's edits (and ad-hoc `--perturb` edits) applied to a parsed scene
// before anything is built, so every later stage sees one resolved scene.
import type { Scene, Edit } from './schema.ts';
import { SceneError, type SceneProblem } from './errors.ts';
import { checkEdit } from './load.ts';

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
      cueNamed(scene, e.cue).scale = 0;
      return;
    case 'scale':
      cueNamed(scene, e.cue).scale *= e.factor;
      return;
    case 'source': {
      const cue = cueNamed(scene, e.cue);
      if (cue.kind === 'point') cue.position = [...e.position];
      return;
    }
    case 'knockin':
      return; // per-axon: applied when the population's receptor levels are built
  }
}

function cueNamed(scene: Scene, name: string) {
  const cue = scene.cues.find((c) => c.name === name);
  if (!cue) throw new Error(`internal: edit names unknown cue "${name}" after checking`);
  return cue;
}
