// The volume's outline and its regions as three.js objects. Each role has one look, kept
// deliberately few so it can be learnt in a glance:
//   source sheet   painted with the (u, v) colour map itself, so the sheet is its own legend;
//   target sheet   pale with a quarter grid, so landing positions can be read off;
//   wall           solid rust, the one warm opaque-looking thing in the scene;
//   other regions  faint blue outline.
import * as THREE from 'three';
import type { Region, SheetRegion } from '../../engine/scene/schema.ts';
import type { RegionRole, RunModel } from '../model/runModel.ts';
import { sheetColour } from '../colour/sheetColour.ts';

export const ROLE_STYLE: Record<RegionRole, { fill: number; edge: number; opacity: number; label: string }> = {
  source: { fill: 0xffffff, edge: 0xd8dee6, opacity: 0.55, label: 'source sheet' },
  target: { fill: 0xcfd8e3, edge: 0xe8edf3, opacity: 0.16, label: 'target sheet' },
  wall: { fill: 0xb5562f, edge: 0xe07a50, opacity: 0.5, label: 'wall' },
  region: { fill: 0x5b84b1, edge: 0x7fa6d1, opacity: 0.1, label: 'region' },
};

export interface RegionLabel {
  text: string;
  role: RegionRole | 'axis';
  position: THREE.Vector3;
  region?: string;
}

export class RegionLayer {
  readonly object = new THREE.Group();
  readonly labels: RegionLabel[] = [];
  private readonly byName = new Map<string, THREE.Object3D>();
  private readonly box: THREE.Object3D;

  constructor(model: RunModel) {
    const [sx, sy, sz] = model.size;
    this.box = new THREE.LineSegments(
      new THREE.EdgesGeometry(new THREE.BoxGeometry(sx, sy, sz)),
      new THREE.LineBasicMaterial({ color: 0x5d6875 }),
    );
    this.box.position.set(sx / 2, sy / 2, sz / 2);
    this.object.add(this.box);
    // axis names at the far end of each edge leaving the origin
    const pad = Math.max(sx, sy, sz) * 0.03;
    this.labels.push(
      { text: `x ${fmt(sx)} µm`, role: 'axis', position: new THREE.Vector3(sx + pad, 0, 0) },
      { text: `y ${fmt(sy)} µm`, role: 'axis', position: new THREE.Vector3(0, sy + pad, 0) },
      { text: `z ${fmt(sz)} µm`, role: 'axis', position: new THREE.Vector3(0, 0, sz + pad) },
    );
    for (const r of model.regions) {
      const role = model.roles.get(r.name) ?? 'region';
      const obj = regionObject(r, role);
      obj.name = r.name;
      this.byName.set(r.name, obj);
      this.object.add(obj);
      this.labels.push({ text: r.name, role, position: labelPoint(r), region: r.name });
      if (r.shape === 'sheet' && (role === 'source' || role === 'target')) {
        const o = new THREE.Vector3(...r.origin), u = new THREE.Vector3(...r.uAxis), v = new THREE.Vector3(...r.vAxis);
        this.labels.push(
          { text: r.uName ? `u (${r.uName})` : 'u', role: 'axis', position: o.clone().addScaledVector(u, 0.5).addScaledVector(v, -0.06), region: r.name },
          { text: r.vName ? `v (${r.vName})` : 'v', role: 'axis', position: o.clone().addScaledVector(v, 0.5).addScaledVector(u, -0.06), region: r.name },
        );
      }
    }
  }

  setHidden(hidden: ReadonlySet<string>, showBox: boolean): void {
    for (const [name, obj] of this.byName) obj.visible = !hidden.has(name);
    this.box.visible = showBox;
  }

  dispose(): void {
    this.object.traverse((o) => {
      const m = o as THREE.Mesh;
      m.geometry?.dispose();
      const mat = m.material as THREE.Material | THREE.Material[] | undefined;
      if (Array.isArray(mat)) mat.forEach((x) => x.dispose());
      else mat?.dispose();
    });
  }
}

/** The sheet as a two-triangle parallelogram with uv = the sheet's own (u, v). */
export function sheetGeometry(r: SheetRegion, offset = 0): THREE.BufferGeometry {
  const o = new THREE.Vector3(...r.origin), u = new THREE.Vector3(...r.uAxis), v = new THREE.Vector3(...r.vAxis);
  const n = u.clone().cross(v).normalize().multiplyScalar(offset);
  const p = [o, o.clone().add(u), o.clone().add(u).add(v), o.clone().add(v)].map((q) => q.add(n));
  const g = new THREE.BufferGeometry();
  g.setAttribute('position', new THREE.Float32BufferAttribute(p.flatMap((q) => [q.x, q.y, q.z]), 3));
  g.setAttribute('uv', new THREE.Float32BufferAttribute([0, 0, 1, 0, 1, 1, 0, 1], 2));
  g.setIndex([0, 1, 2, 0, 2, 3]);
  return g;
}

// --- private helpers ---

