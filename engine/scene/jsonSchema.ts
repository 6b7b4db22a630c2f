// The JSON Schema for scene files, generated from the zod definitions so editors complete and
// check scenes with the same rules the engine applies. `npm run schema` rewrites
// scenes/scene.schema.json; a test fails when the checked-in copy is stale.
import { z } from 'zod';
import { Scene } from './schema.ts';

export function sceneJsonSchema(): Record<string, unknown> {
  // "input": describe what a user may write (defaults make keys optional), not the resolved form
  const schema = z.toJSONSchema(Scene, { io: 'input', unrepresentable: 'any' }) as Record<string, unknown>;
  return { ...schema, title: 'axonloom scene', description: 'A guidance hypothesis for axonloom: volume, regions, cues, growth-cone populations and variants. Lengths in µm, chemistry in seconds, growth in hours.' };
}

export function sceneJsonSchemaText(): string {
  return JSON.stringify(sceneJsonSchema(), null, 2) + '\n';
}

// `tsx engine/scene/jsonSchema.ts --write` regenerates the checked-in file
if (process.argv[1]?.endsWith('jsonSchema.ts') && process.argv.includes('--write')) {
  const { writeFileSync } = await import('node:fs');
  writeFileSync(new URL('../../scenes/scene.schema.json', import.meta.url), sceneJsonSchemaText());
  process.stdout.write('wrote scenes/scene.schema.json\n');
}
