// Comparing variants of a scene: every variant is run over the same seeds, each run in its own
// child process (`axonloom run … --json`, at most `jobs` at once), and each map metric is
// summarised per variant as a mean with a bootstrap 95 % interval, with the paired difference
// (same seed) from the first variant. Writes every run plus compare.json, compare.csv and
// compare.svg (target against source position per variant) into one folder.
import { spawn } from 'node:child_process';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import { MAP_METRIC_KEYS, type MapSummary } from '../map/metrics.ts';
import { bootstrapMean, bootstrapPairedDifference } from '../map/bootstrap.ts';
import { mapPlotSvg, type PlotPanel, type PlotLabels } from '../map/plot.ts';
import type { AxisPairing } from '../map/expected.ts';
import { axonTable } from '../io/runReader.ts';
import { RUN_FILES } from '../io/runFormat.ts';
import { toCsv } from '../io/csv.ts';
import { stream } from '../agents/random.ts';

const BIN = fileURLToPath(new URL('../../bin/axonloom.js', import.meta.url));
export const BOOTSTRAP_RESAMPLES = 2000;

export const COMPARE_FILES = { json: 'compare.json', csv: 'compare.csv', svg: 'compare.svg' } as const;

export interface CompareRequest {
  sceneFile: string;
  sceneName: string;
  variants: string[];
  seeds: number[];
  axons?: number;
  steps?: number;
  outDir: string;
  /** runs at once */
  jobs: number;
  /** axis labels and pairing for the plot */
  labels: PlotLabels;
  pairing: AxisPairing;
  onProgress?: (done: number, total: number, label: string) => void;
}

export interface MetricSummary {
  n: number;
  mean: number | null;
  ci95: [number | null, number | null];
  /** paired difference from the first variant (same seeds); null for the first */
  diff: { mean: number | null; ci95: [number | null, number | null] } | null;
}

export interface CompareSummary {
  format: 'axonloom-compare';
  scene: string;
  variants: string[];
  seeds: number[];
  axons?: number;
  steps?: number;
  metrics: readonly string[];
  bootstrap: { resamples: number; level: number; paired: boolean };
  runs: Record<string, { seed: number; dir: string; map: Partial<MapSummary> }[]>;
  summary: Record<string, Record<string, MetricSummary>>;
  files: typeof COMPARE_FILES;
}

interface Job {
  variant: string;
  seed: number;
  dir: string;
}

export async function compareVariants(req: CompareRequest): Promise<CompareSummary> {
  mkdirSync(req.outDir, { recursive: true });
  const jobs: Job[] = [];
  for (const variant of req.variants) {
    for (const seed of req.seeds) jobs.push({ variant, seed, dir: join(req.outDir, variant, `seed-${seed}`) });
  }
  const maps = new Map<Job, Partial<MapSummary>>();
  let done = 0;
  await pool(jobs, req.jobs, async (job) => {
    maps.set(job, await runChild(req, job));
    done++;
    req.onProgress?.(done, jobs.length, `${job.variant}, seed ${job.seed}`);
  });

  const runs: CompareSummary['runs'] = {};
  for (const v of req.variants) {
    runs[v] = jobs.filter((j) => j.variant === v).map((j) => ({ seed: j.seed, dir: relative(req.outDir, j.dir), map: maps.get(j)! }));
  }
  const summary: CompareSummary['summary'] = {};
  const rng = stream(0, 'compare');
  const first = req.variants[0];
  for (const v of req.variants) {
    summary[v] = {};
    for (const key of MAP_METRIC_KEYS) {
      const values = runs[v].map((r) => num(r.map[key]));
      const m = bootstrapMean(values, rng, BOOTSTRAP_RESAMPLES);
      let diff: MetricSummary['diff'] = null;
      if (v !== first) {
        const d = bootstrapPairedDifference(runs[first].map((r) => num(r.map[key])), values, rng, BOOTSTRAP_RESAMPLES);
        diff = { mean: finite(d.mean), ci95: [finite(d.low), finite(d.high)] };
      }
      summary[v][key] = { n: m.n, mean: finite(m.mean), ci95: [finite(m.low), finite(m.high)], diff };
    }
  }
  const out: CompareSummary = {
    format: 'axonloom-compare', scene: req.sceneName, variants: req.variants, seeds: req.seeds, axons: req.axons, steps: req.steps,
    metrics: MAP_METRIC_KEYS, bootstrap: { resamples: BOOTSTRAP_RESAMPLES, level: 0.95, paired: true }, runs, summary, files: COMPARE_FILES,
  };
  writeFileSync(join(req.outDir, COMPARE_FILES.json), JSON.stringify(out, null, 2) + '\n');
  writeFileSync(join(req.outDir, COMPARE_FILES.csv), compareCsv(out));
  writeFileSync(join(req.outDir, COMPARE_FILES.svg), mapPlotSvg(plotPanels(req, jobs, out), req.labels, req.pairing));
  return out;
}

