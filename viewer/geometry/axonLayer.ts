// The axons in 3D: paths drawn straight from the frames array (see pathIndex.ts), growth-cone
// tips, and the selected axon's path as a tube. Each axon's colour and visibility live in a small
// data texture read by the shaders (axon = vertex id mod N), so recolouring, hiding or
// selecting never touches the big buffers.
//
// Three ways to draw the paths, chosen per frame by the progressive renderer:
//   sample  the first k visible axons of the spread order, thinned to every s-th frame, plus a
//           "tail" from the last thinned frame to the shown one (cheap, for while things move);
//   full    every visible axon at every frame, in one draw;
//   refine  the full index in chunks across several frames, added onto the picture.
import * as THREE from 'three';
import type { RunModel } from '../model/runModel.ts';
import { buildPathIndex, tailIndex, type PathIndex } from './pathIndex.ts';

export interface SampleChoice {
  axons: number;
  segments: number;
}

export class AxonLayer {
  /** drawn in every full-picture pass */
  readonly object = new THREE.Group();
  /** drawn alone, on top of the picture, in refinement passes */
  readonly refineObject: THREE.LineSegments;
  /** every visible growth cone, drawn over the picture when refinement completes */
  readonly refineTips: THREE.Points;

  private readonly model: RunModel;
  private readonly position: THREE.BufferAttribute;
  private readonly colourData: Uint8Array;
  private readonly colourTex: THREE.DataTexture;
  private readonly timingTex: THREE.DataTexture;
  private readonly texWidth: number;
  private readonly lineMaterial: THREE.ShaderMaterial;
  private readonly tipMaterial: THREE.ShaderMaterial;
  private readonly sampleLines: THREE.LineSegments;
  private readonly tailLines: THREE.LineSegments;
  private readonly fullLines: THREE.LineSegments;
  private readonly tips: THREE.Points;
  private readonly tipIndex: Uint32Array;
  /** how many axons' cones are drawn: the sample's while moving, every visible one when still */
  private tipCount = 0;
  private readonly selection = new THREE.Group();
  private readonly tailBuffer: Uint32Array;
  private tube: THREE.Mesh | null = null;
  private selTip: THREE.Points | null = null;

  private visibleOrder: Int32Array;
  private readonly moveStride: number;
  /** sample levels built so far, each with its own geometry: switching level then only switches
   *  geometry (a new geometry's first draw costs a buffer upload and a vertex array) */
  private sampleCache = new Map<number, { idx: PathIndex; geom: THREE.BufferGeometry }>();
  private sample: PathIndex | null = null;
  private full: PathIndex | null = null;
  private frame = 0;
  private selected: number | null = null;

