// Scene checks for topographic mapping that zod cannot make: a population's `mapping` needs a
// sheet target whose expressed cues its named receptors bind, and the expected map must feed
// the two target axes from two different source axes. Called from checkScene (load.ts).
import type { Scene } from '../scene/schema.ts';
import { closest, type SceneProblem } from '../scene/errors.ts';

export function checkMapping(scene: Scene): SceneProblem[] {
  const problems: SceneProblem[] = [];
  const push = (path: (string | number)[], message: string) => problems.push({ path, message });
  const regions = new Map(scene.regions.map((r) => [r.name, r]));
  const cues = new Map(scene.cues.map((c) => [c.name, c]));

  scene.populations.forEach((p, i) => {
    const m = p.mapping;
    if (!m) return;
    const at = ['populations', i, 'mapping'];
    const target = p.target !== undefined ? regions.get(p.target) : undefined;
    if (p.target === undefined) push([...at], 'needs the population to have a target sheet');
    else if (target && target.shape !== 'sheet') push(['populations', i, 'target'], `is a ${target.shape}; mapping needs a sheet target`);
    const seen = new Set<string>();
    m.signals.forEach((s, j) => {
      const path = [...at, 'signals', j, 'receptor'];
      if (seen.has(s.receptor)) push(path, `"${s.receptor}" is listed twice`);
      seen.add(s.receptor);
      const receptor = p.receptors.find((r) => r.name === s.receptor);
      if (!receptor) {
        const names = p.receptors.map((r) => r.name);
        const hint = closest(s.receptor, names);
        push(path, `no receptor named "${s.receptor}" in this population${hint ? ` (did you mean "${hint}"?)` : names.length ? ` (there are: ${names.join(', ')})` : ''}`);
        return;
      }
      const cue = cues.get(receptor.binds);
      if (!cue || !target || target.shape !== 'sheet') return; // reported elsewhere
      if (cue.kind !== 'expressed' || cue.region !== target.name) {
        push(path, `"${s.receptor}" binds "${cue.name}", which is not expressed on the target sheet "${target.name}"`);
      }
    });
  });

  const e = scene.expectedMap;
  if (e) {
    if (e.u.from === e.v.from) push(['expectedMap', 'v', 'from'], `must differ from u.from (both are "${e.u.from}")`);
    const sheetTargets = scene.populations.some((p) => p.target !== undefined && regions.get(p.target)?.shape === 'sheet');
    if (!sheetTargets) push(['expectedMap'], 'no population has a sheet target to map onto');
  }
  return problems;
}
