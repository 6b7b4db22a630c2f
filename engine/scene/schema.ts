// The scene format: one zod definition is the single source of truth for the TypeScript types,
// the checked-in JSON Schema (scenes/scene.schema.json), the defaults and the error messages.
//
// Units: lengths in µm; chemistry in seconds (diffusion µm²/s, decay 1/s, secretion per second);
// growth in hours (dt, speed µm/h, start times). Concentrations are in the scene's own units
// and never rescaled.
import { z } from 'zod';

const finite = () => z.number().refine(Number.isFinite, 'must be a finite number');
const positive = () => z.number().positive();
const nonNegative = () => z.number().nonnegative();
const name = () =>
  z
    .string()
    .min(1)
    .max(64)
    .regex(/^[A-Za-z0-9][A-Za-z0-9_.-]*$/, 'must be letters, digits, "-", "_" or "." (no spaces), starting with a letter or digit');

export const Vec3 = z.tuple([finite(), finite(), finite()]);
export type Vec3 = z.infer<typeof Vec3>;

// ---------------------------------------------------------------------------------------------
// Regions: named pieces of the volume. Sheets carry their own (u, v) ∈ [0, 1]² coordinates and
// serve as source sheets, target sheets and surfaces that express a ligand.

const regionBase = {
  name: name(),
  /** false makes the region a wall that growth cones avoid and cannot enter */
  permissive: z.boolean().default(true).describe('false makes the region a wall growth cones avoid'),
};

export const BoxRegion = z.strictObject({
  ...regionBase,
  shape: z.literal('box'),
  min: Vec3.describe('lower corner, µm'),
  max: Vec3.describe('upper corner, µm'),
});

export const EllipsoidRegion = z.strictObject({
  ...regionBase,
  shape: z.literal('ellipsoid'),
  center: Vec3.describe('µm'),
  radii: z.tuple([positive(), positive(), positive()]).describe('semi-axes along x, y, z, µm'),
});

export const SheetRegion = z.strictObject({
  ...regionBase,
  shape: z.literal('sheet'),
  origin: Vec3.describe('the sheet corner at (u, v) = (0, 0), µm'),
  uAxis: Vec3.describe('edge vector from (0,0) to (1,0), µm'),
  vAxis: Vec3.describe('edge vector from (0,0) to (0,1), µm'),
  uName: z.string().max(32).optional().describe('what the u axis is called in this tissue, for labels (e.g. "ventral→dorsal")'),
  vName: z.string().max(32).optional(),
});

export const TubeRegion = z.strictObject({
  ...regionBase,
  shape: z.literal('tube'),
  from: Vec3.describe('one end of the tube’s axis, µm'),
  to: Vec3.describe('the other end, µm'),
  radius: positive().describe('µm; the tube is every point within this distance of the from–to segment (a capsule)'),
});

/** A region set by a border cue's fields rather than by geometry: where one species dominates
 *  the other and/or lies above or below a level (French-flag thresholds). See engine/geometry/domains.ts. */
export const DomainRegion = z.strictObject({
  ...regionBase,
  shape: z.literal('domain'),
  species: name().describe('a species of a border cue'),
  cue: name().optional().describe('the border cue the species belongs to (optional; checked when given)'),
  dominant: z.boolean().optional().describe('true: where this species exceeds the other; false: where the other exceeds it'),
  above: z.number().optional().describe('where this species is above this level'),
  below: z.number().optional().describe('where this species is below this level'),
  within: name().optional().describe('limit the domain to this box, ellipsoid or tube'),
});

export const Region = z.discriminatedUnion('shape', [BoxRegion, EllipsoidRegion, SheetRegion, TubeRegion, DomainRegion]);
export type Region = z.infer<typeof Region>;
export type SheetRegion = z.infer<typeof SheetRegion>;
export type TubeRegion = z.infer<typeof TubeRegion>;
export type DomainRegion = z.infer<typeof DomainRegion>;

// ---------------------------------------------------------------------------------------------
// Profiles: a level as a function of one sheet coordinate t ∈ [0, 1] (u or v, optionally
// reversed to 1 − t). Used for expressed ligands on target sheets and for receptor expression
// across source sheets. Formulas live in engine/fields/profile.ts.

export const Profile = z.strictObject({
  shape: z.enum(['constant', 'linear', 'exponential', 'sigmoid']).default('constant'),
  axis: z.enum(['u', 'v']).default('u'),
  reversed: z.boolean().default(false).describe('use 1 − t instead of t'),
  amplitude: nonNegative().default(1),
  offset: nonNegative().default(0),
  rate: positive().default(3).describe('exponential: e-folds across the sheet'),
  midpoint: z.number().min(0).max(1).default(0.5).describe('sigmoid: where it is half way'),
  width: positive().default(0.1).describe('sigmoid: transition width in sheet units'),
});
export type Profile = z.infer<typeof Profile>;

