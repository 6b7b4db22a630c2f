// A cue field in 3D: a slice plane through a volume grid, or the field painted onto its sheet,
// coloured with the field ramp; optionally an isosurface of a volume grid.
import * as THREE from 'three';
import type { FieldGrid } from '../../engine/io/runReader.ts';
import type { SheetRegion } from '../../engine/scene/schema.ts';
import { fieldColour, fieldRampBytes, fieldScale } from '../colour/fieldRamp.ts';
import { sliceVolume, type SliceAxis, type VolumeGrid } from './fieldSlice.ts';
import { surfaceNets } from './surfaceNets.ts';
import { sheetGeometry } from './regionLayer.ts';

export interface FieldView {
  axis: SliceAxis;
  /** slice position, fraction of the grid's extent along the axis */
  frac: number;
  log: boolean;
  showSlice: boolean;
  showIso: boolean;
  /** isosurface level as a fraction of the colour scale */
  isoFrac: number;
}

export class FieldLayer {
  readonly object = new THREE.Group();
  private slice: THREE.Mesh | null = null;
  private iso: THREE.Mesh | null = null;
  private isoKey = '';
  private field: FieldGrid | null = null;
  private sheets: SheetRegion[];

  constructor(sheets: SheetRegion[]) {
    this.sheets = sheets;
    const light = new THREE.DirectionalLight(0xffffff, 1.6);
    light.position.set(1, -1.5, 2);
    this.object.add(new THREE.AmbientLight(0xffffff, 0.9), light);
  }

  /** Shows `field` (or nothing for null) as `view` says. Returns the slice plane's world
   *  coordinate for volume fields, for the panel's label. */
  show(field: FieldGrid | null, view: FieldView): number | null {
    if (field !== this.field) {
      this.clear();
      this.field = field;
      this.isoKey = '';
    }
    if (!field) return null;
    const { info } = field;
    // a log scale needs positive values; fields of differences (border cues) have negative ones
    const log = view.log && !(info.min < 0);
    const scale = fieldScale(info.min, info.max, log);
    if (info.space === 'sheet') {
      const sheet = this.sheets.find((s) => s.name === info.region);
      if (!sheet) return null;
      const [nv, nu] = info.shape;
      this.setSliceMesh(sheetGeometry(sheet, 0.5), field.data, nu, nv, scale);
      this.slice!.visible = view.showSlice;
      return null;
    }
    const grid = volumeGrid(field);
    const extent = { x: grid.nx, y: grid.ny, z: grid.nz }[view.axis] - 1;
    const originAxis = grid.origin[{ x: 0, y: 1, z: 2 }[view.axis]];
    const at = originAxis + Math.min(1, Math.max(0, view.frac)) * extent * grid.spacing;
    const s = sliceVolume(grid, view.axis, at);
    this.setSliceMesh(slicePlane(s.across, s.up, view.axis, s.acrossRange, s.upRange, s.at), s.values, s.width, s.height, scale);
    this.slice!.visible = view.showSlice;

    const key = `${view.isoFrac.toFixed(3)}|${log}`;
    if (view.showIso && key !== this.isoKey) {
      this.removeIso();
      this.isoKey = key;
      const level = levelAt(info.min, info.max, log, view.isoFrac);
      const mesh = surfaceNets(grid.data, grid.nx, grid.ny, grid.nz, level, grid.origin, grid.spacing);
      if (mesh.indices.length > 0) {
        const g = new THREE.BufferGeometry();
        g.setAttribute('position', new THREE.BufferAttribute(mesh.positions, 3));
        g.setIndex(new THREE.BufferAttribute(mesh.indices, 1));
        g.computeVertexNormals();
        const [r, gg, b] = fieldColour(view.isoFrac);
        this.iso = new THREE.Mesh(g, new THREE.MeshLambertMaterial({
          color: new THREE.Color(r, gg, b), transparent: true, opacity: 0.42, side: THREE.DoubleSide, depthWrite: false,
        }));
        this.iso.renderOrder = 1;
        this.object.add(this.iso);
      }
    }
    if (this.iso) this.iso.visible = view.showIso;
    return s.at;
  }

