// `axonloom compare SCENE --variants a,b,… --seeds N` — run variants over seeds, summarise the
// map metrics with bootstrap intervals, print a table, write compare.{csv,json,svg}.
import { availableParallelism } from 'node:os';
import { join, relative } from 'node:path';
import type { Command } from './args.ts';
import { parseOptions, parseIntOption, UsageError } from './args.ts';
import { loadScene } from '../scene/load.ts';
import type { Scene } from '../scene/schema.ts';
import { compareVariants, COMPARE_FILES, type CompareSummary } from '../sim/compare.ts';
import { pairingOf } from '../map/expected.ts';
import type { PlotLabels } from '../map/plot.ts';

const help = `Usage: axonloom compare SCENE [options]

Runs each variant of SCENE over the same seeds (in parallel child processes), then summarises
every map metric (run.json metrics.map) per variant as a mean with a bootstrap 95 % interval,
and each variant's difference from the first one (paired by seed, with its interval).
Writes every run under OUT/<variant>/seed-<seed>/, plus OUT/compare.csv, OUT/compare.json and
OUT/compare.svg (target position against source position, one column per variant), and prints
the table.

Options:
  --variants A,B,...  variants to compare, the first is the baseline (default: all the scene's
                      variants, in the scene's order)
  --seeds N           seeds per variant: the scene's seed and the N − 1 after it (default 5)
  --axons N           override the number of axons of every run
  --steps N           override the number of growth steps of every run
  --out DIR           output folder (default: runs/<scene name>-compare)
  --jobs N            runs at once (default: the number of CPU cores)
  --json              print compare.json instead of the table
  --quiet             no progress lines on stderr
  -h, --help          this help

Exit status: 0 success, 2 bad options or scene, 1 a run failed.`;

export const command: Command = {
  name: 'compare',
  summary: 'run variants over seeds and compare their maps',
  help,
  async run(argv) {
    const { values, positionals } = parseOptions(argv, {
      variants: { type: 'string' }, seeds: { type: 'string' }, axons: { type: 'string' }, steps: { type: 'string' },
      out: { type: 'string' }, jobs: { type: 'string' }, json: { type: 'boolean' }, quiet: { type: 'boolean' },
    }, 'compare');
    if (positionals.length !== 1) throw new UsageError(`compare: expected one scene file (got ${positionals.length}; see 'axonloom compare --help')`);
    const seedCount = parseIntOption(values.seeds, '--seeds', 1, 1000) ?? 5;
    const axons = parseIntOption(values.axons, '--axons', 1, 1_000_000);
    const steps = parseIntOption(values.steps, '--steps', 1, 100_000);
    const jobs = parseIntOption(values.jobs, '--jobs', 1, 1024) ?? availableParallelism();
    const file = positionals[0];
    const scene = loadScene(file);
    const variants = chooseVariants(scene, values.variants);
    const labels = plotLabels(scene);
    if (!labels) throw new UsageError(`compare: no population of "${scene.name}" has a sheet target, so there is no map to compare`);
    const seeds = Array.from({ length: seedCount }, (_, k) => (scene.seed + k) % 2 ** 32);
    const outDir = values.out ?? `runs/${scene.name}-compare`;
    const total = variants.length * seeds.length;
    if (!values.quiet) process.stderr.write(`compare: ${variants.length} variant${variants.length > 1 ? 's' : ''} × ${seeds.length} seed${seeds.length > 1 ? 's' : ''} = ${total} runs, ${Math.min(jobs, total)} at once\n`);

    const summary = await compareVariants({
      sceneFile: file, sceneName: scene.name, variants, seeds, axons, steps, outDir, jobs, labels, pairing: pairingOf(scene.expectedMap),
      onProgress: values.quiet ? undefined : (done, all, label) => process.stderr.write(`compare: ${done}/${all} runs done (${label})\n`),
    });
    if (values.json) process.stdout.write(JSON.stringify(summary) + '\n');
    else {
      const where = relative(process.cwd(), outDir) || outDir;
      process.stdout.write(formatTable(summary));
      process.stdout.write(`\nwrote ${Object.values(COMPARE_FILES).map((f) => join(where, f)).join(', ')} and ${total} runs under ${where}/\n`);
    }
    return 0;
  },
};

function chooseVariants(scene: Scene, option: string | undefined): string[] {
  const known = Object.keys(scene.variants);
  if (option === undefined) {
    if (known.length === 0) throw new UsageError(`compare: scene "${scene.name}" defines no variants; give --variants or add "variants" to the scene`);
    return known;
  }
  const names = option.split(',').map((s) => s.trim());
  if (names.some((n) => n === '')) throw new UsageError(`--variants must be names separated by commas (got "${option}")`);
  const unknown = names.filter((n) => !known.includes(n));
  if (unknown.length) {
    throw new UsageError(`--variants: no variant named ${unknown.map((n) => `"${n}"`).join(', ')} in scene "${scene.name}" (${known.length ? `there are: ${known.join(', ')}` : 'it defines none'})`);
  }
  if (new Set(names).size !== names.length) throw new UsageError(`--variants lists a variant twice ("${option}")`);
  return names;
}

/** Axis names of the first population that projects onto a sheet. */
function plotLabels(scene: Scene): PlotLabels | undefined {
  const sheets = new Map(scene.regions.flatMap((r) => (r.shape === 'sheet' ? [[r.name, r] as const] : [])));
  const pop = scene.populations.find((p) => p.target !== undefined && sheets.has(p.target));
  if (!pop) return undefined;
  const s = sheets.get(pop.source)!, t = sheets.get(pop.target!)!;
  return { source: s.name, target: t.name, sourceU: s.uName ?? '', sourceV: s.vName ?? '', targetU: t.uName ?? '', targetV: t.vName ?? '' };
}

/** Two tables: each metric's mean [95 % CI] per variant, then each variant's difference from
 *  the first. */
export function formatTable(s: CompareSummary): string {
  const first = s.variants[0];
  const lines: string[] = [];
  const n = s.seeds.length;
  lines.push(`${s.scene}: ${s.variants.length} variants × ${n} seed${n > 1 ? 's' : ''}${s.axons ? `, ${s.axons} axons each` : ''} — mean [bootstrap 95 % interval] over seeds`, '');
  const table = (cell: (v: string, key: string) => string, variants: string[]) => {
    const rows = [['metric', ...variants], ...s.metrics.map((key) => [key, ...variants.map((v) => cell(v, key))])];
    const widths = rows[0].map((_, c) => Math.max(...rows.map((r) => r[c].length)));
    for (const r of rows) lines.push(r.map((x, c) => (c === 0 ? x.padEnd(widths[c]) : x.padStart(widths[c]))).join('   ').trimEnd());
  };
  table((v, key) => {
    const m = s.summary[v][key];
    return `${fmt(m.mean)} [${fmt(m.ci95[0])}, ${fmt(m.ci95[1])}]`;
  }, s.variants);
  if (s.variants.length > 1) {
    lines.push('', `difference from ${first} (same seeds) [bootstrap 95 % interval]`, '');
    table((v, key) => {
      const d = s.summary[v][key].diff;
      return d ? `${sign(d.mean)} [${fmt(d.ci95[0])}, ${fmt(d.ci95[1])}]` : '';
    }, s.variants.slice(1));
  }
  return lines.join('\n') + '\n';
}

function fmt(x: number | null): string {
  if (x === null) return '–';
  return Math.abs(x) >= 10 ? x.toFixed(1) : x.toFixed(3);
}

function sign(x: number | null): string {
  return x !== null && x > 0 ? `+${fmt(x)}` : fmt(x);
}
