// Recording a replay: every output frame is drawn at its own moment of the run and its own point
// of the camera path, with every visible axon, then composed with the overlays and handed to a
// WebCodecs VideoEncoder; mediabunny puts the encoded frames into an MP4 or WebM file. Nothing
// runs against the clock, so a slow machine gives the same video, later: no frame is dropped.
// Bytes go to a sink (positioned writes, for the command line) or into memory (for a download).
import { Output, Mp4OutputFormat, WebMOutputFormat, BufferTarget, StreamTarget, EncodedVideoPacketSource, EncodedPacket, type Target } from 'mediabunny';
import type { RunModel } from '../model/runModel.ts';
import type { CameraPose } from '../geometry/cameraPresets.ts';
import { cameraPathPose, type CameraPath } from './cameraPath.ts';
import { chooseVideoCodec, type VideoCodecChoice } from './videoCodec.ts';
import { checkStillOptions, checkVideoOptions, frameCount, type PictureOptions, type StillOptions, type VideoOptions } from './recordOptions.ts';
import { cameraFraction, runFraction, timestampUs } from './frameSchedule.ts';
import { RecordStage, type StageLook } from './stage.ts';
import { drawOverlays, variantLabel, type LegendInfo } from './overlay.ts';

/** The runs to record (one, or several side by side) and how they are to look. */
export interface RecordSubject {
  models: RunModel[];
  look: StageLook;
}

/** Where a video's bytes go: writes at byte offsets (the muxer patches headers at the end). */
export interface ByteSink {
  write(position: number, data: Uint8Array): Promise<void>;
}

export interface RecordHooks {
  onProgress?: (done: number, total: number) => void;
  signal?: AbortSignal;
}

export interface RecordStats {
  frames: number;
  width: number;
  height: number;
  fps: number;
  seconds: number;
  container: 'mp4' | 'webm';
  codec: string;
  codecLabel: string;
  bytes: number;
  /** whole recording, ms (set-up, drawing, encoding, muxing) */
  ms: number;
  /** set-up before the first frame (layers, shaders, encoder), ms */
  setupMs: number;
  /** drawing the 3D picture of all frames (until the GPU is done), ms */
  drawMs: number;
  /** composing the overlays and taking each frame from the canvas, ms */
  composeMs: number;
  /** waiting for the encoder and muxer, ms */
  encodeMs: number;
  /** frames encoded per second of the frame loop (drawing included, set-up not) */
  framesPerSecond: number;
}

export type RecordErrorCode = 'codec' | 'webcodecs' | 'options' | 'cancelled' | 'failed';

/** A recording that could not be made; the message is one line. */
export class RecordError extends Error {
  readonly code: RecordErrorCode;
  constructor(code: RecordErrorCode, message: string) {
    super(message);
    this.name = 'RecordError';
    this.code = code;
  }
}