  constructor(model: RunModel) {
    this.model = model;
    const { N, F } = model;
    this.position = new THREE.BufferAttribute(model.positions, 3);
    this.position.setUsage(THREE.StaticDrawUsage);

    this.texWidth = Math.max(1, Math.min(N, 2048));
    const texHeight = Math.max(1, Math.ceil(N / this.texWidth));
    this.colourData = new Uint8Array(this.texWidth * texHeight * 4);
    this.colourData.set(model.colours);
    this.colourTex = dataTexture(this.colourData, this.texWidth, texHeight, THREE.RGBAFormat, THREE.UnsignedByteType);
    // per axon: first frame it moves, last frame it moves, 1 if still growing at the end
    const timing = new Float32Array(this.texWidth * texHeight * 4);
    for (let a = 0; a < N; a++) {
      timing[a * 4] = model.firstMove[a];
      timing[a * 4 + 1] = model.lastMove[a];
      timing[a * 4 + 2] = model.statusOf[a] === 0 ? 1 : 0; // AXON_STATUS[0] is "growing"
    }
    this.timingTex = dataTexture(timing, this.texWidth, texHeight, THREE.RGBAFormat, THREE.FloatType);

    const common = {
      uAxonColour: { value: this.colourTex },
      uAxons: { value: Math.max(1, N) },
      uTexWidth: { value: this.texWidth },
      uSelected: { value: -1 },
      uDim: { value: 0.32 },
    };
    this.lineMaterial = new THREE.ShaderMaterial({
      glslVersion: THREE.GLSL3,
      uniforms: common,
      vertexShader: LINE_VERTEX,
      fragmentShader: FLAT_FRAGMENT,
    });
    this.tipMaterial = new THREE.ShaderMaterial({
      glslVersion: THREE.GLSL3,
      uniforms: { ...common, uTiming: { value: this.timingTex }, uFrame: { value: 0 }, uSize: { value: 7 } },
      vertexShader: TIP_VERTEX,
      fragmentShader: TIP_FRAGMENT,
    });

    this.sampleLines = this.lines(new Uint32Array(0));
    this.tailBuffer = new Uint32Array(2 * N);
    this.tailLines = this.lines(this.tailBuffer);
    this.tailLines.geometry.getIndex()!.setUsage(THREE.DynamicDrawUsage);
    this.fullLines = this.lines(new Uint32Array(0));
    this.refineObject = this.lines(new Uint32Array(0));

    // Growth cones of the shown frame through an index (vertex f·N + a), so that while moving only
    // the sampled axons' cones are drawn: ten thousand discs are a large part of a software frame.
    const tipGeom = new THREE.BufferGeometry();
    tipGeom.setAttribute('position', this.position);
    this.tipIndex = new Uint32Array(Math.max(1, N));
    tipGeom.setIndex(new THREE.BufferAttribute(this.tipIndex, 1).setUsage(THREE.DynamicDrawUsage));
    this.tips = new THREE.Points(tipGeom, this.tipMaterial);
    this.tips.frustumCulled = false;
    this.tips.renderOrder = 2;
    const refineTipGeom = new THREE.BufferGeometry();
    refineTipGeom.setAttribute('position', this.position);
    refineTipGeom.setIndex(new THREE.BufferAttribute(new Uint32Array(Math.max(1, N)), 1).setUsage(THREE.DynamicDrawUsage));
    refineTipGeom.setDrawRange(0, 0);
    this.refineTips = new THREE.Points(refineTipGeom, this.tipMaterial);
    this.refineTips.frustumCulled = false;
    this.refineTips.renderOrder = 2;

    this.object.add(this.sampleLines, this.tailLines, this.fullLines, this.tips, this.selection);
    this.moveStride = Math.max(1, Math.ceil((F - 1) / 160));
    this.visibleOrder = model.order;
    this.tipCount = N;
    this.setFrame(0);
  }

  /** Sends the frames array to the GPU now (a one-vertex draw that uses it), and waits until it
   *  is there; otherwise the upload is paid inside the first frame. */
  uploadPositions(renderer: THREE.WebGLRenderer, camera: THREE.Camera): void {
    const g = new THREE.BufferGeometry();
    g.setAttribute('position', this.position);
    g.setDrawRange(0, 1);
    const probe = new THREE.Points(g, this.tipMaterial);
    probe.frustumCulled = false;
    const scene = new THREE.Scene();
    scene.add(probe);
    const auto = renderer.autoClear;
    renderer.autoClear = false;
    renderer.render(scene, camera);
    renderer.autoClear = auto;
    const gl = renderer.getContext();
    gl.readPixels(0, 0, 1, 1, gl.RGBA, gl.UNSIGNED_BYTE, new Uint8Array(4));
    releaseGeometry(g);
  }

  /** Axons that pass the filters (0/1 per axon). */
  setVisible(mask: Uint8Array): void {
    for (let a = 0; a < this.model.N; a++) this.colourData[a * 4 + 3] = mask[a] ? 255 : 0;
    this.colourTex.needsUpdate = true;
    const order = this.model.order;
    const vis = new Int32Array(order.length);
    let k = 0;
    for (let i = 0; i < order.length; i++) if (mask[order[i]]) vis[k++] = order[i];
    this.visibleOrder = vis.subarray(0, k);
    this.clearSamples();
    this.full = null;
    this.setIndex(this.fullLines, new Uint32Array(0));
    this.setIndex(this.refineObject, new Uint32Array(0));
    this.setFrame(this.frame);
  }

  get visibleCount(): number {
    return this.visibleOrder.length;
  }

  get frameShown(): number {
    return this.frame;
  }

