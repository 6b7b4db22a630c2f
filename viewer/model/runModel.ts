// Everything the viewer derives once from a loaded run: per-axon colours, population and status
// codes, when each axon moves, the representative drawing order, region roles and the map
// columns. Plain data, no three.js, so the panels and the 3D view share one copy.
import type { LoadedRun } from '../../engine/io/runReader.ts';
import { AXON_STATUS, type AxonStatus, type RunManifest } from '../../engine/io/runFormat.ts';
import type { Region, SheetRegion } from '../../engine/scene/schema.ts';
import { Sheet } from '../../engine/geometry/regions.ts';
import { sheetColourBytes } from '../colour/sheetColour.ts';
import { motionSpan } from '../geometry/pathIndex.ts';
import { spreadOrder } from '../geometry/spreadOrder.ts';

export type RegionRole = 'source' | 'target' | 'wall' | 'region';

export interface MapColumns {
  targetU: Float64Array;
  targetV: Float64Array;
  expectedU: Float64Array | null;
  expectedV: Float64Array | null;
  errorUm: Float64Array | null;
  ectopic: Float64Array | null;
  /** true when target (u, v) were projected here from end positions (the run has no map columns) */
  projected: boolean;
}

export interface RunModel {
  name: string;
  run: LoadedRun;
  manifest: RunManifest;
  N: number;
  F: number;
  times: number[];
  durationH: number;
  positions: Float32Array;
  populations: string[];
  popOf: Uint16Array;
  statusOf: Uint8Array; // index into AXON_STATUS
  statusCounts: Map<AxonStatus, number>;
  sourceU: Float64Array;
  sourceV: Float64Array;
  /** RGBA bytes per axon, from the source (u, v) colour map */
  colours: Uint8Array;
  firstMove: Int32Array;
  lastMove: Int32Array;
  order: Int32Array;
  regions: Region[];
  roles: Map<string, RegionRole>;
  sourceSheet: SheetRegion | null;
  targetSheet: SheetRegion | null;
  map: MapColumns | null;
  size: [number, number, number];
}

export function buildRunModel(name: string, run: LoadedRun): RunModel {
  const { manifest, axons, frames } = run;
  const N = frames.axons, F = frames.frames;
  const populations = manifest.populations.map((p) => p.name);
  const popOf = new Uint16Array(N);
  const popNames = axons.strings('population');
  const popIndex = new Map(populations.map((p, i) => [p, i]));
  for (let a = 0; a < N; a++) {
    let p = popIndex.get(popNames[a]);
    if (p === undefined) {
      p = populations.length;
      populations.push(popNames[a]);
      popIndex.set(popNames[a], p);
    }
    popOf[a] = p;
  }
  const statusOf = new Uint8Array(N);
  const statusCounts = new Map<AxonStatus, number>();
  const statuses = axons.strings('status');
  for (let a = 0; a < N; a++) {
    const s = AXON_STATUS.indexOf(statuses[a] as AxonStatus);
    statusOf[a] = s < 0 ? AXON_STATUS.indexOf('terminated') : s;
    const name = AXON_STATUS[statusOf[a]];
    statusCounts.set(name, (statusCounts.get(name) ?? 0) + 1);
  }
  const sourceU = axons.numbers('source_u'), sourceV = axons.numbers('source_v');
  const colours = sheetColourBytes(sourceU, sourceV);
  const { first, last } = motionSpan(frames.data, F, N);
  const order = spreadOrder(sourceU, sourceV, popOf);

  const scene = (manifest.scene ?? {}) as { regions?: Region[] };
  const regions = Array.isArray(scene.regions) ? scene.regions : [];
  const roles = new Map<string, RegionRole>();
  for (const r of regions) roles.set(r.name, r.permissive === false ? 'wall' : 'region');
  for (const p of manifest.populations) {
    if (p.target && roles.get(p.target) !== 'wall') roles.set(p.target, 'target');
  }
  for (const p of manifest.populations) roles.set(p.source, 'source');
  const sheetNamed = (n: string | undefined) => (regions.find((r) => r.name === n && r.shape === 'sheet') as SheetRegion | undefined) ?? null;
  const sourceSheet = sheetNamed(manifest.populations[0]?.source);
  const targetSheet = sheetNamed(manifest.populations.find((p) => p.target)?.target);

  const times = manifest.frameTimesH.length === F ? manifest.frameTimesH : Array.from({ length: F }, (_, f) => f);
  return {
    name, run, manifest, N, F, times, durationH: F > 0 ? times[F - 1] - times[0] : 0,
    positions: frames.data, populations, popOf, statusOf, statusCounts, sourceU, sourceV, colours,
    firstMove: first, lastMove: last, order, regions, roles, sourceSheet, targetSheet,
    map: mapColumns(run, targetSheet),
    size: manifest.volume.size,
  };
}

/** The frame shown at time `h` hours: the last frame at or before it (frame 0 before the start). */
export function frameAt(times: ArrayLike<number>, h: number): number {
  let lo = 0, hi = times.length - 1;
  if (hi < 0) return 0;
  while (lo < hi) {
    const mid = (lo + hi + 1) >> 1;
    if (times[mid] <= h + 1e-9) lo = mid;
    else hi = mid - 1;
  }
  return lo;
}

/** Which axons pass the population, status and selection filters, as 0/1 bytes. */
export function visibleMask(m: RunModel, hiddenPops: ReadonlySet<string>, hiddenStatuses: ReadonlySet<string>, out = new Uint8Array(m.N)): Uint8Array {
  const popHidden = m.populations.map((p) => hiddenPops.has(p));
  const statusHidden = AXON_STATUS.map((s) => hiddenStatuses.has(s));
  for (let a = 0; a < m.N; a++) out[a] = popHidden[m.popOf[a]] || statusHidden[m.statusOf[a]] ? 0 : 1;
  return out;
}

function mapColumns(run: LoadedRun, target: SheetRegion | null): MapColumns | null {
  const t = run.axons;
  const opt = (c: string) => (t.has(c) ? t.numbers(c) : null);
  if (t.has('target_u') && t.has('target_v')) {
    return {
      targetU: t.numbers('target_u'), targetV: t.numbers('target_v'),
      expectedU: opt('expected_u'), expectedV: opt('expected_v'), errorUm: opt('error_um'), ectopic: opt('ectopic'),
      projected: false,
    };
  }
  if (!target) return null;
  // No map columns: place each axon's end on the target sheet's own (u, v) by projection, so
  // the map panel can at least show where axons went.
  const sheet = new Sheet({ ...target, permissive: target.permissive ?? true });
  const ex = t.numbers('end_x'), ey = t.numbers('end_y'), ez = t.numbers('end_z');
  const tu = new Float64Array(t.count), tv = new Float64Array(t.count);
  const c = new Float64Array(3);
  for (let a = 0; a < t.count; a++) {
    sheet.coords(ex[a], ey[a], ez[a], c);
    tu[a] = c[0];
    tv[a] = c[1];
  }
  return { targetU: tu, targetV: tv, expectedU: null, expectedV: null, errorUm: null, ectopic: null, projected: true };
}
