// The recorder's own 3D picture: a WebGL canvas of the output's size, with its own copy of each
// run's layers, that draws a given time from a given camera with every visible axon, on demand.
// It is kept apart from the interactive views on purpose: those sample while things move and
// complete the picture over several frames, and their canvas has the page's size, not the
// video's. Several runs are drawn side by side, left to right, from one camera (as the viewer's
// linked views are), so a variant and its normal run are seen alike.
//
// Every frame shows every visible axon's whole path up to its time. Drawing all of them anew
// for each frame is what makes software WebGL slow (millions of segments), yet while the camera
// stands still a later frame's paths are the earlier frame's plus the segments grown since (the
// path index is ordered by frame, pathIndex.ts). So the paths are kept in an accumulation target
// (colour and depth) and each frame adds only its new segments; the frame itself starts as a
// copy of that target, depth included, and the rest (regions, cue field, growth cones, the
// selected axon) is drawn over it with depth testing, as in one full draw. When the camera
// moves (orbit, fly) or time goes back, the accumulation starts again from nothing.
import * as THREE from 'three';
import type { RunModel } from '../model/runModel.ts';
import { frameAt, visibleMask } from '../model/runModel.ts';
import type { ViewState } from '../state/viewState.ts';
import { AxonLayer } from '../geometry/axonLayer.ts';
import { RegionLayer, type RegionLabel } from '../geometry/regionLayer.ts';
import { FieldLayer, type FieldView } from '../geometry/fieldLayer.ts';
import type { CameraPose } from '../geometry/cameraPresets.ts';
import type { SheetRegion } from '../../engine/scene/schema.ts';
import { BACKGROUND } from '../components/GrowthView.tsx';

/** What the person chose to see in the viewer, carried into the recording. */
export interface StageLook {
  hiddenPops: ReadonlySet<string>;
  hiddenStatuses: ReadonlySet<string>;
  hiddenRegions: ReadonlySet<string>;
  showTips: boolean;
  showBox: boolean;
  selected: number | null;
  cue: string | null;
  field: FieldView;
}

export function lookOf(s: ViewState): StageLook {
  return {
    hiddenPops: s.hiddenPops, hiddenStatuses: s.hiddenStatuses, hiddenRegions: s.hiddenRegions,
    showTips: s.showTips, showBox: s.showBox, selected: s.selected, cue: s.cue,
    field: { axis: s.sliceAxis, frac: s.sliceFrac, log: s.logScale, showSlice: s.showSlice, showIso: s.showIso, isoFrac: s.isoFrac },
  };
}

export interface Rect {
  x: number;
  y: number;
  w: number;
  h: number;
}

/** Where a label lands in the output, px from the top left. */
export interface PlacedLabel {
  text: string;
  role: RegionLabel['role'];
  x: number;
  y: number;
}

/** What one view shows in a drawn frame, for the overlays. */
export interface ViewFrame {
  rect: Rect;
  /** the run frame drawn and its time, hours */
  frame: number;
  timeH: number;
  /** output pixels per µm */
  pxPerUm: number;
  labels: PlacedLabel[];
}

/** Gap between side-by-side views, as a fraction of the output's width (at least 2 px). */
const GAP = 0.002;

export class RecordStage {
  readonly canvas: HTMLCanvasElement;
  readonly width: number;
  readonly height: number;
  readonly rects: Rect[];
  private readonly renderer: THREE.WebGLRenderer;
  private readonly views: StageView[];
  private readonly look: StageLook;
  private readonly pixel = new Uint8Array(4);
  /** the paths drawn so far, colour and depth */
  private readonly paths: THREE.WebGLRenderTarget;
  /** the frame being composed: a copy of `paths` with everything else drawn over it */
  private readonly frame: THREE.WebGLRenderTarget;
  private readonly blit: { scene: THREE.Scene; camera: THREE.OrthographicCamera; quad: THREE.Mesh };
  /** the camera of the paths in `paths` (as text), null before the first frame */
  private pathsPose: string | null = null;

  /** redraw: draw every frame anew in one pass, paths and all, straight to the canvas (as the
   *  viewer's full still frame is drawn); slower, kept to check the accumulation against. */
  private readonly redraw: boolean;