/** Records a video; with no sink the file is returned in memory. */
export async function recordVideo(subject: RecordSubject, opts: VideoOptions, sink: ByteSink | null, hooks: RecordHooks = {}): Promise<{ stats: RecordStats; buffer: ArrayBuffer | null }> {
  const t0 = performance.now();
  try {
    checkVideoOptions(opts);
  } catch (e) {
    throw new RecordError('options', (e as Error).message);
  }
  const n = frameCount(opts.fps, opts.seconds);
  const choice = chooseVideoCodec(opts.container, opts.width, opts.height, opts.fps);
  const config = await supportedConfig(choice, opts);

  const stage = new RecordStage(subject.models, opts.width, opts.height, subject.look, opts.redraw === true);
  const composer = new FrameComposer(subject, opts);
  let bytes = 0;
  const target: Target = sink
    ? new StreamTarget(new WritableStream({
      write: async (c) => {
        await sink.write(c.position, c.data);
        bytes = Math.max(bytes, c.position + c.data.byteLength);
      },
    }), { chunked: true, chunkSize: CHUNK_BYTES })
    : new BufferTarget();
  // MP4 with its index first plays at once in every player; that keeps the file in memory until
  // the end, so very long videos put the index last instead.
  const estimate = (choice.bitrate * opts.seconds) / 8;
  const output = new Output({
    format: opts.container === 'mp4' ? new Mp4OutputFormat({ fastStart: estimate <= IN_MEMORY_BYTES ? 'in-memory' : false }) : new WebMOutputFormat(),
    target,
  });
  const source = new EncodedVideoPacketSource(choice.codec);
  output.addVideoTrack(source, { frameRate: opts.fps });

  let failure: Error | null = null;
  let muxing: Promise<void> = Promise.resolve();
  const encoder = new VideoEncoder({
    output: (chunk, meta) => {
      const packet = EncodedPacket.fromEncodedChunk(chunk);
      muxing = muxing.then(() => source.add(packet, meta)).catch((e: Error) => {
        failure ??= e;
      });
    },
    error: (e) => {
      failure ??= e;
    },
  });
  let drawMs = 0, composeMs = 0, encodeMs = 0, setupMs = 0, loopStart = 0;
  try {
    encoder.configure(config);
    await output.start();
    await stage.prepare();
    setupMs = performance.now() - t0;
    loopStart = performance.now();
    const [tStart, duration] = runSpan(subject.models);
    for (let i = 0; i < n; i++) {
      if (hooks.signal?.aborted) throw new RecordError('cancelled', 'recording cancelled');
      if (failure) throw failure;
      const d0 = performance.now();
      const views = stage.render(tStart + duration * runFraction(i, n), poseAt(opts.camera, cameraFraction(opts.camera, i, n), subject, stage));
      stage.finish();
      const c0 = performance.now();
      drawMs += c0 - d0;
      composer.compose(stage.canvas, views);
      const ts = timestampUs(i, opts.fps);
      const frame = new VideoFrame(composer.canvas, { timestamp: ts, duration: timestampUs(i + 1, opts.fps) - ts });
      composeMs += performance.now() - c0;
      const e0 = performance.now();
      encoder.encode(frame, { keyFrame: i % choice.keyFrameEvery === 0 });
      frame.close();
      while (encoder.encodeQueueSize > MAX_QUEUE && !failure) await once(encoder, 'dequeue');
      await muxing;
      encodeMs += performance.now() - e0;
      hooks.onProgress?.(i + 1, n);
      await yieldToPage();
    }
    const e0 = performance.now();
    await encoder.flush();
    await muxing;
    if (failure) throw failure;
    await output.finalize();
    encodeMs += performance.now() - e0;
  } catch (e) {
    if (encoder.state !== 'closed') encoder.close();
    await output.cancel().catch(() => {});
    stage.dispose();
    if (e instanceof RecordError) throw e;
    throw new RecordError('failed', `recording failed: ${(e as Error).message ?? e}`);
  }
  if (encoder.state !== 'closed') encoder.close();
  stage.dispose();
  const buffer = target instanceof BufferTarget ? target.buffer : null;
  const loopMs = performance.now() - loopStart;
  const stats: RecordStats = {
    frames: n, width: opts.width, height: opts.height, fps: opts.fps, seconds: opts.seconds, container: opts.container,
    codec: choice.codecString, codecLabel: choice.label, bytes: buffer ? buffer.byteLength : bytes,
    ms: performance.now() - t0, setupMs, drawMs, composeMs, encodeMs, framesPerSecond: n / (loopMs / 1000),
  };
  return { stats, buffer };
}

/** Draws one still (a PNG) at fraction `at` of the run, the camera at the same point of its path. */
export async function recordStill(subject: RecordSubject, opts: StillOptions): Promise<Blob> {
  try {
    checkStillOptions(opts);
  } catch (e) {
    throw new RecordError('options', (e as Error).message);
  }
  const stage = new RecordStage(subject.models, opts.width, opts.height, subject.look);
  try {
    await stage.prepare();
    const composer = new FrameComposer(subject, opts);
    const [tStart, duration] = runSpan(subject.models);
    const views = stage.render(tStart + duration * opts.at, poseAt(opts.camera, opts.at, subject, stage));
    composer.compose(stage.canvas, views);
    return await new Promise<Blob>((resolve, reject) => composer.canvas.toBlob((b) => (b ? resolve(b) : reject(new RecordError('failed', 'the browser could not write a PNG'))), 'image/png'));
  } finally {
    stage.dispose();
  }
}

