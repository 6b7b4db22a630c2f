// What the person has chosen to see: one store shared by every panel and both 3D views (so two
// runs side by side share one timeline, one camera and one set of filters).
import { createStore } from './store.ts';
import type { CameraPreset } from '../geometry/cameraPresets.ts';
import type { SliceAxis } from '../geometry/fieldSlice.ts';

export interface ViewState {
  /** shown time, hours since the run started */
  timeH: number;
  playing: boolean;
  /** playback rate as a multiple of the base rate (whole run in PLAY_SECONDS) */
  speed: number;
  hiddenPops: ReadonlySet<string>;
  hiddenStatuses: ReadonlySet<string>;
  hiddenRegions: ReadonlySet<string>;
  showTips: boolean;
  showBox: boolean;
  selected: number | null;
  cue: string | null;
  sliceAxis: SliceAxis;
  /** slice position as a fraction of the volume along sliceAxis */
  sliceFrac: number;
  logScale: boolean;
  showSlice: boolean;
  showIso: boolean;
  /** isosurface level as a fraction of the field's colour scale */
  isoFrac: number;
  camera: CameraPreset;
  /** bumped to re-apply the camera preset (pressing its button again resets the view) */
  cameraRevision: number;
  /** performance.now() of the last scrub, step or camera move: drawing stays coarse until still */
  lastMotion: number;
  showVectors: boolean;
  showExpected: boolean;
}

/** Seconds the whole run takes to play at speed 1. */
export const PLAY_SECONDS = 12;
export const SPEEDS = [0.25, 0.5, 1, 2, 4] as const;

export function createViewState(initial: Partial<ViewState> = {}) {
  return createStore<ViewState>({
    timeH: 0,
    playing: false,
    speed: 1,
    hiddenPops: new Set(),
    hiddenStatuses: new Set(),
    hiddenRegions: new Set(),
    showTips: true,
    showBox: true,
    selected: null,
    cue: null,
    sliceAxis: 'z',
    sliceFrac: 0.5,
    logScale: true,
    showSlice: true,
    showIso: false,
    isoFrac: 0.5,
    camera: 'oblique',
    cameraRevision: 0,
    lastMotion: 0,
    showVectors: true,
    showExpected: false,
    ...initial,
  });
}

export type ViewStore = ReturnType<typeof createViewState>;

/** Returns a copy of `set` with `key` toggled. */
export function toggled(set: ReadonlySet<string>, key: string): Set<string> {
  const out = new Set(set);
  if (out.has(key)) out.delete(key);
  else out.add(key);
  return out;
}
