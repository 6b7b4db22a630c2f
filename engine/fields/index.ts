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

type Builder<K extends Cue['kind']> = (cue: Extract<Cue, { kind: K }>, ctx: BuildContext) => CueField;
const builders: { [K in Cue['kind']]: Builder<K> } = {
  point: buildPointField,
  region: buildRegionField,
  expressed: buildExpressedField,
  relay: buildRelayField,
};

export function buildFields(
  scene: Scene, regions: Map<string, CompiledRegion>, onProgress?: BuildContext['onProgress'],
): { fields: Map<string, CueField>; ctx: BuildContext } {
  const ctx: BuildContext = { scene, regions, grid: volumeGrid(scene), onProgress };
  const fields = new Map<string, CueField>();
  for (const cue of scene.cues) {
    const build = builders[cue.kind] as Builder<typeof cue.kind>;
    fields.set(cue.name, build(cue as never, ctx));
  }
  return { fields, ctx };
}

export type { CueField, BuildContext, DisplayGrid } from './field.ts';
