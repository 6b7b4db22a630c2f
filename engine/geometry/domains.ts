// Regions defined by a border cue's fields instead of by geometry: "where species X dominates"
// (X > the other species) or "where X is above / below a level" (thresholds read off a
// morphogen, the French-flag idea: Wolpert, J. Theor. Biol. 25, 1969), optionally limited to
// a box, ellipsoid or tube. Such a region can be a population's target or a wall.
//
// The region is compiled with the others but its fields do not exist until the border cue is
// solved, so the border builder binds it (`bind`) right after solving; asking an unbound
// domain anything is an internal error.
//
// Each condition is a level-set function φ that is negative inside:
//     dominant true : φ = other − self        dominant false: φ = self − other
//     above t       : φ = t − self            below t       : φ = self − t
// The region is where every φ < 0 (and inside `within`). Its distance is the first-order
// estimate φ/|∇φ| (exact for a linear field, close near the surface, which is where walls
// and targets act), combined over conditions and `within` by max, the intersection rule for
// signed distances.
import type { DomainRegion as DomainSpec } from '../scene/schema.ts';
import type { CompiledRegion } from './regions.ts';

/** What a domain needs from a field: value at a point, gradient into grad[0..2] (a CueField fits). */
export interface LevelField {
  sample(x: number, y: number, z: number, grad: Float64Array): number;
}

/** Far enough to mean "nowhere near the surface" where a level set is flat. */
const FAR = 1e12;

export class Domain implements CompiledRegion {
  readonly shape = 'domain' as const;
  readonly name: string;
  readonly permissive: boolean;
  readonly spec: DomainSpec;
  private self: LevelField | null = null;
  private other: LevelField | null = null;
  private within: CompiledRegion | null = null;
  private readonly g1 = new Float64Array(3);
  private readonly g2 = new Float64Array(3);
  private readonly nw = new Float64Array(3);
  private best = 0; // running maximum in distance()

  constructor(r: DomainSpec) {
    this.name = r.name;
    this.permissive = r.permissive;
    this.spec = r;
  }

  get bound(): boolean {
    return this.self !== null;
  }

  /** Attach the solved species (`self` = spec.species, `other` = its partner) and the `within` region. */
  bind(self: LevelField, other: LevelField, within: CompiledRegion | null): void {
    this.self = self;
    this.other = other;
    this.within = within;
  }

  contains(x: number, y: number, z: number): boolean {
    const self = this.field();
    const g = this.g1;
    const s = self.sample(x, y, z, g);
    const sp = this.spec;
    if (sp.above !== undefined && !(s > sp.above)) return false;
    if (sp.below !== undefined && !(s < sp.below)) return false;
    if (sp.dominant !== undefined) {
      const o = this.other!.sample(x, y, z, g);
      if (sp.dominant ? !(s > o) : !(o > s)) return false;
    }
    return this.within ? this.within.contains(x, y, z) : true;
  }

  distance(x: number, y: number, z: number, n: Float64Array): number {
    const self = this.field();
    const sp = this.spec;
    const gs = this.g1, go = this.g2;
    const s = self.sample(x, y, z, gs);
    this.best = -FAR;
    n[0] = 1; n[1] = 0; n[2] = 0;
    if (sp.above !== undefined) this.consider(sp.above - s, -gs[0], -gs[1], -gs[2], n);
    if (sp.below !== undefined) this.consider(s - sp.below, gs[0], gs[1], gs[2], n);
    if (sp.dominant !== undefined) {
      const o = this.other!.sample(x, y, z, go);
      const sign = sp.dominant ? 1 : -1;
      this.consider(sign * (o - s), sign * (go[0] - gs[0]), sign * (go[1] - gs[1]), sign * (go[2] - gs[2]), n);
    }
    if (this.within) {
      const nw = this.nw;
      const d = this.within.distance(x, y, z, nw);
      if (d > this.best) {
        this.best = d;
        n[0] = nw[0]; n[1] = nw[1]; n[2] = nw[2];
      }
    }
    return this.best;
  }

  /** one condition φ with gradient ∇φ: keep it if its distance estimate φ/|∇φ| is the largest so far */
  private consider(phi: number, gx: number, gy: number, gz: number, n: Float64Array): void {
    const gl = Math.sqrt(gx * gx + gy * gy + gz * gz);
    const d = gl > 0 ? phi / gl : phi < 0 ? -FAR : FAR;
    if (d > this.best) {
      this.best = d;
      if (gl > 0) { n[0] = gx / gl; n[1] = gy / gl; n[2] = gz / gl; }
    }
  }

  private field(): LevelField {
    if (!this.self) throw new Error(`internal: domain region "${this.name}" used before its border cue was solved`);
    return this.self;
  }
}
