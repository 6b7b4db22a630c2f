// Pathfinding: did the axons get where they were going, where else did they end, how straight
// were their paths, and how well do two populations keep their paths apart? Reported in
// run.json as metrics.pathfinding, by a growth rule that only watches (it steers nothing).
//
// Definitions (per axon of a population that has a target):
//   reached   — it entered its target (status "reached" or "terminated", or the step loop
//               reported reaching it, even if another rule then kept it growing).
//   misrouted — not reached, and its end point lies inside a *destination* region other than
//               its target. Destinations are the permissive regions that are either some
//               population's target or produce no cue (plain nuclei and territories). Regions that secrete or express a cue (poles of a
//               border, a corridor's lining, a repellent territory) are ground the axon grows
//               through, not places it can be sent to, unless some population targets them;
//               populations' source sheets are origins, never destinations.
//               Sheets count within max(step length, 5 µm) of their plane, as for reaching.
//   stranded  — neither (it stalled, left the volume or ran out of steps elsewhere).
// The three fractions sum to 1. Populations without a target are left out of them (null).
//
//   tortuosity = path length / straight distance from start to end, averaged over axons whose
//   straight distance is at least one step (shorter ones make the ratio meaningless).
//
//   segregationIndex of two populations' paths: each path is sampled at equal arc-length
//   spacing (the start excluded); every sample's nearest sample on a *different* axon is found,
//   and the nearest-neighbour contingency table (own population / other population) gives
//   Pielou's index S = 1 − observed mixed pairs / expected mixed pairs, with the expectation
//   from the table's margins (Pielou, J. Ecol. 49, 1961, from memory): S = 1 when every
//   nearest neighbour is of the same population, ≈ 0 for paths intermingled at random,
//   negative when paths alternate. Excluding the sample's own axon matters: its neighbours
//   along its own path would otherwise always be "same population".
import type { World } from '../sim/simulate.ts';
import type { GrowthRule } from '../sim/rules.ts';
import type { ConePopulation } from '../agents/cones.ts';
import type { CompiledRegion } from '../geometry/regions.ts';
import { Sheet } from '../geometry/regions.ts';
import { AXON_STATUS } from '../io/runFormat.ts';

export interface PathfindingSummary {
  axons: number;
  /** null for populations without a target (and overall when none has one) */
  reachedTargetFraction: number | null;
  misroutedFraction: number | null;
  strandedFraction: number | null;
  /** null when no axon moved a step's straight distance */
  meanTortuosity: number | null;
  /** regions where ending counts as misrouted, for this population (per population only) */
  destinations?: string[];
}

export interface SegregationResult {
  populations: [string, string];
  /** Pielou's S (see the module comment); null with fewer than two samples in either population */
  index: number | null;
  samples: [number, number];
  /** nearest-neighbour table: rows = sample's population, columns = its neighbour's */
  table: [[number, number], [number, number]];
}

export interface PathfindingMetrics extends PathfindingSummary {
  populations: Record<string, PathfindingSummary>;
  /** for exactly two populations, their paths' segregation index; else null */
  segregationIndex: number | null;
  /** every pair of populations */
  segregation: SegregationResult[];
  /** arc-length spacing of the path samples per population, µm */
  sampleSpacingUm: Record<string, number>;
}

/** RULE_FACTORIES entry: active whenever the scene has axons. */
export function pathfindingRule(world: World): GrowthRule | undefined {
  if (world.cones.count === 0) return undefined;
  return new PathfindingRule(world);
}

/**
 * Pielou's segregation index from a two-population nearest-neighbour table
 * t[i][j] = samples of population i whose nearest neighbour is of population j:
 *   S = 1 − (t01 + t10) / E,   E = (m·s + n·r) / N
 * with row sums m, n, column sums r, s and N = m + n (Pielou 1961, from memory).
 * Returns null when a population is missing (E = 0).
 */
export function pielouIndex(t: [[number, number], [number, number]]): number | null {
  const m = t[0][0] + t[0][1], n = t[1][0] + t[1][1];
  const r = t[0][0] + t[1][0], s = t[0][1] + t[1][1];
  const N = m + n;
  const expected = N > 0 ? (m * s + n * r) / N : 0;
  if (!(expected > 0)) return null;
  return 1 - (t[0][1] + t[1][0]) / expected;
}

