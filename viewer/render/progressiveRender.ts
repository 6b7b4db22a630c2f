// Decides, frame by frame, how much of the picture to draw so the view stays responsive in
// software WebGL, where drawing every path of a large run takes seconds.
//
//   moving  (timeline playing or scrubbed, camera turning): a representative sample of axons,
//           as many as fit a frame budget learnt from measured frame times;
//   still   every visible axon. If that fits one frame it is drawn at once; otherwise the sample
//           is drawn first and the remaining paths are added over the next frames in chunks
//           that each fit the budget, so input is never blocked for long. Any change starts
//           over.
//
// Frame time is measured around the draw up to a one-pixel read-back, which waits until the GPU
// process has executed the commands, so it is the real cost of the frame, not the time to queue
// it.
import type * as THREE from 'three';
import type { AxonLayer } from '../geometry/axonLayer.ts';
import { FrameBudget, RateEstimate } from './frameBudget.ts';

/** Target drawing time per frame while moving, ms. */
export const MOVING_FRAME_MS = 50;
/** Largest single still frame before refinement is used instead, ms. */
export const STILL_FRAME_MS = 250;
/** Target drawing time per refinement chunk, ms. */
export const CHUNK_MS = 120;

export interface DrawReport {
  /** "sample" while moving, "refining" while completing, "all" when every visible axon is drawn */
  mode: 'sample' | 'refining' | 'all';
  axonsDrawn: number;
  axonsVisible: number;
  /** 0..1, share of the full picture's segments drawn */
  progress: number;
  /** the last frame's measured drawing time, ms */
  frameMs: number;
  /** time from the previous frame to this one, ms (0 if there was a pause between them) */
  intervalMs: number;
  /** recent frame times, ms (newest last) */
  history: number[];
  segments: number;
}

export class ProgressiveRenderer {
  /** segments per moving frame (steered by measured frame times) */
  readonly movingBudget = new FrameBudget(60_000, MOVING_FRAME_MS, 3_000, 20_000_000);
  /** segments per refinement pass */
  readonly chunkBudget = new FrameBudget(150_000, CHUNK_MS, 30_000, 20_000_000);
  /** ms per segment, learnt from refinement passes (which draw paths only); starting guess
   *  from a SwiftShader measurement */
  readonly perSegmentMs = new RateEstimate(6e-4);
  /** ms of a whole-scene frame that is not paths (regions, growth cones, overlays) */
  readonly sceneMs = new RateEstimate(15);
  private pending: 'moving' | 'still' | null = 'moving';
  private refining = false;
  private cursor = 0;
  private total = 0;
  private readonly history: number[] = [];
  private readonly renderer: THREE.WebGLRenderer;
  private readonly scene: THREE.Scene;
  private readonly refineScene: THREE.Scene;
  private readonly layer: AxonLayer;
  private readonly onReport: (r: DrawReport) => void;
  private sampleAxons = 0;
  private readonly pixel = new Uint8Array(4);
  private drawnOnce = false;
  private lastFrameAt = 0;
  /** time since the previous drawn frame, ms (0 after a pause): what the viewer feels */
  intervalMs = 0;
  /** time spent choosing and building the sample for the last moving frame, ms */
  lastPrepareMs = 0;

  constructor(renderer: THREE.WebGLRenderer, scene: THREE.Scene, refineScene: THREE.Scene, layer: AxonLayer, onReport: (r: DrawReport) => void) {
    this.renderer = renderer;
    this.scene = scene;
    this.refineScene = refineScene;
    this.layer = layer;
    this.onReport = onReport;
  }

  /** Something changed while in motion: redraw coarse. */
  moving(): void {
    this.pending = 'moving';
    this.refining = false;
  }

  /** Something changed, or motion ended: redraw the full picture (progressively if needed).
   *  Before the first frame this waits: the first frame is always a quick sample, so the run
   *  appears as soon as possible, and the full picture follows. */
  still(): void {
    if (!this.drawnOnce) return;
    this.pending = 'still';
    this.refining = false;
  }

  /** Whether more frames are needed to finish the picture. */
  get busy(): boolean {
    return this.pending !== null || this.refining;
  }