/** One row per variant and metric: mean, interval, and the difference from the first variant. */
export function compareCsv(s: CompareSummary): string {
  const first = s.variants[0];
  const header = ['variant', 'metric', 'n', 'mean', 'ci95_low', 'ci95_high', `diff_from_${first}`, 'diff_ci95_low', 'diff_ci95_high'];
  const rows = [];
  for (const v of s.variants) {
    for (const key of s.metrics) {
      const m = s.summary[v][key];
      rows.push([v, key, m.n, cell(m.mean), cell(m.ci95[0]), cell(m.ci95[1]), cell(m.diff?.mean), cell(m.diff?.ci95[0]), cell(m.diff?.ci95[1])]);
    }
  }
  return toCsv(header, rows, { eol: '\n' });
}

/** Runs `axonloom run` for one job in a child process; resolves with its metrics.map. */
function runChild(req: CompareRequest, job: Job): Promise<Partial<MapSummary>> {
  const args = [BIN, 'run', req.sceneFile, '--variant', job.variant, '--seed', String(job.seed), '--out', job.dir, '--json', '--quiet'];
  if (req.axons !== undefined) args.push('--axons', String(req.axons));
  if (req.steps !== undefined) args.push('--steps', String(req.steps));
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, args, { stdio: ['ignore', 'pipe', 'pipe'] });
    let stdout = '', stderr = '';
    child.stdout.setEncoding('utf8').on('data', (d: string) => (stdout += d));
    child.stderr.setEncoding('utf8').on('data', (d: string) => (stderr += d));
    child.on('error', reject);
    child.on('close', (code) => {
      if (code !== 0) {
        reject(new Error(`run of variant "${job.variant}" with seed ${job.seed} failed (exit ${code}): ${stderr.trim().split('\n').pop() ?? ''}`));
        return;
      }
      try {
        const line = stdout.trim().split('\n').pop() ?? '';
        const metrics = (JSON.parse(line) as { metrics?: { map?: Partial<MapSummary> } }).metrics;
        if (!metrics?.map) throw new Error('its run has no metrics.map (does the scene map axons onto a target sheet?)');
        resolve(metrics.map);
      } catch (e) {
        reject(new Error(`run of variant "${job.variant}" with seed ${job.seed}: ${(e as Error).message}`));
      }
    });
  });
}

/** Runs `work` over `items`, at most `limit` at once; rejects on the first failure. */
async function pool<T>(items: T[], limit: number, work: (item: T) => Promise<void>): Promise<void> {
  let next = 0;
  let failed: unknown;
  const lane = async () => {
    while (next < items.length && failed === undefined) {
      const item = items[next++];
      try {
        await work(item);
      } catch (e) {
        failed ??= e;
      }
    }
  };
  await Promise.all(Array.from({ length: Math.max(1, Math.min(limit, items.length)) }, lane));
  if (failed !== undefined) throw failed;
}

/** Every seed's axons of a variant pooled into its panel (the plot thins them if needed). */
function plotPanels(req: CompareRequest, jobs: Job[], s: CompareSummary): PlotPanel[] {
  return req.variants.map((variant) => {
    const su: number[] = [], sv: number[] = [], tu: number[] = [], tv: number[] = [], knockin: number[] = [];
    for (const job of jobs.filter((j) => j.variant === variant)) {
      const t = axonTable(readFileSync(join(job.dir, RUN_FILES.axons), 'utf8'));
      if (!t.has('target_u')) continue;
      const a = t.numbers('source_u'), b = t.numbers('source_v'), c = t.numbers('target_u'), d = t.numbers('target_v'), k = t.numbers('knockin');
      for (let i = 0; i < t.count; i++) {
        if (!Number.isFinite(c[i]) || !Number.isFinite(d[i])) continue;
        su.push(a[i]); sv.push(b[i]); tu.push(c[i]); tv.push(d[i]); knockin.push(k[i] === 1 ? 1 : 0);
      }
    }
    const sum = s.summary[variant];
    return { title: variant, su, sv, tu, tv, knockin, spearmanU: sum.spearmanU.mean, spearmanV: sum.spearmanV.mean };
  });
}

function num(x: unknown): number {
  return typeof x === 'number' ? x : NaN;
}
function finite(x: number): number | null {
  return Number.isFinite(x) ? x : null;
}
function cell(x: number | null | undefined): string | number {
  return x === null || x === undefined ? '' : x;
}