/**
 * Nearest-neighbour table of labelled points (label 0 or 1), each point's neighbour taken among
 * points with a different `owner` (the axon it lies on). Points whose every other point shares
 * their owner are skipped. Uniform-grid search, exact (checked against brute force in tests).
 */
export function neighbourTable(
  xyz: ArrayLike<number>, labels: ArrayLike<number>, owners: ArrayLike<number>, count: number,
): [[number, number], [number, number]] {
  const t: [[number, number], [number, number]] = [[0, 0], [0, 0]];
  if (count < 2) return t;
  const grid = new UniformGrid(xyz, count);
  for (let i = 0; i < count; i++) {
    const j = grid.nearestOther(i, owners);
    if (j < 0) continue;
    t[labels[i]][labels[j]]++;
  }
  return t;
}

// ---------------------------------------------------------------------------------------------

/** at most this many axons per population are sampled for segregation, and this many samples each */
const MAX_TRACKED = 1000;
const MAX_SAMPLES = 64;

interface Track {
  pop: ConePopulation;
  stride: number; // every stride-th axon of the population is tracked
  tracked: number;
  spacing: number; // µm of arc between samples
  xyz: Float32Array; // [tracked × MAX_SAMPLES × 3]
  count: Uint16Array; // samples per tracked axon
  arc: Float64Array; // arc length since the last sample
}

class PathfindingRule implements GrowthRule {
  readonly name = 'pathfinding';
  private readonly w: World;
  private readonly reachedFlag: Uint8Array;
  private readonly tracks: Track[];

  constructor(world: World) {
    this.w = world;
    this.reachedFlag = new Uint8Array(world.cones.count);
    this.tracks = world.populations.map((pop) => {
      const stride = Math.max(1, Math.ceil(pop.count / MAX_TRACKED));
      const tracked = Math.ceil(pop.count / stride);
      const maxPath = Math.max(1, world.steps - pop.startStep) * pop.stepLength;
      const spacing = Math.max(pop.stepLength, maxPath / MAX_SAMPLES);
      return {
        pop, stride, tracked, spacing,
        xyz: new Float32Array(tracked * MAX_SAMPLES * 3),
        count: new Uint16Array(tracked),
        arc: new Float64Array(tracked),
      };
    });
  }

  moved(i: number, pop: ConePopulation, x0: number, y0: number, z0: number): void {
    const tr = this.tracks[pop.index];
    const local = i - pop.first;
    if (local % tr.stride !== 0) return;
    const a = local / tr.stride;
    const p = this.w.cones.position;
    const x = p[3 * i], y = p[3 * i + 1], z = p[3 * i + 2];
    const d = Math.sqrt((x - x0) * (x - x0) + (y - y0) * (y - y0) + (z - z0) * (z - z0));
    tr.arc[a] += d;
    if (tr.arc[a] < tr.spacing || tr.count[a] >= MAX_SAMPLES) return;
    tr.arc[a] -= tr.spacing * Math.floor(tr.arc[a] / tr.spacing);
    const o = 3 * (a * MAX_SAMPLES + tr.count[a]++);
    tr.xyz[o] = x; tr.xyz[o + 1] = y; tr.xyz[o + 2] = z;
  }

  reached(i: number): boolean {
    this.reachedFlag[i] = 1;
    return false; // only watching: another rule may still keep the axon growing
  }

  metrics(): Record<string, unknown> {
    return { pathfinding: this.summarise() };
  }

  private summarise(): PathfindingMetrics {
    const { populations } = this.w;
    const per: Record<string, PathfindingSummary> = {};
    const spacing: Record<string, number> = {};
    let n = 0, reached = 0, misrouted = 0, tortSum = 0, tortN = 0, total = 0;
    for (const pop of populations) {
      const s = this.population(pop);
      per[pop.name] = s.summary;
      spacing[pop.name] = this.tracks[pop.index].spacing;
      total += pop.count;
      tortSum += s.tortSum; tortN += s.tortN;
      if (pop.target) {
        n += pop.count; reached += s.reached; misrouted += s.misrouted;
      }
    }
    const segregation: SegregationResult[] = [];
    for (let a = 0; a < populations.length; a++)
      for (let b = a + 1; b < populations.length; b++) segregation.push(this.segregation(this.tracks[a], this.tracks[b]));
    return {
      axons: total,
      reachedTargetFraction: n ? reached / n : null,
      misroutedFraction: n ? misrouted / n : null,
      strandedFraction: n ? (n - reached - misrouted) / n : null,
      meanTortuosity: tortN ? tortSum / tortN : null,
      populations: per,
      segregationIndex: populations.length === 2 ? segregation[0].index : null,
      segregation,
      sampleSpacingUm: spacing,
    };
  }

