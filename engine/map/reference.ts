// A finished run's terminations, read back as an expected map (`axonloom run --reference RUN`).
// Node only: read synchronously when a run is set up.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { axonTable } from '../io/runReader.ts';
import { RUN_FILES } from '../io/runFormat.ts';
import { ExpectedMap } from '../scene/schema.ts';
import { SceneError } from '../scene/errors.ts';

export interface Terminations {
  dir: string;
  count: number;
  su: Float64Array;
  sv: Float64Array;
  tu: Float64Array;
  tv: Float64Array;
}

export class ReferenceRunError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'ReferenceRunError';
  }
}

/** Source and target (u, v) of every axon of the run in `dir` that ended on a target sheet. */
export function readTerminations(dir: string): Terminations {
  const read = (file: string) => {
    try {
      return readFileSync(join(dir, file), 'utf8');
    } catch (e) {
      const code = (e as NodeJS.ErrnoException).code;
      throw new ReferenceRunError(`reference run ${dir}: ${code === 'ENOENT' ? `no ${file} (is it a run directory?)` : `cannot read ${file} (${code})`}`);
    }
  };
  let manifest: { format?: unknown };
  try {
    manifest = JSON.parse(read(RUN_FILES.manifest));
  } catch (e) {
    if (e instanceof ReferenceRunError) throw e;
    throw new ReferenceRunError(`reference run ${dir}: ${RUN_FILES.manifest} is not valid JSON`);
  }
  if (manifest.format !== 'axonloom-run') throw new ReferenceRunError(`reference run ${dir}: ${RUN_FILES.manifest} is not an axonloom run manifest`);
  let table;
  try {
    table = axonTable(read(RUN_FILES.axons));
  } catch (e) {
    throw new ReferenceRunError(`reference run ${dir}: ${(e as Error).message}`);
  }
  if (!table.has('target_u') || !table.has('target_v')) {
    throw new ReferenceRunError(`reference run ${dir}: ${RUN_FILES.axons} has no target_u/target_v columns (its axons were not mapped onto a target sheet)`);
  }
  const su = table.numbers('source_u'), sv = table.numbers('source_v'), tu = table.numbers('target_u'), tv = table.numbers('target_v');
  const keep: number[] = [];
  for (let i = 0; i < table.count; i++) if (Number.isFinite(tu[i]) && Number.isFinite(tv[i])) keep.push(i);
  if (keep.length === 0) throw new ReferenceRunError(`reference run ${dir}: no axon ended on a target sheet`);
  const pick = (a: Float64Array) => Float64Array.from(keep, (i) => a[i]);
  return { dir, count: keep.length, su: pick(su), sv: pick(sv), tu: pick(tu), tv: pick(tv) };
}

/** The scene's expected map with `dir` as its reference run, checked now so that a bad
 *  reference is reported like a scene mistake (one line, exit 2) before anything is simulated. */
export function withReference(map: ExpectedMap | undefined, dir: string): ExpectedMap {
  try {
    readTerminations(dir);
  } catch (e) {
    if (e instanceof ReferenceRunError) throw new SceneError('--reference', [{ path: [], message: e.message }]);
    throw e;
  }
  return { ...(map ?? ExpectedMap.parse({})), reference: dir };
}