/** The time span every recording covers: from the first run's start over the longest run. */
export function runSpan(models: RunModel[]): [number, number] {
  return [models[0]?.times[0] ?? 0, Math.max(0, ...models.map((m) => m.durationH))];
}

// --- private helpers ---

const DIVIDER = '#4a5563';
/** Frames waiting in the encoder before drawing the next one waits. */
const MAX_QUEUE = 4;
/** Size of the writes handed to a sink. */
const CHUNK_BYTES = 4 << 20;
/** Largest MP4 kept in memory to put its index first. */
const IN_MEMORY_BYTES = 256 << 20;

/** The encoder configuration, once the browser has said it can encode it. */
async function supportedConfig(choice: VideoCodecChoice, opts: VideoOptions): Promise<VideoEncoderConfig> {
  if (typeof VideoEncoder === 'undefined') {
    throw new RecordError('webcodecs', 'this browser has no WebCodecs video encoder (VideoEncoder); use a recent Chromium, Chrome or Edge, with the viewer served from 127.0.0.1 or https');
  }
  const config: VideoEncoderConfig = {
    codec: choice.codecString, width: opts.width, height: opts.height, bitrate: choice.bitrate, framerate: opts.fps,
    latencyMode: 'quality', ...(choice.codec === 'avc' ? { avc: { format: 'avc' as const } } : {}),
  };
  const support = await VideoEncoder.isConfigSupported(config).catch(() => ({ supported: false }));
  if (!support.supported) {
    throw new RecordError('codec', `this browser cannot encode ${choice.label} (${choice.codecString}) at ${opts.width}×${opts.height}; ${choice.alternative}`);
  }
  return config;
}

/** The camera at progress s, for the views' rectangle (all views share one camera). */
function poseAt(path: CameraPath, s: number, subject: RecordSubject, stage: RecordStage): CameraPose {
  const r = stage.rects[0];
  return cameraPathPose(path, s, subject.models[0].size, { width: r.w, height: r.h });
}

/** The frame as encoded: the 3D picture with the overlays over it, on an opaque 2D canvas. */
class FrameComposer {
  readonly canvas: HTMLCanvasElement;
  private readonly ctx: CanvasRenderingContext2D;
  private readonly opts: PictureOptions;
  private readonly variants: string[];
  private readonly legend: LegendInfo | null;
  private readonly show: ReadonlySet<PictureOptions['overlays'][number]>;

  constructor(subject: RecordSubject, opts: PictureOptions) {
    this.opts = opts;
    this.canvas = document.createElement('canvas');
    this.canvas.width = opts.width;
    this.canvas.height = opts.height;
    this.ctx = this.canvas.getContext('2d', { alpha: false })!;
    this.variants = subject.models.map((m) => variantLabel(m.manifest));
    const sheet = subject.models[0].sourceSheet;
    this.legend = sheet ? { sheet: sheet.name, uName: sheet.uName, vName: sheet.vName } : null;
    this.show = new Set(opts.overlays);
  }

  compose(picture: HTMLCanvasElement, views: ReturnType<RecordStage['render']>): void {
    this.ctx.drawImage(picture, 0, 0);
    // a visible divider between side-by-side views (drawn here, in sRGB as given)
    this.ctx.fillStyle = DIVIDER;
    for (let i = 1; i < views.length; i++) {
      const a = views[i - 1].rect, b = views[i].rect;
      this.ctx.fillRect(a.x + a.w, 0, b.x - a.x - a.w, this.opts.height);
    }
    drawOverlays(this.ctx, {
      width: this.opts.width, height: this.opts.height, show: this.show, title: this.opts.title,
      views: views.map((frame, i) => ({ frame, variant: this.variants[i] })), legend: this.legend,
    });
  }
}

function once(target: EventTarget, type: string): Promise<void> {
  return new Promise((resolve) => target.addEventListener(type, () => resolve(), { once: true }));
}

/** Lets the page handle input and paint between frames. A message, not a timer: timers of a
 *  page in a background tab are slowed to one a second. */
function yieldToPage(): Promise<void> {
  return new Promise((resolve) => {
    const ch = new MessageChannel();
    ch.port1.onmessage = () => resolve();
    ch.port2.postMessage(0);
  });
}