  private population(pop: ConePopulation) {
    const { cones } = this.w;
    const destinations = pop.target ? destinationRegions(this.w, pop) : [];
    const sheetReach = Math.max(pop.stepLength, 5);
    const start = new Float64Array(3);
    let reached = 0, misrouted = 0, tortSum = 0, tortN = 0;
    for (let i = pop.first; i < pop.first + pop.count; i++) {
      const x = cones.position[3 * i], y = cones.position[3 * i + 1], z = cones.position[3 * i + 2];
      if (pop.target) {
        const status = AXON_STATUS[cones.status[i]];
        if (this.reachedFlag[i] || status === 'reached' || status === 'terminated') reached++;
        else if (destinations.some((r) => (r instanceof Sheet ? r.contains(x, y, z, sheetReach) : r.contains(x, y, z)))) misrouted++;
      }
      pop.source.point(cones.sourceU[i], cones.sourceV[i], 0.5, start); // where seedCones put it
      const straight = Math.hypot(x - start[0], y - start[1], z - start[2]);
      if (straight >= pop.stepLength) {
        tortSum += cones.pathLength[i] / straight;
        tortN++;
      }
    }
    const c = pop.count;
    const summary: PathfindingSummary = {
      axons: c,
      reachedTargetFraction: pop.target ? reached / c : null,
      misroutedFraction: pop.target ? misrouted / c : null,
      strandedFraction: pop.target ? (c - reached - misrouted) / c : null,
      meanTortuosity: tortN ? tortSum / tortN : null,
      destinations: destinations.map((r) => r.name),
    };
    return { summary, reached, misrouted, tortSum, tortN };
  }

  private segregation(A: Track, B: Track): SegregationResult {
    const nA = sum(A.count), nB = sum(B.count);
    const N = nA + nB;
    const xyz = new Float32Array(3 * N);
    const labels = new Uint8Array(N);
    const owners = new Int32Array(N);
    let k = 0;
    for (const [label, tr] of [[0, A], [1, B]] as const) {
      for (let a = 0; a < tr.tracked; a++)
        for (let s = 0; s < tr.count[a]; s++, k++) {
          const o = 3 * (a * MAX_SAMPLES + s);
          xyz[3 * k] = tr.xyz[o]; xyz[3 * k + 1] = tr.xyz[o + 1]; xyz[3 * k + 2] = tr.xyz[o + 2];
          labels[k] = label;
          owners[k] = tr.pop.first + a * tr.stride; // the axon's run-wide index
        }
    }
    const table = neighbourTable(xyz, labels, owners, N);
    return { populations: [A.pop.name, B.pop.name], index: nA >= 2 && nB >= 2 ? pielouIndex(table) : null, samples: [nA, nB], table };
  }
}

/** The regions where ending counts as misrouted for `pop` (see the module comment). */
function destinationRegions(world: World, pop: ConePopulation): CompiledRegion[] {
  const targets = new Set(world.populations.flatMap((p) => (p.spec.target !== undefined ? [p.spec.target] : [])));
  const sources = new Set(world.populations.map((p) => p.spec.source));
  const producing = new Set<string>();
  for (const c of world.scene.cues) {
    if (c.kind === 'border') for (const s of c.species) producing.add(s.region);
    else if ('region' in c) producing.add(c.region);
  }
  const out: CompiledRegion[] = [];
  for (const r of world.regions.values()) {
    if (!r.permissive || r.name === pop.spec.target || sources.has(r.name)) continue;
    if (targets.has(r.name) || !producing.has(r.name)) out.push(r);
  }
  return out;
}

function sum(a: Uint16Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i];
  return s;
}