// ---------------------------------------------------------------------------------------------
// Cues. Every kind has a name and a scale (a multiplier on the whole field; a knockout sets 0).

const cueBase = {
  name: name(),
  scale: nonNegative().default(1).describe('multiplies the whole field; perturbations edit it'),
};

const chemistry = {
  diffusion: positive().describe('D, µm²/s'),
  decay: positive().describe('k, 1/s; decay length λ = √(D/k)'),
};

export const PointCue = z.strictObject({
  ...cueBase,
  kind: z.literal('point'),
  position: Vec3.describe('µm'),
  ...chemistry,
  rate: nonNegative().describe('Q, amount secreted per second'),
  radius: positive().optional().describe('source radius, µm (default: one voxel)'),
  extraSources: z.array(z.strictObject({ position: Vec3, rate: nonNegative().optional() })).max(1000).optional()
    .describe('more sources of the same molecule (rate defaults to this cue’s); their fields add'),
  solve: z.enum(['analytic', 'grid']).default('analytic'),
  boundary: z.enum(['absorbing', 'reflecting']).optional().describe('grid solves only (default absorbing)'),
});

export const RegionCue = z.strictObject({
  ...cueBase,
  kind: z.literal('region'),
  region: name().describe('a box, ellipsoid or tube region that secretes'),
  ...chemistry,
  rate: nonNegative().describe('secretion per µm³ of region per second'),
  boundary: z.enum(['absorbing', 'reflecting']).default('absorbing'),
});

export const ExpressedCue = z.strictObject({
  ...cueBase,
  kind: z.literal('expressed'),
  region: name().describe('the sheet that expresses the ligand'),
  profile: Profile,
  contact: positive().default(15).describe('growth cones within this distance of the sheet sense it, µm'),
});

export const RelayCue = z.strictObject({
  ...cueBase,
  kind: z.literal('relay'),
  region: name().describe('a sheet (relay along u or v) or a box (relay along x, y or z, from the min face)'),
  axis: z.enum(['u', 'v', 'x', 'y', 'z']),
  reversed: z.boolean().default(false).describe('start the relay at the far end'),
  first: positive().describe('c₀, the level made by the first cell'),
  alpha: z.number().gt(0).lt(1).describe('fraction of its upstream neighbour each cell makes'),
  cellSpacing: positive().default(10).describe('cell spacing h, µm'),
  contact: positive().default(15).describe('sensing distance from the region, µm'),
});

/** A ligand lining a tube (a guidance corridor), graded along it: the profile's u runs along the
 *  tube's axis from `from` (0) to `to` (1). Sensed by contact inside the tube and within
 *  `contact` µm of its wall, where it fades linearly to 0 (see engine/fields/lining.ts). */
export const LiningCue = z.strictObject({
  ...cueBase,
  kind: z.literal('lining'),
  region: name().describe('the tube that expresses the ligand'),
  profile: Profile,
  contact: positive().default(15).describe('distance beyond the tube wall over which the level fades to 0, µm'),
});

/** One of a border cue's two morphogens; its name is a cue name (receptors bind it, probe samples it). */
export const BorderSpecies = z.strictObject({
  name: name(),
  region: name().describe('the box, ellipsoid or tube that produces this species'),
  rate: nonNegative().describe('unrepressed production per µm³ of region per second'),
  ...chemistry,
  repression: positive().describe('K: level of the other species that halves this one’s production'),
  hill: positive().default(2).describe('Hill coefficient n of that repression'),
  scale: nonNegative().default(1).describe('multiplies this species’ production inside the coupled solve; scale/knockout edits naming the species edit it'),
});

export const BorderCue = z.strictObject({
  ...cueBase,
  kind: z.literal('border'),
  species: z.array(BorderSpecies).min(2).max(2).describe('exactly two mutually repressing species'),
  boundary: z.enum(['absorbing', 'reflecting']).default('reflecting'),
  tolerance: positive().max(0.1).default(1e-6).describe('relative error bound at which the coupled solve stops'),
  maxIterations: z.number().int().positive().max(10_000).default(500),
}).describe('two morphogens produced from opposite sides, each repressing the other; sampled by species name, the cue’s own name samples their difference (zero on the border); scale multiplies both productions');

export const Cue = z.discriminatedUnion('kind', [PointCue, RegionCue, ExpressedCue, RelayCue, BorderCue, LiningCue]);
export type Cue = z.infer<typeof Cue>;
export type PointCue = z.infer<typeof PointCue>;
export type RegionCue = z.infer<typeof RegionCue>;
export type ExpressedCue = z.infer<typeof ExpressedCue>;
export type RelayCue = z.infer<typeof RelayCue>;
export type BorderCue = z.infer<typeof BorderCue>;
export type LiningCue = z.infer<typeof LiningCue>;
export type BorderSpecies = z.infer<typeof BorderSpecies>;