  dispose(): void {
    this.clear();
  }

  // --- private helpers ---

  private setSliceMesh(geom: THREE.BufferGeometry, values: Float32Array, w: number, h: number, scale: (c: number) => number): void {
    const ramp = fieldRampBytes();
    const rgba = new Uint8Array(w * h * 4);
    for (let i = 0; i < w * h; i++) {
      const t = Math.min(255, Math.max(0, Math.round(scale(values[i]) * 255)));
      rgba[i * 4] = ramp[t * 4];
      rgba[i * 4 + 1] = ramp[t * 4 + 1];
      rgba[i * 4 + 2] = ramp[t * 4 + 2];
      rgba[i * 4 + 3] = 255;
    }
    const tex = new THREE.DataTexture(rgba, w, h, THREE.RGBAFormat, THREE.UnsignedByteType);
    tex.magFilter = THREE.LinearFilter;
    tex.minFilter = THREE.LinearFilter;
    tex.needsUpdate = true;
    if (this.slice) {
      this.slice.geometry.dispose();
      const m = this.slice.material as THREE.MeshBasicMaterial;
      m.map?.dispose();
      m.map = tex;
      m.needsUpdate = true;
      this.slice.geometry = geom;
    } else {
      this.slice = new THREE.Mesh(geom, new THREE.MeshBasicMaterial({ map: tex, side: THREE.DoubleSide, transparent: true, opacity: 0.82, depthWrite: false }));
      this.slice.renderOrder = 1;
      this.object.add(this.slice);
    }
  }

  private removeIso(): void {
    if (!this.iso) return;
    this.object.remove(this.iso);
    this.iso.geometry.dispose();
    (this.iso.material as THREE.Material).dispose();
    this.iso = null;
  }

  private clear(): void {
    this.removeIso();
    if (this.slice) {
      this.object.remove(this.slice);
      this.slice.geometry.dispose();
      const m = this.slice.material as THREE.MeshBasicMaterial;
      m.map?.dispose();
      m.dispose();
      this.slice = null;
    }
  }
}

/** The concentration at fraction `frac` of the colour scale (inverse of fieldScale). */
export function levelAt(lo: number, hi: number, log: boolean, frac: number): number {
  if (log) {
    const top = hi > 0 ? hi : 1;
    const bottom = lo > 0 && lo < top ? lo : top * 1e-4;
    return 10 ** (Math.log10(bottom) + frac * (Math.log10(top) - Math.log10(bottom)));
  }
  return lo + frac * (hi - lo);
}

export function volumeGrid(f: FieldGrid): VolumeGrid {
  const [nz, ny, nx] = f.info.shape;
  return { data: f.data, nx, ny, nz, origin: f.info.origin ?? [0, 0, 0], spacing: f.info.spacing ?? 1 };
}

/** A rectangle in the plane axis = at, with uv (0..1) running along `across` and `up`. */
function slicePlane(across: SliceAxis, up: SliceAxis, axis: SliceAxis, ar: [number, number], ur: [number, number], at: number): THREE.BufferGeometry {
  const idx = { x: 0, y: 1, z: 2 };
  const corner = (a: number, u: number) => {
    const p = [0, 0, 0];
    p[idx[across]] = a;
    p[idx[up]] = u;
    p[idx[axis]] = at;
    return p;
  };
  const g = new THREE.BufferGeometry();
  g.setAttribute('position', new THREE.Float32BufferAttribute([...corner(ar[0], ur[0]), ...corner(ar[1], ur[0]), ...corner(ar[1], ur[1]), ...corner(ar[0], ur[1])], 3));
  g.setAttribute('uv', new THREE.Float32BufferAttribute([0, 0, 1, 0, 1, 1, 0, 1], 2));
  g.setIndex([0, 1, 2, 0, 2, 3]);
  return g;
}