  setFrame(f: number): void {
    const F = this.model.F, N = this.model.N;
    this.frame = Math.max(0, Math.min(F - 1, f));
    this.tipMaterial.uniforms.uFrame.value = this.frame;
    this.updateTips();
    if (this.sample) {
      this.sampleLines.geometry.setDrawRange(0, this.sample.prefixEnd[this.frame] ?? 0);
      const n = tailIndex(this.model.positions, N, this.sample.axons, this.sample.stride, this.frame, this.tailBuffer);
      const idx = this.tailLines.geometry.getIndex()!;
      idx.clearUpdateRanges();
      idx.addUpdateRange(0, n);
      idx.needsUpdate = true;
      this.tailLines.geometry.setDrawRange(0, n);
    }
    if (this.full) this.fullLines.geometry.setDrawRange(0, this.full.prefixEnd[this.frame] ?? 0);
    this.updateSelection();
  }

  private updateTips(): void {
    const N = this.model.N, row = this.frame * N;
    const list = this.visibleOrder;
    const n = Math.min(this.tipCount, list.length);
    for (let i = 0; i < n; i++) this.tipIndex[i] = row + list[i];
    const idx = this.tips.geometry.getIndex()!;
    idx.clearUpdateRanges();
    idx.addUpdateRange(0, n);
    idx.needsUpdate = true;
    this.tips.geometry.setDrawRange(0, n);
  }

  setTipsVisible(on: boolean): void {
    this.tips.visible = on;
  }

  setSelected(a: number | null): void {
    const sel = a !== null && a >= 0 && a < this.model.N ? a : null;
    if (sel === this.selected) return;
    this.selected = sel;
    this.lineMaterial.uniforms.uSelected.value = sel ?? -1;
    this.buildSelection();
  }

  /** Draw the sample whose segments up to the shown frame fit `segmentBudget`. Sample sizes
   *  are the visible count halved 0, 1, 2 … times, so each level is built once and reused. */
  useSample(segmentBudget: number): SampleChoice {
    const total = this.visibleOrder.length;
    // Estimate each level's segments from when its axons move (no index needed), pick the
    // largest that fits, then build only that one.
    let k = total;
    while (k > 64 && this.estimateSegments(k) > segmentBudget) k = Math.ceil(k / 2);
    let idx = this.sampleIndex(k);
    while (k > 64 && idx.prefixEnd[this.frame] / 2 > segmentBudget * 1.25) {
      k = Math.ceil(k / 2);
      idx = this.sampleIndex(k);
    }
    if (this.sample !== idx) {
      this.sample = idx;
      this.sampleLines.geometry = this.sampleCache.get(k)!.geom;
    }
    this.sampleLines.visible = this.tailLines.visible = true;
    this.fullLines.visible = false;
    this.tipCount = k;
    this.setFrame(this.frame);
    return { axons: k, segments: (idx.prefixEnd[this.frame] ?? 0) / 2 };
  }

  /** Segments in the full picture at the shown frame (builds the full index on first use). */
  fullSegments(): number {
    return (this.fullIndex().prefixEnd[this.frame] ?? 0) / 2;
  }

  /** Draw every visible axon in the full-picture pass. */
  useFull(): void {
    const idx = this.fullIndex();
    if (this.fullLines.geometry.getIndex()?.array !== idx.index) this.setIndex(this.fullLines, idx.index);
    this.sampleLines.visible = this.tailLines.visible = false;
    this.fullLines.visible = true;
    this.tipCount = this.visibleOrder.length;
    this.setFrame(this.frame);
  }

  /** Hides the paths of the full-picture pass, keeping cones and selection: the recorder draws
   *  the paths apart (through refineRange), adding each frame's new segments to the last. */
  hidePaths(): void {
    this.sampleLines.visible = this.tailLines.visible = this.fullLines.visible = false;
  }

  /** Growth-cone disc diameter in pixels (7 in the viewer; larger for large video frames). */
  setTipSize(px: number): void {
    this.tipMaterial.uniforms.uSize.value = px;
  }

  /** Readies `refineTips` to draw every visible axon's growth cone at the shown frame. */
  prepareRefineTips(): void {
    const N = this.model.N, row = this.frame * N, list = this.visibleOrder;
    const g = this.refineTips.geometry;
    const idx = g.getIndex()!;
    const arr = idx.array as Uint32Array;
    for (let i = 0; i < list.length; i++) arr[i] = row + list[i];
    idx.clearUpdateRanges();
    idx.addUpdateRange(0, list.length);
    idx.needsUpdate = true;
    g.setDrawRange(0, list.length);
  }