/** Points bucketed in a dense grid of cubic cells over their bounding box, ~2 points per cell. */
class UniformGrid {
  private readonly start: Int32Array; // first index in `order` for each cell (+1 sentinel)
  private readonly order: Int32Array;
  private readonly cell: number;
  private readonly lo: [number, number, number];
  private readonly dims: [number, number, number];

  constructor(private readonly xyz: ArrayLike<number>, count: number) {
    const lo: [number, number, number] = [Infinity, Infinity, Infinity];
    const hi: [number, number, number] = [-Infinity, -Infinity, -Infinity];
    for (let i = 0; i < count; i++)
      for (let a = 0; a < 3; a++) {
        const v = xyz[3 * i + a];
        if (v < lo[a]) lo[a] = v;
        if (v > hi[a]) hi[a] = v;
      }
    const ext = [0, 1, 2].map((a) => Math.max(hi[a] - lo[a], 1e-6));
    // cell volume ≈ 2 points' share of the box; flat point sets still get cells along their extent
    let cell = Math.cbrt((ext[0] * ext[1] * ext[2] * 2) / count);
    cell = Math.max(cell, Math.max(...ext) / 256, 1e-6);
    this.cell = cell;
    this.lo = lo;
    this.dims = [0, 1, 2].map((a) => Math.min(1024, Math.floor(ext[a] / cell) + 1)) as [number, number, number];
    const cells = this.dims[0] * this.dims[1] * this.dims[2];
    const key = new Int32Array(count);
    const fill = new Int32Array(cells + 1);
    for (let i = 0; i < count; i++) {
      key[i] = this.keyOf(xyz[3 * i], xyz[3 * i + 1], xyz[3 * i + 2]);
      fill[key[i] + 1]++;
    }
    for (let c = 0; c < cells; c++) fill[c + 1] += fill[c];
    this.start = fill.slice();
    this.order = new Int32Array(count);
    for (let i = 0; i < count; i++) this.order[fill[key[i]]++] = i;
  }

  /** index of the nearest point to point i whose owner differs from i's, or −1 */
  nearestOther(i: number, owners: ArrayLike<number>): number {
    const x = this.xyz[3 * i], y = this.xyz[3 * i + 1], z = this.xyz[3 * i + 2];
    const ci = this.axisCell(x, 0), cj = this.axisCell(y, 1), ck = this.axisCell(z, 2);
    const [nx, ny, nz] = this.dims;
    const maxR = Math.max(nx, ny, nz);
    let best = -1, bestD2 = Infinity;
    for (let r = 0; r <= maxR; r++) {
      // every point outside the cube of radius r cells is farther than r·cell (minus the offset
      // within the home cell), so stop once the best beats that
      const reach = (r - 1) * this.cell;
      if (best >= 0 && reach > 0 && bestD2 <= reach * reach) break;
      for (let k = ck - r; k <= ck + r; k++) {
        if (k < 0 || k >= nz) continue;
        for (let j = cj - r; j <= cj + r; j++) {
          if (j < 0 || j >= ny) continue;
          const onShellKJ = k === ck - r || k === ck + r || j === cj - r || j === cj + r;
          for (let ii = ci - r; ii <= ci + r; ii++) {
            if (ii < 0 || ii >= nx) continue;
            if (!onShellKJ && ii !== ci - r && ii !== ci + r) continue; // inner cells were searched
            const c = ii + nx * (j + ny * k);
            for (let q = this.start[c]; q < this.start[c + 1]; q++) {
              const p = this.order[q];
              if (owners[p] === owners[i]) continue;
              const dx = this.xyz[3 * p] - x, dy = this.xyz[3 * p + 1] - y, dz = this.xyz[3 * p + 2] - z;
              const d2 = dx * dx + dy * dy + dz * dz;
              if (d2 < bestD2 || (d2 === bestD2 && p < best)) { bestD2 = d2; best = p; }
            }
          }
        }
      }
    }
    return best;
  }

  private axisCell(v: number, a: 0 | 1 | 2): number {
    const c = Math.floor((v - this.lo[a]) / this.cell);
    return c < 0 ? 0 : c >= this.dims[a] ? this.dims[a] - 1 : c;
  }

  private keyOf(x: number, y: number, z: number): number {
    return this.axisCell(x, 0) + this.dims[0] * (this.axisCell(y, 1) + this.dims[1] * this.axisCell(z, 2));
  }
}