  constructor(models: RunModel[], width: number, height: number, look: StageLook, redraw = false) {
    this.redraw = redraw;
    this.width = width;
    this.height = height;
    this.look = look;
    this.canvas = document.createElement('canvas');
    this.canvas.width = width;
    this.canvas.height = height;
    this.renderer = new THREE.WebGLRenderer({ canvas: this.canvas, antialias: false, alpha: false, preserveDrawingBuffer: true, powerPreference: 'low-power' });
    // as the interactive views (flat, linear): colours are sRGB values drawn as given
    this.renderer.outputColorSpace = THREE.LinearSRGBColorSpace;
    this.renderer.toneMapping = THREE.NoToneMapping;
    this.renderer.setPixelRatio(1);
    this.renderer.setSize(width, height, false);
    this.renderer.setClearColor(BACKGROUND, 1);
    this.rects = splitWidth(width, height, models.length);
    this.paths = renderTarget(width, height);
    this.frame = renderTarget(width, height);
    this.renderer.initRenderTarget(this.frame);
    const quad = new THREE.Mesh(new THREE.PlaneGeometry(2, 2), new THREE.MeshBasicMaterial({ map: this.frame.texture, depthTest: false, depthWrite: false }));
    quad.frustumCulled = false;
    this.blit = { scene: new THREE.Scene().add(quad), camera: new THREE.OrthographicCamera(-1, 1, 1, -1, 0, 1), quad };
    const tipPx = Math.max(5, Math.round(TIP_PX_1080 * Math.min(width / 1920, height / 1080)));
    this.views = models.map((model) => {
      const axons = new AxonLayer(model);
      const regions = new RegionLayer(model);
      const field = new FieldLayer(model.regions.filter((r): r is SheetRegion => r.shape === 'sheet'));
      axons.setVisible(visibleMask(model, look.hiddenPops, look.hiddenStatuses));
      axons.setSelected(look.selected !== null && look.selected < model.N ? look.selected : null);
      axons.setTipsVisible(look.showTips);
      regions.setHidden(look.hiddenRegions, look.showBox);
      axons.setTipSize(tipPx);
      // every visible axon at every frame, always: a recording never shows a sample. The
      // paths are drawn apart (pathScene), everything else with the rest of the scene.
      axons.useFull();
      if (!redraw) axons.hidePaths();
      axons.refineTips.visible = false;
      const scene = new THREE.Scene();
      scene.add(regions.object, field.object, axons.object);
      const pathScene = new THREE.Scene();
      pathScene.add(axons.refineObject);
      const camera = new THREE.OrthographicCamera(-1, 1, 1, -1, 1, 1e6);
      return { model, axons, regions, field, scene, pathScene, camera, drawn: 0 };
    });
  }

  /** Loads the cue field shown in the viewer (if any) and compiles every program, so the
   *  first recorded frame costs what the others do. */
  async prepare(): Promise<void> {
    for (const v of this.views) {
      const cue = this.look.cue;
      const has = cue !== null && v.model.run.fieldInfos.some((f) => f.cue === cue);
      const grid = has ? await v.model.run.field(cue!).catch(() => null) : null;
      v.field.show(grid, this.look.field);
      this.renderer.compile(v.scene, v.camera);
      this.renderer.compile(v.pathScene, v.camera);
    }
  }

  /** Draws every view at run time `timeH` (hours) from `pose`, and says what each shows. */
  render(timeH: number, pose: CameraPose): ViewFrame[] {
    if (this.redraw) return this.renderAnew(timeH, pose);
    const r = this.renderer;
    const poseKey = JSON.stringify(pose);
    const restart = poseKey !== this.pathsPose;
    this.pathsPose = poseKey;
    r.autoClear = false;
    if (restart) {
      // the gap between views keeps its colour; each view's rect is cleared below
      this.bind(this.paths, { x: 0, y: 0, w: this.width, h: this.height }, false);
      r.setClearColor(GAP_COLOUR, 1);
      r.clear();
    }
    r.setClearColor(BACKGROUND, 1);
    const out: ViewFrame[] = [];
    this.views.forEach((v, i) => {
      const rect = this.rects[i];
      const cam = v.camera;
      placeCamera(cam, pose, rect, v.model.size);
      const frame = frameAt(v.model.times, timeH);
      v.axons.setFrame(frame);
      const total = v.axons.fullSegments();
      if (restart || total < v.drawn) {
        this.bind(this.paths, rect, true);
        r.clear();
        v.drawn = 0;
      }
      if (total > v.drawn) {
        // only the segments grown since the last frame (all of them after a restart)
        v.axons.refineRange(v.drawn, total - v.drawn);
        this.bind(this.paths, rect, true);
        r.render(v.pathScene, cam);
        v.drawn = total;
      }
      out.push({ rect, frame, timeH: v.model.times[frame] ?? 0, pxPerUm: cam.zoom, labels: this.placeLabels(v.regions.labels, cam, rect) });
    });
    // the frame: the paths with their depth, then the rest of each view over them
    r.copyTextureToTexture(this.paths.texture, this.frame.texture);
    r.copyTextureToTexture(this.paths.depthTexture!, this.frame.depthTexture!);
    this.views.forEach((v, i) => {
      this.bind(this.frame, this.rects[i], true);
      r.render(v.scene, v.camera);
    });
    r.setRenderTarget(null);
    r.setScissorTest(false);
    r.setViewport(0, 0, this.width, this.height);
    r.render(this.blit.scene, this.blit.camera);
    r.autoClear = true;
    return out;
  }