  /** Sets the refinement object to draw segments [first, first + count) of the full picture;
   *  returns the segments actually in range. */
  refineRange(firstSegment: number, count: number): number {
    const idx = this.fullIndex();
    if (this.refineObject.geometry.getIndex()?.array !== idx.index) this.setIndex(this.refineObject, idx.index);
    const end = Math.min(idx.prefixEnd[this.frame] ?? 0, 2 * (firstSegment + count));
    const start = Math.min(2 * firstSegment, end);
    this.refineObject.geometry.setDrawRange(start, end - start);
    return (end - start) / 2;
  }

  dispose(): void {
    this.clearSamples();
    for (const o of [this.sampleLines, this.tailLines, this.fullLines, this.refineObject, this.refineTips]) releaseGeometry(o.geometry);
    this.tips.geometry.dispose(); // the last user of the shared positions frees them
    this.lineMaterial.dispose();
    this.tipMaterial.dispose();
    this.colourTex.dispose();
    this.timingTex.dispose();
    this.clearSelection();
  }

  // --- private helpers ---

  private lines(index: Uint32Array): THREE.LineSegments {
    const g = new THREE.BufferGeometry();
    g.setAttribute('position', this.position);
    g.setIndex(new THREE.BufferAttribute(index, 1));
    const l = new THREE.LineSegments(g, this.lineMaterial);
    l.frustumCulled = false; // the bounding sphere would be computed over all F·N vertices
    return l;
  }

  private setIndex(obj: THREE.LineSegments, index: Uint32Array): void {
    const old = obj.geometry;
    const g = new THREE.BufferGeometry();
    g.setAttribute('position', this.position);
    g.setIndex(new THREE.BufferAttribute(index, 1));
    g.setDrawRange(0, 0);
    obj.geometry = g;
    releaseGeometry(old);
  }

  /** Segments the first k axons of the visible order draw up to the shown frame, thinned. */
  private estimateSegments(k: number): number {
    const { firstMove, lastMove } = this.model;
    const stride = k === this.visibleOrder.length && k <= 64 ? 1 : this.moveStride;
    let n = 0;
    for (let i = 0; i < k; i++) {
      const a = this.visibleOrder[i];
      if (firstMove[a] < 0) continue;
      n += Math.max(0, Math.min(lastMove[a], this.frame) - firstMove[a]);
    }
    return n / stride;
  }

  private sampleIndex(k: number): PathIndex {
    let entry = this.sampleCache.get(k);
    if (!entry) {
      const { positions, F, N } = this.model;
      const stride = k === this.visibleOrder.length && k <= 64 ? 1 : this.moveStride;
      const idx = buildPathIndex(positions, F, N, this.visibleOrder.subarray(0, k), stride);
      const geom = new THREE.BufferGeometry();
      geom.setAttribute('position', this.position);
      geom.setIndex(new THREE.BufferAttribute(idx.index, 1));
      geom.setDrawRange(0, 0);
      entry = { idx, geom };
      this.sampleCache.set(k, entry);
    }
    return entry.idx;
  }

  private clearSamples(): void {
    const keep = this.sampleLines.geometry;
    this.sampleLines.geometry = new THREE.BufferGeometry();
    this.sampleLines.geometry.setAttribute('position', this.position);
    this.sampleLines.geometry.setIndex(new THREE.BufferAttribute(new Uint32Array(0), 1));
    for (const { geom } of this.sampleCache.values()) releaseGeometry(geom);
    if (![...this.sampleCache.values()].some((e) => e.geom === keep)) releaseGeometry(keep);
    this.sampleCache.clear();
    this.sample = null;
  }

  private fullIndex(): PathIndex {
    if (!this.full) {
      const { positions, F, N } = this.model;
      this.full = buildPathIndex(positions, F, N, this.visibleOrder, 1);
      this.setIndex(this.fullLines, this.full.index);
      this.fullLines.geometry.setDrawRange(0, this.full.prefixEnd[this.frame] ?? 0);
    }
    return this.full;
  }

  private clearSelection(): void {
    for (const o of [this.tube, this.selTip]) {
      if (!o) continue;
      this.selection.remove(o);
      o.geometry.dispose();
      (o.material as THREE.Material).dispose();
    }
    this.tube = null;
    this.selTip = null;
  }