function regionObject(r: Region, role: RegionRole): THREE.Object3D {
  const style = ROLE_STYLE[role];
  const group = new THREE.Group();
  const fillMat = new THREE.MeshBasicMaterial({
    color: style.fill, transparent: true, opacity: style.opacity, side: THREE.DoubleSide, depthWrite: false,
  });
  const edgeMat = new THREE.LineBasicMaterial({ color: style.edge });
  if (r.shape === 'sheet') {
    const g = sheetGeometry(r);
    if (role === 'source') fillMat.map = sheetColourTexture();
    group.add(new THREE.Mesh(g, fillMat));
    const o = new THREE.Vector3(...r.origin), u = new THREE.Vector3(...r.uAxis), v = new THREE.Vector3(...r.vAxis);
    const pts: number[] = [];
    const seg = (a: THREE.Vector3, b: THREE.Vector3) => pts.push(a.x, a.y, a.z, b.x, b.y, b.z);
    const at = (s: number, t: number) => o.clone().addScaledVector(u, s).addScaledVector(v, t);
    seg(at(0, 0), at(1, 0)); seg(at(1, 0), at(1, 1)); seg(at(1, 1), at(0, 1)); seg(at(0, 1), at(0, 0));
    const edges = new THREE.BufferGeometry();
    edges.setAttribute('position', new THREE.Float32BufferAttribute(pts, 3));
    group.add(new THREE.LineSegments(edges, edgeMat));
    if (role === 'target') {
      const grid: number[] = [];
      for (const s of [0.25, 0.5, 0.75]) {
        for (const [a, b] of [[at(s, 0), at(s, 1)], [at(0, s), at(1, s)]]) grid.push(a.x, a.y, a.z, b.x, b.y, b.z);
      }
      const gg = new THREE.BufferGeometry();
      gg.setAttribute('position', new THREE.Float32BufferAttribute(grid, 3));
      group.add(new THREE.LineSegments(gg, new THREE.LineBasicMaterial({ color: 0x8c98a6, transparent: true, opacity: 0.6 })));
    }
    return group;
  }
  if (r.shape === 'box') {
    const size = [0, 1, 2].map((i) => Math.max(1e-3, r.max[i] - r.min[i])) as [number, number, number];
    const g = new THREE.BoxGeometry(...size);
    const mesh = new THREE.Mesh(g, fillMat);
    const edges = new THREE.LineSegments(new THREE.EdgesGeometry(g), edgeMat);
    group.add(mesh, edges);
    group.position.set((r.min[0] + r.max[0]) / 2, (r.min[1] + r.max[1]) / 2, (r.min[2] + r.max[2]) / 2);
    return group;
  }
  if (r.shape === 'ellipsoid') {
    const g = new THREE.SphereGeometry(1, 28, 16);
    const mesh = new THREE.Mesh(g, fillMat);
    const wire = new THREE.LineSegments(new THREE.EdgesGeometry(new THREE.SphereGeometry(1, 12, 6), 1), edgeMat);
    group.add(mesh, wire);
    group.position.set(...r.center);
    group.scale.set(...r.radii);
    return group;
  }
  if (r.shape === 'tube') {
    // a capsule: every point within `radius` of the from–to segment
    const from = new THREE.Vector3(...r.from), to = new THREE.Vector3(...r.to);
    const axis = to.clone().sub(from);
    const g = new THREE.CapsuleGeometry(r.radius, Math.max(axis.length(), 1e-6), 6, 20);
    group.add(new THREE.Mesh(g, fillMat), new THREE.LineSegments(new THREE.EdgesGeometry(new THREE.CapsuleGeometry(r.radius, Math.max(axis.length(), 1e-6), 2, 8), 1), edgeMat));
    group.position.copy(from).add(to).multiplyScalar(0.5);
    if (axis.lengthSq() > 0) group.quaternion.setFromUnitVectors(new THREE.Vector3(0, 1, 0), axis.normalize());
    return group;
  }
  // Regions without a geometry of their own (e.g. domains set by a cue's fields) get a label only.
  return group;
}

function labelPoint(r: Region): THREE.Vector3 {
  if (r.shape === 'sheet') {
    return new THREE.Vector3(...r.origin).addScaledVector(new THREE.Vector3(...r.uAxis), 0.5).addScaledVector(new THREE.Vector3(...r.vAxis), 1.08);
  }
  if (r.shape === 'box') return new THREE.Vector3((r.min[0] + r.max[0]) / 2, (r.min[1] + r.max[1]) / 2, r.max[2]);
  if (r.shape === 'ellipsoid') return new THREE.Vector3(r.center[0], r.center[1], r.center[2] + r.radii[2]);
  if (r.shape === 'tube') {
    return new THREE.Vector3((r.from[0] + r.to[0]) / 2, (r.from[1] + r.to[1]) / 2, Math.max(r.from[2], r.to[2]) + r.radius);
  }
  return new THREE.Vector3(NaN, NaN, NaN); // not placed: the label is hidden
}

let colourTex: THREE.DataTexture | null = null;
/** The (u, v) colour map as a 64 × 64 texture (texel row = v, column = u). */
export function sheetColourTexture(): THREE.DataTexture {
  if (colourTex) return colourTex;
  const n = 64;
  const d = new Uint8Array(n * n * 4);
  for (let j = 0; j < n; j++) for (let i = 0; i < n; i++) {
    const [r, g, b] = sheetColour(i / (n - 1), j / (n - 1));
    d.set([r * 255, g * 255, b * 255, 255].map(Math.round), (j * n + i) * 4);
  }
  colourTex = new THREE.DataTexture(d, n, n, THREE.RGBAFormat, THREE.UnsignedByteType);
  colourTex.magFilter = THREE.LinearFilter;
  colourTex.minFilter = THREE.LinearFilter;
  colourTex.needsUpdate = true;
  return colourTex;
}

function fmt(x: number): string {
  return String(Number(x.toPrecision(4)));
}
