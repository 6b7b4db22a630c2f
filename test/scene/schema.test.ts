// Internal consistency of the scene format (project invariants, no outside source): the checked-in
// JSON Schema is generated from the zod definitions, the shipped scenes are valid, versions agree.
import { describe, it, expect } from 'vitest';
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { sceneJsonSchemaText } from '../../engine/scene/jsonSchema.ts';
import { loadScene } from '../../engine/scene/load.ts';
import { ENGINE_VERSION } from '../../engine/version.ts';
import { ROOT } from '../helpers.ts';

describe('scene schema', () => {
  it('the checked-in JSON Schema is what the zod definitions generate (run `npm run schema`)', () => {
    const checkedIn = readFileSync(join(ROOT, 'scenes/scene.schema.json'), 'utf8');
    expect(checkedIn).toBe(sceneJsonSchemaText());
  });
  it('every scene in scenes/ is valid', () => {
    const files = readdirSync(join(ROOT, 'scenes')).filter((f) => f.endsWith('.json') && f !== 'scene.schema.json');
    expect(files.length).toBeGreaterThan(0);
    for (const f of files) expect(() => loadScene(join(ROOT, 'scenes', f)), f).not.toThrow();
  });
  it('engine version matches package.json', () => {
    expect(JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8')).version).toBe(ENGINE_VERSION);
  });
});