  private buildSelection(): void {
    this.clearSelection();
    const a = this.selected;
    if (a === null) return;
    const { positions, F, N, size } = this.model;
    const radius = Math.max(size[0], size[1], size[2]) / 320;
    const path = new Float32Array(F * 3);
    for (let f = 0; f < F; f++) for (let c = 0; c < 3; c++) path[f * 3 + c] = positions[(f * N + a) * 3 + c];
    this.tube = new THREE.Mesh(tubeGeometry(path, F, radius, 6), new THREE.MeshBasicMaterial({ color: 0xffffff }));
    this.tube.frustumCulled = false;
    this.tube.renderOrder = 3;
    const tipG = new THREE.BufferGeometry();
    tipG.setAttribute('position', new THREE.BufferAttribute(path, 3));
    this.selTip = new THREE.Points(tipG, new THREE.PointsMaterial({ color: 0xffffff, size: 15, sizeAttenuation: false, map: ringTexture(), transparent: true, alphaTest: 0.5, depthTest: false }));
    this.selTip.frustumCulled = false;
    this.selTip.renderOrder = 4;
    this.selection.add(this.tube, this.selTip);
    this.updateSelection();
  }

  private updateSelection(): void {
    if (this.tube) this.tube.geometry.setDrawRange(0, this.frame * 6 * 6);
    if (this.selTip) this.selTip.geometry.setDrawRange(this.frame, 1);
  }
}

/** Frees a geometry's own GPU buffers but not the shared frames array: three.js deletes the
 *  buffers of every attribute a disposed geometry holds, and the other geometries drawing from
 *  the same positions would lose them (and upload tens of MB again). */
function releaseGeometry(g: THREE.BufferGeometry): void {
  g.deleteAttribute('position');
  g.dispose();
}

/** A tube of `sides` around a polyline of n points, its index ordered by segment so a draw
 *  range of i·sides·6 shows the first i segments. Rotation-minimising frames (parallel
 *  transport of the normal) keep the tube from twisting. Repeated points reuse the last
 *  direction. */
export function tubeGeometry(path: Float32Array, n: number, radius: number, sides: number): THREE.BufferGeometry {
  const pos = new Float32Array(n * sides * 3);
  const t = new THREE.Vector3(1, 0, 0), prevT = new THREE.Vector3(1, 0, 0);
  const normal = new THREE.Vector3(), binormal = new THREE.Vector3(), tmp = new THREE.Vector3();
  let haveNormal = false;
  for (let i = 0; i < n; i++) {
    const j = Math.min(i + 1, n - 1), h = Math.max(i - 1, 0);
    tmp.set(path[j * 3] - path[h * 3], path[j * 3 + 1] - path[h * 3 + 1], path[j * 3 + 2] - path[h * 3 + 2]);
    if (tmp.lengthSq() > 1e-12) t.copy(tmp).normalize();
    if (!haveNormal) {
      normal.set(Math.abs(t.x) < 0.9 ? 1 : 0, Math.abs(t.x) < 0.9 ? 0 : 1, 0).cross(t).normalize();
      haveNormal = true;
    } else {
      // parallel transport: rotate the normal by the rotation taking prevT to t
      const axis = tmp.crossVectors(prevT, t);
      const s = axis.length();
      if (s > 1e-9) normal.applyAxisAngle(axis.normalize(), Math.asin(Math.min(1, s)));
      normal.addScaledVector(t, -normal.dot(t)).normalize();
    }
    prevT.copy(t);
    binormal.crossVectors(t, normal);
    for (let k = 0; k < sides; k++) {
      const ang = (k / sides) * Math.PI * 2;
      const c = Math.cos(ang) * radius, s = Math.sin(ang) * radius;
      const o = (i * sides + k) * 3;
      pos[o] = path[i * 3] + c * normal.x + s * binormal.x;
      pos[o + 1] = path[i * 3 + 1] + c * normal.y + s * binormal.y;
      pos[o + 2] = path[i * 3 + 2] + c * normal.z + s * binormal.z;
    }
  }
  const idx = new Uint32Array(Math.max(0, n - 1) * sides * 6);
  let q = 0;
  for (let i = 0; i < n - 1; i++) {
    for (let k = 0; k < sides; k++) {
      const a = i * sides + k, b = i * sides + ((k + 1) % sides), c = a + sides, d = b + sides;
      idx.set([a, c, b, b, c, d], q);
      q += 6;
    }
  }
  const g = new THREE.BufferGeometry();
  g.setAttribute('position', new THREE.BufferAttribute(pos, 3));
  g.setIndex(new THREE.BufferAttribute(idx, 1));
  return g;
}

