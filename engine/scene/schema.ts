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

export const Region = z.discriminatedUnion('shape', [BoxRegion, EllipsoidRegion, SheetRegion]);
export type Region = z.infer<typeof Region>;
export type SheetRegion = z.infer<typeof SheetRegion>;

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
  region: name().describe('a box or ellipsoid region that secretes'),
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

export const Cue = z.discriminatedUnion('kind', [PointCue, RegionCue, ExpressedCue, RelayCue]);
export type Cue = z.infer<typeof Cue>;
export type PointCue = z.infer<typeof PointCue>;
export type RegionCue = z.infer<typeof RegionCue>;
export type ExpressedCue = z.infer<typeof ExpressedCue>;
export type RelayCue = z.infer<typeof RelayCue>;

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
]);
export type Edit = z.infer<typeof Edit>;

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
});
export type Scene = z.infer<typeof Scene>;
export type SceneInput = z.input<typeof Scene>;
