// What a recording is asked to be, checked in one place for the command line (before any browser
// starts) and for the viewer's record dialog, so both refuse the same things with the same
// words. Pure: no DOM, no Node.
import type { CameraPath } from './cameraPath.ts';
import { chooseVideoCodec, type Container } from './videoCodec.ts';

/** What can be burnt into the picture. */
export const OVERLAYS = ['title', 'time', 'scale', 'legend', 'variant', 'labels'] as const;
export type OverlayName = (typeof OVERLAYS)[number];

export const OVERLAY_HELP: Record<OverlayName, string> = {
  title: 'title',
  time: 'time stamp (h)',
  scale: 'scale bar (µm)',
  legend: 'colour legend',
  variant: "variant's name",
  labels: 'region labels',
};

export const SIZE_MIN = 16;
export const SIZE_MAX = 7680;
export const FPS_MAX = 120;
export const SECONDS_MAX = 3600;

/** Everything about the picture, shared by videos and stills. */
export interface PictureOptions {
  width: number;
  height: number;
  camera: CameraPath;
  overlays: OverlayName[];
  title: string;
}

export interface VideoOptions extends PictureOptions {
  container: Container;
  fps: number;
  seconds: number;
  /** draw every frame anew instead of adding each frame's new path segments to the last
   *  (stage.ts); the same picture, slower: for checking and benchmarks */
  redraw?: boolean;
}

export interface StillOptions extends PictureOptions {
  /** time as a fraction of the run's duration, [0, 1] */
  at: number;
}

/** A mistake in the options; its message is one line, fit to print as it is. */
export class RecordOptionError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'RecordOptionError';
  }
}

/** "1920x1080" → { width: 1920, height: 1080 }, within SIZE_MIN…SIZE_MAX; `even` (video)
 *  also asks for even sides, since 4:2:0 video stores colour per 2 × 2 block. */
export function parseSize(text: string, even: boolean): { width: number; height: number } {
  const m = /^\s*(\d+)\s*[x×]\s*(\d+)\s*$/i.exec(text);
  if (!m) throw new RecordOptionError(`--size must be WIDTHxHEIGHT in pixels, e.g. 1920x1080 (got "${text}")`);
  const width = Number(m[1]), height = Number(m[2]);
  checkSize(width, height, even);
  return { width, height };
}

export function checkSize(width: number, height: number, even: boolean): void {
  for (const [v, what] of [[width, 'width'], [height, 'height']] as const) {
    if (!Number.isInteger(v) || v < SIZE_MIN || v > SIZE_MAX) {
      throw new RecordOptionError(`--size: the ${what} must be from ${SIZE_MIN} to ${SIZE_MAX} pixels (got ${width}x${height})`);
    }
    if (even && v % 2 !== 0) throw new RecordOptionError(`--size: video needs an even ${what} (got ${width}x${height}; try ${width + (width % 2)}x${height + (height % 2)})`);
  }
}

export function checkFps(fps: number): void {
  if (!Number.isInteger(fps) || fps < 1 || fps > FPS_MAX) throw new RecordOptionError(`--fps must be a whole number from 1 to ${FPS_MAX} (got ${fps})`);
}

export function checkSeconds(seconds: number): void {
  if (!Number.isFinite(seconds) || seconds <= 0 || seconds > SECONDS_MAX) {
    throw new RecordOptionError(`--seconds must be more than 0 and at most ${SECONDS_MAX} (got ${seconds})`);
  }
}

/** The number of frames a video holds: fps × seconds, which must be a whole number (the run's
 *  duration is spread over exactly these frames). */
export function frameCount(fps: number, seconds: number): number {
  checkFps(fps);
  checkSeconds(seconds);
  const n = fps * seconds;
  const r = Math.round(n);
  if (Math.abs(n - r) > 1e-6 * Math.max(1, n) || r < 1) {
    throw new RecordOptionError(`--fps × --seconds must be a whole number of frames (got ${fps} × ${seconds} = ${n}; try --seconds ${(Math.max(1, r) / fps).toString()})`);
  }
  return r;
}

export function checkFraction(at: number): void {
  if (!Number.isFinite(at) || at < 0 || at > 1) throw new RecordOptionError(`--frame must be a time fraction from 0 to 1 (got ${at})`);
}

/** Checks a whole video request; throws RecordOptionError with the first problem. */
export function checkVideoOptions(o: VideoOptions): void {
  checkSize(o.width, o.height, true);
  frameCount(o.fps, o.seconds);
  try {
    chooseVideoCodec(o.container, o.width, o.height, o.fps);
  } catch (e) {
    throw new RecordOptionError((e as Error).message);
  }
  checkOverlays(o.overlays);
}

export function checkStillOptions(o: StillOptions): void {
  checkSize(o.width, o.height, false);
  checkFraction(o.at);
  checkOverlays(o.overlays);
}

/** "title,time" → ['title', 'time']; "all" and "none" as they say. */
export function parseOverlays(text: string): OverlayName[] {
  const t = text.trim();
  if (t === 'all') return [...OVERLAYS];
  if (t === 'none' || t === '') return [];
  const names = t.split(',').map((s) => s.trim());
  checkOverlays(names);
  return [...new Set(names)] as OverlayName[];
}

/** The container a file name asks for, 'png' for a still, or null. */
export function outputKind(path: string): Container | 'png' | null {
  const m = /\.([a-z0-9]+)$/i.exec(path);
  const ext = m?.[1].toLowerCase();
  return ext === 'mp4' ? 'mp4' : ext === 'webm' ? 'webm' : ext === 'png' ? 'png' : null;
}

function checkOverlays(names: readonly string[]): void {
  for (const n of names) {
    if (!(OVERLAYS as readonly string[]).includes(n)) {
      throw new RecordOptionError(`--overlays: unknown overlay "${n}" (choose from ${OVERLAYS.join(', ')}, or all, or none)`);
    }
  }
}
