// `axonloom run SCENE` — simulate a scene and write a run directory.
import { relative } from 'node:path';
import type { Command } from './args.ts';
import { parseOptions, parseIntOption, UsageError } from './args.ts';
import { loadScene, parseEdit } from '../scene/load.ts';
import { runScene } from '../sim/runScene.ts';
import { ProgressBar } from './progress.ts';
import { withReference } from '../map/reference.ts';

const help = `Usage: axonloom run SCENE [options]

Simulates the growth cones of SCENE (a JSON scene file) and writes a run directory:
run.json (resolved scene, seed, metrics), frames.npy (float32 [frames, axons, 3], µm),
axons.csv (one row per axon) and fields/<cue>.npy (grids for display).

Options:
  --out DIR           run directory (default: runs/<scene name>)
  --seed N            override the scene's seed
  --axons N           override the number of axons (split across populations in proportion)
  --steps N           override the number of growth steps
  --variant NAME      apply one of the scene's named variants
  --perturb JSON      apply an edit, e.g. '{"op":"knockout","cue":"NAME"}' (repeatable)
  --reference RUN     take that run's terminations as the expected map for metrics.map
                      (instead of the scene's expectedMap axes)
  --swc               also write axons.swc (SWC, one tree per axon)
  --json              print the run's summary as one JSON object instead of a line
  --quiet             no progress bar
  -h, --help          this help

Ctrl-C stops cleanly: what was computed is written with status "interrupted".
Exit status: 0 success, 2 bad options or scene, 1 anything else.`;

export const command: Command = {
  name: 'run',
  summary: 'simulate a scene and write a run directory',
  help,
  async run(argv) {
    const { values, positionals } = parseOptions(argv, {
      out: { type: 'string' }, seed: { type: 'string' }, axons: { type: 'string' }, steps: { type: 'string' },
      variant: { type: 'string' }, perturb: { type: 'string', multiple: true }, reference: { type: 'string' },
      swc: { type: 'boolean' }, json: { type: 'boolean' }, quiet: { type: 'boolean' },
    }, 'run');
    if (positionals.length !== 1) throw new UsageError(`run: expected one scene file (got ${positionals.length}; see 'axonloom run --help')`);
    const seed = parseIntOption(values.seed, '--seed', 0, 2 ** 32 - 1);
    const axons = parseIntOption(values.axons, '--axons', 1, 1_000_000);
    const steps = parseIntOption(values.steps, '--steps', 1, 100_000);
    const edits = (values.perturb ?? []).map((t, i) => parseEdit(t, `--perturb[${i}]`));
    const file = positionals[0];
    const scene = loadScene(file);
    if (values.reference !== undefined) scene.expectedMap = withReference(scene.expectedMap, values.reference);
    const outDir = values.out ?? `runs/${scene.name}`;

    const bar = new ProgressBar(scene.name, !values.quiet);
    let stop = false;
    const onSigint = () => {
      if (stop) process.exit(130); // a second Ctrl-C means now
      stop = true;
      process.stderr.write('\ninterrupted: writing what was computed (Ctrl-C again to abandon)\n');
    };
    process.on('SIGINT', onSigint);
    try {
      const { manifest, dir } = await runScene({
        scene, label: file, outDir, variant: values.variant, edits, seed, axons, steps, swc: values.swc,
        onProgress: (m, done, total) => (m === 'growing' ? bar.update(done, total, `step ${done}/${total}`) : bar.message(m)),
        shouldStop: () => stop,
      });
      bar.done();
      const where = relative(process.cwd(), dir) || dir;
      if (values.json) {
        process.stdout.write(JSON.stringify({ dir: where, status: manifest.status, axons: manifest.axons, stepsRun: manifest.stepsRun, frames: manifest.frames, wallTimeS: manifest.wallTimeS, statusCounts: manifest.statusCounts, metrics: manifest.metrics }) + '\n');
      } else {
        const counts = Object.entries(manifest.statusCounts).map(([s, n]) => `${s} ${((100 * n!) / manifest.axons).toFixed(0)}%`).join(', ');
        process.stdout.write(`${where}: ${manifest.axons} axons, ${manifest.stepsRun} steps (${(manifest.stepsRun * manifest.dtHours).toFixed(1)} h) in ${manifest.wallTimeS.toFixed(1)} s — ${counts}${manifest.status === 'interrupted' ? ' [interrupted]' : ''}\n`);
      }
      return manifest.status === 'interrupted' ? 130 : 0;
    } finally {
      process.off('SIGINT', onSigint);
    }
  },
};
