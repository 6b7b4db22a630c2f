// `axonloom probe SCENE --cue NAME --at x,y,z` — sample a cue field without simulating axons.
import type { Command } from './args.ts';
import { parseOptions, parseVec3, UsageError } from './args.ts';
import { loadScene, parseEdit } from '../scene/load.ts';
import { resolveScene } from '../scene/edits.ts';
import { compileRegions } from '../geometry/regions.ts';
import { buildFields, cueOfField, fieldNames } from '../fields/index.ts';

const help = `Usage: axonloom probe SCENE --cue NAME --at x,y,z [--at x,y,z ...] [options]

Prints the value and gradient of a cue at points (µm), one JSON object per line:
  {"cue":"NAME","at":[x,y,z],"value":c,"gradient":[gx,gy,gz]}
in the scene's own units (gradient per µm), unscaled.

Options:
  --cue NAME          the cue to sample (required)
  --at x,y,z          a point in µm (repeatable, at least one)
  --variant NAME      apply one of the scene's named variants first
  --perturb JSON      apply an edit first (repeatable)
  -h, --help          this help`;

export const command: Command = {
  name: 'probe',
  summary: 'print a cue’s value and gradient at points',
  help,
  async run(argv) {
    const { values, positionals } = parseOptions(argv, {
      cue: { type: 'string' }, at: { type: 'string', multiple: true },
      variant: { type: 'string' }, perturb: { type: 'string', multiple: true },
    }, 'probe');
    if (positionals.length !== 1) throw new UsageError(`probe: expected one scene file (got ${positionals.length}; see 'axonloom probe --help')`);
    if (!values.cue) throw new UsageError(`probe: --cue NAME is required`);
    if (!values.at?.length) throw new UsageError(`probe: at least one --at x,y,z is required`);
    const points = values.at.map((t) => parseVec3(t, '--at'));
    const edits = (values.perturb ?? []).map((t) => parseEdit(t));
    const { scene } = resolveScene(loadScene(positionals[0]), values.variant, edits, positionals[0]);
    const owner = cueOfField(scene, values.cue); // a border species is built by its border cue
    if (!owner) {
      throw new UsageError(`probe: no cue named "${values.cue}" (cues: ${fieldNames(scene).join(', ') || 'none'})`);
    }
    const only = { ...scene, cues: [owner] };
    const { fields } = buildFields(only, compileRegions(scene.regions));
    const field = fields.get(values.cue)!;
    const grad = new Float64Array(3);
    for (const at of points) {
      const value = field.sample(at[0], at[1], at[2], grad);
      process.stdout.write(JSON.stringify({ cue: values.cue, at, value, gradient: [grad[0], grad[1], grad[2]] }) + '\n');
    }
    return 0;
  },
};
