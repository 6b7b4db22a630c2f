// Builds every cue field of a scene, once per run. Adding a cue kind: a schema entry in
// engine/scene/schema.ts, a file here exporting build<Kind>Field, and one line in `builders`.
import type { Cue, Scene } from '../scene/schema.ts';
import type { CompiledRegion } from '../geometry/regions.ts';
import type { CueField, BuildContext } from './field.ts';
import { volumeGrid } from './field.ts';
import { buildPointField } from './point.ts';
import { buildRegionField } from './regionSource.ts';
import { buildExpressedField } from './expressed.ts';
import { buildRelayField } from './relay.ts';
import { buildBorderFields } from './border.ts';
import { buildLiningField } from './lining.ts';

/** A kind builds one field, or several named ones (a border cue: one per species and their difference). */
type Builder<K extends Cue['kind']> = (cue: Extract<Cue, { kind: K }>, ctx: BuildContext) => CueField | CueField[];
const builders: { [K in Cue['kind']]: Builder<K> } = {
  point: buildPointField,
  region: buildRegionField,
  expressed: buildExpressedField,
  relay: buildRelayField,
  border: buildBorderFields,
  lining: buildLiningField,
};

export function buildFields(
  scene: Scene, regions: Map<string, CompiledRegion>, onProgress?: BuildContext['onProgress'],
): { fields: Map<string, CueField>; ctx: BuildContext } {
  const ctx: BuildContext = { scene, regions, grid: volumeGrid(scene), onProgress };
  const fields = new Map<string, CueField>();
  for (const cue of scene.cues) {
    const build = builders[cue.kind] as Builder<typeof cue.kind>;
    const built = build(cue as never, ctx);
    for (const f of Array.isArray(built) ? built : [built]) fields.set(f.name, f);
  }
  return { fields, ctx };
}

/** Every sampleable field name of a scene: cue names, and the species names of border cues. */
export function fieldNames(scene: Scene): string[] {
  return scene.cues.flatMap((c) => (c.kind === 'border' ? [c.name, ...c.species.map((s) => s.name)] : [c.name]));
}

/** The cue that builds the field called `name` (a border cue builds its species' fields too). */
export function cueOfField(scene: Scene, name: string): Cue | undefined {
  return scene.cues.find((c) => c.name === name || (c.kind === 'border' && c.species.some((s) => s.name === name)));
}

export type { CueField, BuildContext, DisplayGrid } from './field.ts';
