// Named camera poses for an orthographic view of the volume [0, size]. Orthographic because a
// scale bar is then true everywhere in the picture, not only at one depth: one µm is the same
// number of pixels near and far. Zoom is pixels per µm (the convention of an orthographic camera
// whose frustum is the canvas in pixels).

export const CAMERA_PRESETS = ['oblique', 'top', 'side', 'end-on'] as const;
export type CameraPreset = (typeof CAMERA_PRESETS)[number];

import { normalize, cross, dot, type V3 } from './vec3.ts';

export interface CameraPose {
  position: V3;
  target: V3;
  /** the camera's up vector (world +z) */
  up: V3;
  zoom: number;
}

/** Direction from the volume's centre toward the camera. The camera's up is always +z (orbit
 *  controls turn about it), so the top view is tilted a hair off vertical to keep +y up on screen. */
const PRESET_DIRECTIONS: Record<CameraPreset, V3> = {
  oblique: [0.5, -0.78, 0.42],
  top: [0, -0.02, 1],
  side: [0, -1, 0],
  'end-on': [-1, 0, 0],
};
const WORLD_UP: V3 = [0, 0, 1];

export function isCameraPreset(name: string | null | undefined): name is CameraPreset {
  return !!name && (CAMERA_PRESETS as readonly string[]).includes(name);
}

/** The pose that shows the whole volume from the preset's direction, filling `fill` of the
 *  viewport's width or height, whichever is tighter. */
export function presetPose(name: CameraPreset, size: V3, viewport: { width: number; height: number }, fill = 0.86): CameraPose {
  const d = normalize(PRESET_DIRECTIONS[name]);
  const right = normalize(cross(WORLD_UP, d));
  const trueUp = cross(d, right);
  const target: V3 = [size[0] / 2, size[1] / 2, size[2] / 2];
  let w = 0, h = 0;
  for (let c = 0; c < 8; c++) {
    const p: V3 = [(c & 1 ? size[0] : 0) - target[0], (c & 2 ? size[1] : 0) - target[1], (c & 4 ? size[2] : 0) - target[2]];
    w = Math.max(w, 2 * Math.abs(dot(p, right)));
    h = Math.max(h, 2 * Math.abs(dot(p, trueUp)));
  }
  const zoom = fill * Math.min(viewport.width / Math.max(w, 1e-9), viewport.height / Math.max(h, 1e-9));
  const dist = 2 * Math.hypot(size[0], size[1], size[2]);
  return { position: [target[0] + d[0] * dist, target[1] + d[1] * dist, target[2] + d[2] * dist], target, up: WORLD_UP, zoom };
}