// ---------------------------------------------------------------------------------------------
// Populations of growth cones.

export const Receptor = z.strictObject({
  name: name(),
  binds: name().describe('the cue this receptor binds'),
  kd: positive().describe('dissociation constant, in the cue’s concentration units'),
  response: z.enum(['attract', 'repel']),
  weight: nonNegative().default(1).describe('steering weight of this receptor’s signal'),
  expression: Profile.default({
    shape: 'constant', axis: 'u', reversed: false, amplitude: 1, offset: 0, rate: 3, midpoint: 0.5, width: 0.1,
  }).describe('receptor level across the source sheet'),
});
export type Receptor = z.infer<typeof Receptor>;

export const Sensing = z.strictObject({
  mode: z.enum(['occupancy', 'filopodia']).default('occupancy'),
  receptorCount: z.number().int().positive().default(20000).describe('receptors per growth cone (binomial noise)'),
  coneDiameter: positive().default(10).describe('µm'),
  saturation: positive().max(1).default(0.02).describe('bound-fraction difference across the cone at which its turning response saturates'),
  filopodia: z.number().int().min(1).max(64).default(8),
  filopodiumLength: positive().default(15).describe('µm'),
  adaptationHours: positive().optional().describe('adaptation time constant τ; omit for none'),
});
export type Sensing = z.infer<typeof Sensing>;

// Mapping onto a target sheet (engine/agents/targeting): once a growth cone contacts its target
// sheet it moves within the sheet's (u, v), read through the receptors named in `signals`, and
// settles where its stop rule says.
export const MapSignal = z.strictObject({
  receptor: name().describe('a receptor of this population (the axon-side molecule); the cue it binds must be expressed on the target sheet'),
  mode: z.enum(['forward', 'reverse']).default('forward')
    .describe('forward: ligand on the target (the cue), receptor on the axon, signal R·p(L); reverse: receptor on the target (the cue), ligand on the axon, signal L_target·p(axon level)'),
});

export const Competition = z.strictObject({
  weight: nonNegative().default(1).describe('γ, energy of a fully overlapping pair of terminals; 0 turns competition off'),
  radius: positive().optional().describe('terminals repel within this distance, µm (default: twice the mean terminal spacing on the target sheet)'),
});

export const Mapping = z.strictObject({
  rule: z.enum(['balance', 'affinity']).describe('balance: gradient balance (Gierer 1983); affinity: chemoaffinity plus competition, stochastic energy updates (Koulakov & Tsigankov)'),
  signals: z.array(MapSignal).min(1).max(16),
  speed: positive().optional().describe('speed within the target sheet, µm/h (default: the population’s speed)'),
  temperature: positive().default(0.005).describe('affinity rule: T in the acceptance probability 1/(1 + exp(ΔE/T)), energy units'),
  exchange: z.number().min(0).max(1).default(0.5).describe('affinity rule with competition: share of proposals that swap places with a random terminal within the competition radius'),
  competition: Competition.optional().describe('axon–axon competition for target space; omit for none'),
  settleSteps: z.number().int().positive().default(20).describe('window of steps whose mean position is a terminal’s termination zone'),
  settleDistance: positive().optional().describe('settle early when a window’s mean lies this close to the previous window’s, µm (omit: settle only after maxHours; crowded terminals slow down before they arrive, so early settling suits maps without competition)'),
  maxHours: positive().default(60).describe('a terminal settles (status "terminated") after this long in the sheet, at its last window’s mean position, hours'),
});
export type Mapping = z.infer<typeof Mapping>;

// Fasciculation (engine/agents/fasciculation.ts): growth cones within `radius` of another
// axon's shaft, of a class they adhere to, are pulled toward it and aligned with it, and let go
// where the guidance signal across the shaft outweighs that adhesion.
export const Adhesion = z.strictObject({
  class: name().describe('this population’s adhesion class, the name other populations’ adheresTo lists use'),
  adheresTo: z.array(name()).min(1).max(64)
    .describe('adhesion classes whose shafts these growth cones follow (list the own class to bundle with siblings); never the axon’s own shaft'),
  radius: positive().default(15).describe('r_f: capture radius around a shaft, µm'),
  weight: nonNegative().default(1).describe('w_f: weight of the fasciculation term in the steering sum; 0 turns adhesion off (the shafts still count in the metrics)'),
  pull: nonNegative().default(1).describe('w_p: pull toward the nearest shaft point, full at distance r_f, zero on the shaft'),
  align: nonNegative().default(1).describe('w_t: alignment with the shaft tangent, in the direction the cone is heading'),
  release: positive().default(1)
    .describe('θ: the cone lets go for a step where the guidance signal across the shaft exceeds θ × the adhesion term'),
});
export type Adhesion = z.infer<typeof Adhesion>;