  /** One full draw of each view, straight to the canvas. */
  private renderAnew(timeH: number, pose: CameraPose): ViewFrame[] {
    const r = this.renderer;
    r.setRenderTarget(null);
    r.setScissorTest(false);
    r.setViewport(0, 0, this.width, this.height);
    r.setClearColor(GAP_COLOUR, 1);
    r.clear();
    r.setClearColor(BACKGROUND, 1);
    r.setScissorTest(true);
    const out = this.views.map((v, i) => {
      const rect = this.rects[i];
      placeCamera(v.camera, pose, rect, v.model.size);
      const frame = frameAt(v.model.times, timeH);
      v.axons.setFrame(frame);
      const y = this.height - rect.y - rect.h;
      r.setViewport(rect.x, y, rect.w, rect.h);
      r.setScissor(rect.x, y, rect.w, rect.h);
      r.clear();
      r.render(v.scene, v.camera);
      return { rect, frame, timeH: v.model.times[frame] ?? 0, pxPerUm: v.camera.zoom, labels: this.placeLabels(v.regions.labels, v.camera, rect) };
    });
    r.setScissorTest(false);
    return out;
  }

  /** Waits until the GPU has drawn everything queued: reading one pixel back is a true round
   *  trip (gl.finish() does not wait in Chromium), so the drawing can be timed on its own. */
  finish(): void {
    const gl = this.renderer.getContext();
    gl.readPixels(0, 0, 1, 1, gl.RGBA, gl.UNSIGNED_BYTE, this.pixel);
  }

  dispose(): void {
    this.paths.dispose();
    this.frame.dispose();
    this.blit.quad.geometry.dispose();
    (this.blit.quad.material as THREE.Material).dispose();
    for (const v of this.views) {
      v.axons.dispose();
      v.regions.dispose();
      v.field.dispose();
    }
    this.renderer.dispose();
    this.renderer.forceContextLoss();
  }

  /** Makes `rect` (px from the top left) of a target the place drawn into. */
  private bind(target: THREE.WebGLRenderTarget, rect: Rect, scissor: boolean): void {
    // GL measures from the bottom; the rects, like the page, from the top
    const y = this.height - rect.y - rect.h;
    target.viewport.set(rect.x, y, rect.w, rect.h);
    target.scissor.set(rect.x, y, rect.w, rect.h);
    target.scissorTest = scissor;
    this.renderer.setRenderTarget(target);
  }

  private placeLabels(labels: RegionLabel[], cam: THREE.OrthographicCamera, rect: Rect): PlacedLabel[] {
    const out: PlacedLabel[] = [];
    cam.updateMatrixWorld();
    for (const l of labels) {
      if (l.region !== undefined && this.look.hiddenRegions.has(l.region)) continue;
      tmp.copy(l.position).project(cam);
      if (!(tmp.z >= -1 && tmp.z <= 1) || Math.abs(tmp.x) > 1 || Math.abs(tmp.y) > 1) continue;
      out.push({ text: l.text, role: l.role, x: rect.x + ((tmp.x + 1) / 2) * rect.w, y: rect.y + ((1 - tmp.y) / 2) * rect.h });
    }
    return out;
  }
}

/** Output rectangles for n views side by side, with a thin gap between them. */
export function splitWidth(width: number, height: number, n: number): Rect[] {
  if (n <= 1) return [{ x: 0, y: 0, w: width, h: height }];
  const gap = Math.max(2, Math.round(width * GAP));
  const w = Math.floor((width - gap * (n - 1)) / n);
  return Array.from({ length: n }, (_, i) => ({ x: i * (w + gap), y: 0, w: i === n - 1 ? width - i * (w + gap) : w, h: height }));
}

// --- private helpers ---

const GAP_COLOUR = 0x2a323d;
/** Growth-cone disc at 1080 lines, px (the viewer draws 7 px on a smaller canvas). */
const TIP_PX_1080 = 8;
const tmp = new THREE.Vector3();

interface StageView {
  model: RunModel;
  axons: AxonLayer;
  regions: RegionLayer;
  field: FieldLayer;
  /** regions, field, growth cones, selection: drawn anew each frame */
  scene: THREE.Scene;
  /** the axon paths, drawn into the accumulation target a range at a time */
  pathScene: THREE.Scene;
  camera: THREE.OrthographicCamera;
  /** path segments already in the accumulation target */
  drawn: number;
}

/** An RGBA8 target with a depth texture (so depth can be copied from one to another). */
function renderTarget(width: number, height: number): THREE.WebGLRenderTarget {
  return new THREE.WebGLRenderTarget(width, height, {
    depthBuffer: true, depthTexture: new THREE.DepthTexture(width, height), minFilter: THREE.NearestFilter, magFilter: THREE.NearestFilter, generateMipmaps: false,
  });
}

/** An orthographic camera whose frustum is the rect in pixels, so zoom is pixels per µm. */
function placeCamera(cam: THREE.OrthographicCamera, pose: CameraPose, rect: Rect, size: [number, number, number]): void {
  cam.left = -rect.w / 2;
  cam.right = rect.w / 2;
  cam.top = rect.h / 2;
  cam.bottom = -rect.h / 2;
  cam.up.set(...pose.up);
  cam.position.set(...pose.position);
  cam.zoom = pose.zoom;
  cam.near = 1;
  const dist = Math.hypot(pose.position[0] - pose.target[0], pose.position[1] - pose.target[1], pose.position[2] - pose.target[2]);
  cam.far = Math.max(8 * Math.hypot(...size), 2 * dist) + 10;
  cam.lookAt(...pose.target);
  cam.updateProjectionMatrix();
  cam.updateMatrixWorld();
}