  /** Draws one frame's worth; call once per animation frame while `busy`. */
  step(camera: THREE.Camera): void {
    const layer = this.layer;
    const visible = layer.visibleCount;
    if (this.pending === 'moving') {
      this.pending = null;
      const t0 = performance.now();
      const choice = layer.useSample(this.movingBudget.value);
      this.lastPrepareMs = performance.now() - t0;
      this.sampleAxons = choice.axons;
      const first = !this.drawnOnce;
      const ms = this.draw(this.scene, camera, true);
      // the first frame also pays one-off costs (first use of buffers and pipelines): not a sample
      if (!first) this.learnScene(choice.segments, ms, this.movingBudget);
      this.report(choice.axons === visible ? 'all' : 'sample', choice.axons, choice.axons === visible ? 1 : 0, ms, choice.segments);
      return;
    }
    if (this.pending === 'still') {
      this.pending = null;
      const total = layer.fullSegments();
      if (this.sceneMs.value + this.perSegmentMs.value * total <= STILL_FRAME_MS || total === 0) {
        layer.useFull();
        const ms = this.draw(this.scene, camera, true);
        this.learnScene(total, ms, null);
        this.report('all', visible, 1, ms, total);
        return;
      }
      const choice = layer.useSample(this.movingBudget.value);
      this.sampleAxons = choice.axons;
      const ms = this.draw(this.scene, camera, true);
      this.learnScene(choice.segments, ms, null);
      this.refining = true;
      this.cursor = 0;
      this.total = total;
      this.report('refining', choice.axons, 0, ms, choice.segments);
      return;
    }
    if (this.refining) {
      const chunk = Math.round(this.chunkBudget.value);
      const n = layer.refineRange(this.cursor, chunk);
      const last = this.cursor + chunk >= this.total;
      // the last pass also draws every growth cone (the base frame drew the sample's only)
      if (last) layer.prepareRefineTips();
      layer.refineTips.visible = last;
      const ms = this.draw(this.refineScene, camera, false);
      this.chunkBudget.update(n, ms);
      if (n > 10_000 && !last) this.perSegmentMs.add(ms / n);
      this.cursor += chunk;
      const done = this.cursor >= this.total;
      if (done) this.refining = false;
      this.report(done ? 'all' : 'refining', done ? visible : this.sampleAxons, Math.min(1, this.cursor / this.total), ms, n);
    }
  }

  /** Learns from a whole-scene frame: what it cost beyond its paths, and (while moving) the
   *  budget for the next one. */
  private learnScene(segments: number, ms: number, budget: FrameBudget | null): void {
    this.sceneMs.add(Math.max(1, ms - this.perSegmentMs.value * segments));
    budget?.update(segments, ms);
  }

  private draw(scene: THREE.Scene, camera: THREE.Camera, clear: boolean): number {
    this.drawnOnce = true;
    const r = this.renderer;
    const gl = r.getContext();
    // Reading one pixel back is a true round trip: it returns only after the GPU process has
    // executed everything queued before it (gl.finish() does not wait in Chromium). One read
    // before drawing lets earlier work (the page's compositing) finish, one after times the draw
    // alone.
    gl.readPixels(0, 0, 1, 1, gl.RGBA, gl.UNSIGNED_BYTE, this.pixel);
    const t0 = performance.now();
    r.autoClear = clear;
    r.render(scene, camera);
    r.autoClear = true;
    gl.readPixels(0, 0, 1, 1, gl.RGBA, gl.UNSIGNED_BYTE, this.pixel);
    const now = performance.now();
    this.intervalMs = this.lastFrameAt > 0 && now - this.lastFrameAt < 2000 ? now - this.lastFrameAt : 0;
    this.lastFrameAt = now;
    return now - t0;
  }

  private report(mode: DrawReport['mode'], drawn: number, progress: number, ms: number, segments: number): void {
    this.history.push(ms);
    if (this.history.length > 120) this.history.shift();
    this.onReport({ mode, axonsDrawn: drawn, axonsVisible: this.layer.visibleCount, progress, frameMs: ms, intervalMs: this.intervalMs, history: this.history.slice(), segments });
  }
}