export const Population = z.strictObject({
  name: name(),
  count: z.number().int().positive().max(1_000_000),
  source: name().describe('a sheet region the axons start from'),
  target: name().optional().describe('a region; reaching it stops the axon with status "reached"'),
  start: nonNegative().default(0).describe('hours after the run starts when these axons begin'),
  speed: positive().default(40).describe('growth speed v, µm/h'),
  persistence: nonNegative().default(1).describe('β, weight of the previous heading'),
  kappa: positive().default(20).describe('von Mises–Fisher concentration of heading noise'),
  direction: Vec3.optional().describe('initial heading (default: the source sheet normal)'),
  sensing: Sensing.default(Sensing.parse({})),
  receptors: z.array(Receptor).default([]),
  adhesion: Adhesion.optional().describe('fasciculation: follow the shafts of earlier axons; omit for none'),
  mapping: Mapping.optional().describe('how terminals move and settle within a target sheet; needs a sheet target'),
});
export type Population = z.infer<typeof Population>;

export const Growth = z.strictObject({
  dt: positive().max(24).default(0.25).describe('hours per step'),
  steps: z.number().int().positive().max(100_000).default(400),
  frameEvery: z.number().int().positive().default(2).describe('store a frame every this many steps'),
  wallMargin: positive().default(20).describe('distance at which walls and the volume boundary push back, µm'),
  wallWeight: nonNegative().default(2),
  stallSteps: z.number().int().positive().default(40).describe('window for the stall test, steps'),
  stallDistance: positive().default(10).describe('net movement below this over the window means stalled, µm'),
});
export type Growth = z.infer<typeof Growth>;

// ---------------------------------------------------------------------------------------------
// Perturbations: edits applied to the parsed scene before anything is built.

export const Edit = z.discriminatedUnion('op', [
  z.strictObject({ op: z.literal('knockout'), cue: name() }),
  z.strictObject({ op: z.literal('scale'), cue: name(), factor: nonNegative() }),
  z.strictObject({
    op: z.literal('knockin'), receptor: name(), fraction: z.number().min(0).max(1), delta: finite(),
    population: name().optional(),
  }),
  z.strictObject({ op: z.literal('source'), cue: name(), position: Vec3 }),
  z.strictObject({ op: z.literal('adhesion'), population: name().optional(), weight: nonNegative() })
    .describe('set the fasciculation weight w_f of a population with adhesion (of every such population when omitted); 0: no adhesion'),
  z.strictObject({ op: z.literal('flatten'), cue: name(), factor: z.number().min(0).max(1) })
    .describe('expressed cues: keep this fraction of the gradient around the profile’s mean level (0: uniform)'),
]);
export type Edit = z.infer<typeof Edit>;

// The expected topographic map: which source axis feeds each target axis, and whether reversed.
const ExpectedAxis = z.strictObject({
  from: z.enum(['u', 'v']).describe('the source-sheet axis that maps onto this target axis'),
  reversed: z.boolean().default(false).describe('source 0 maps to target 1'),
});

export const ExpectedMap = z.strictObject({
  u: ExpectedAxis.default({ from: 'u', reversed: false }).describe('what target u is expected to be'),
  v: ExpectedAxis.default({ from: 'v', reversed: false }).describe('what target v is expected to be'),
  ectopicUm: positive().optional().describe('a terminal further than this from its expected place is ectopic, µm (default: 15 % of the target sheet’s longer edge)'),
  bins: z.number().int().min(2).max(100).default(10).describe('source bins for the duplication index'),
  reference: z.string().min(1).optional().describe('a run directory whose terminations are the expected map instead of the axes (set by `run --reference`)'),
});
export type ExpectedMap = z.infer<typeof ExpectedMap>;

export const Volume = z.strictObject({
  size: z.tuple([positive(), positive(), positive()]).describe('µm'),
  voxel: positive().describe('grid spacing for solved fields and display, µm'),
});

export const Scene = z.strictObject({
  $schema: z.string().optional(),
  name: name(),
  description: z.string().max(2000).optional(),
  seed: z.number().int().min(0).max(2 ** 32 - 1),
  volume: Volume,
  growth: Growth.default(Growth.parse({})),
  regions: z.array(Region).default([]),
  cues: z.array(Cue).default([]),
  populations: z.array(Population).default([]),
  variants: z.record(name(), z.array(Edit)).default({}),
  expectedMap: ExpectedMap.optional().describe('the expected topographic map (default: target u from source u, v from v, neither reversed)'),
});
export type Scene = z.infer<typeof Scene>;
export type SceneInput = z.input<typeof Scene>;