let ring: THREE.DataTexture | null = null;
/** A white ring with a dark outline, for marking the selected growth cone. */
function ringTexture(): THREE.DataTexture {
  if (ring) return ring;
  const n = 32;
  const d = new Uint8Array(n * n * 4);
  for (let y = 0; y < n; y++) for (let x = 0; x < n; x++) {
    const r = Math.hypot(x + 0.5 - n / 2, y + 0.5 - n / 2) / (n / 2);
    const o = (y * n + x) * 4;
    const white = r > 0.55 && r < 0.82, dark = (r >= 0.82 && r < 1) || (r > 0.42 && r <= 0.55);
    const v = white ? 255 : 20;
    d.set([v, v, v, white || dark ? 255 : 0], o);
  }
  ring = dataTexture(d, n, n, THREE.RGBAFormat, THREE.UnsignedByteType);
  ring.magFilter = THREE.LinearFilter;
  ring.minFilter = THREE.LinearFilter;
  return ring;
}

function dataTexture(data: Uint8Array | Float32Array, w: number, h: number, format: THREE.PixelFormat, type: THREE.TextureDataType): THREE.DataTexture {
  const t = new THREE.DataTexture(data, w, h, format, type);
  t.magFilter = THREE.NearestFilter;
  t.minFilter = THREE.NearestFilter;
  t.generateMipmaps = false;
  t.needsUpdate = true;
  return t;
}

// Colour and visibility per axon from the data texture; hidden axons are moved outside the clip
// volume so they draw nothing.
const AXON_LOOKUP = /* glsl */ `
uniform sampler2D uAxonColour;
uniform int uAxons;
uniform int uTexWidth;
uniform int uSelected;
uniform float uDim;
ivec2 texelOf(int a) { return ivec2(a % uTexWidth, a / uTexWidth); }
`;

const LINE_VERTEX = /* glsl */ `
${AXON_LOOKUP}
flat out vec3 vColour;
void main() {
  int a = gl_VertexID % uAxons;
  vec4 c = texelFetch(uAxonColour, texelOf(a), 0);
  if (c.a < 0.5) { vColour = vec3(0.0); gl_Position = vec4(0.0, 0.0, 2.0, 1.0); return; }
  vColour = (uSelected >= 0 && a != uSelected) ? c.rgb * uDim : c.rgb;
  gl_Position = projectionMatrix * modelViewMatrix * vec4(position, 1.0);
}
`;

const FLAT_FRAGMENT = /* glsl */ `
flat in vec3 vColour;
out highp vec4 outColour;
void main() { outColour = vec4(vColour, 1.0); }
`;

// Growth cones: a disc with a dark rim while the axon is still advancing, a small square once it
// has stopped; nothing before it starts.
const TIP_VERTEX = /* glsl */ `
${AXON_LOOKUP}
uniform sampler2D uTiming;
uniform int uFrame;
uniform float uSize;
flat out vec3 vColour;
flat out float vStopped;
void main() {
  int a = gl_VertexID % uAxons;
  vec4 c = texelFetch(uAxonColour, texelOf(a), 0);
  vec4 t = texelFetch(uTiming, texelOf(a), 0);
  float f = float(uFrame);
  bool waiting = t.x >= 0.0 && f < t.x;
  if (c.a < 0.5 || waiting) { vColour = vec3(0.0); vStopped = 0.0; gl_Position = vec4(0.0, 0.0, 2.0, 1.0); gl_PointSize = 1.0; return; }
  vStopped = (t.z < 0.5 && (t.y < 0.0 || f >= t.y)) ? 1.0 : 0.0;
  vColour = (uSelected >= 0 && a != uSelected) ? c.rgb * uDim : c.rgb;
  gl_PointSize = vStopped > 0.5 ? uSize * 0.62 : uSize;
  gl_Position = projectionMatrix * modelViewMatrix * vec4(position, 1.0);
}
`;

const TIP_FRAGMENT = /* glsl */ `
flat in vec3 vColour;
flat in float vStopped;
out highp vec4 outColour;
void main() {
  vec2 p = gl_PointCoord * 2.0 - 1.0;
  if (vStopped > 0.5) { outColour = vec4(vColour * 0.8, 1.0); return; }
  float r = length(p);
  if (r > 1.0) discard;
  outColour = vec4(r > 0.62 ? vec3(0.06) : vColour, 1.0);
}
`;
