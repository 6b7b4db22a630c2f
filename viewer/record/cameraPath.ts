// Camera paths for recordings: where the orthographic camera is at each moment of a video, as a
// function of the video's progress s ∈ [0, 1]. Three kinds:
//   still  one preset (or the viewer's current camera) for the whole video;
//   orbit  turns about the vertical (+z) axis through the volume's centre, starting at a preset;
//          the zoom is held at the tightest fit of the whole turn, so the volume never leaves the
//          frame and the scale bar stays put;
//   fly    from one preset to another, easing in and out, the direction turned along the great
//          circle between them and the zoom changed geometrically (equal steps look equal).
// Written as text for the command line: "oblique", "orbit", "orbit:top", "fly:top:side".
import { CAMERA_PRESETS, isCameraPreset, presetPose, type CameraPose, type CameraPreset } from '../geometry/cameraPresets.ts';

import { normalize, cross, dot, type V3 } from '../geometry/vec3.ts';

export type CameraPath =
  | { kind: 'still'; preset: CameraPreset }
  /** a given pose (the viewer's current camera), zoom already in output pixels per µm */
  | { kind: 'pose'; pose: CameraPose }
  | { kind: 'orbit'; preset: CameraPreset; turns: number }
  | { kind: 'fly'; from: CameraPreset; to: CameraPreset };

export const CAMERA_PATH_HELP = `PRESET (${CAMERA_PRESETS.join(', ')}), orbit, orbit:PRESET or fly:PRESET:PRESET`;

/** Fraction of the viewport the volume fills, as in the viewer's presets. */
const FILL = 0.86;
/** Directions sampled to find an orbit's tightest fit (one per degree). */
const ORBIT_SAMPLES = 360;

/** Parses the command line's spelling; throws an Error with a one-line message. */
export function parseCameraPath(text: string): CameraPath {
  const parts = text.trim().split(':');
  const preset = (name: string | undefined): CameraPreset => {
    if (isCameraPreset(name)) return name;
    throw new Error(`--camera: unknown preset "${name ?? ''}" in "${text}" (use ${CAMERA_PATH_HELP})`);
  };
  if (parts.length === 1 && parts[0] === 'orbit') return { kind: 'orbit', preset: 'oblique', turns: 1 };
  if (parts.length === 1) return { kind: 'still', preset: preset(parts[0]) };
  if (parts[0] === 'orbit' && parts.length === 2) return { kind: 'orbit', preset: preset(parts[1]), turns: 1 };
  if (parts[0] === 'fly' && parts.length === 3) {
    const from = preset(parts[1]), to = preset(parts[2]);
    if (from === to) throw new Error(`--camera: a fly needs two different presets (got "${text}"; for one view use "${from}")`);
    return { kind: 'fly', from, to };
  }
  throw new Error(`--camera: cannot read "${text}" (use ${CAMERA_PATH_HELP})`);
}

/** The path in the command line's spelling (a pose has none: "current view"). */
export function formatCameraPath(p: CameraPath): string {
  switch (p.kind) {
    case 'still': return p.preset;
    case 'pose': return 'current view';
    case 'orbit': return p.preset === 'oblique' ? 'orbit' : `orbit:${p.preset}`;
    case 'fly': return `fly:${p.from}:${p.to}`;
  }
}

/** Where a path's camera is at progress s ∈ [0, 1] of the video, for a volume [0, size] seen
 *  in a viewport of the given size (output pixels). */
export function cameraPathPose(path: CameraPath, s: number, size: V3, viewport: { width: number; height: number }): CameraPose {
  switch (path.kind) {
    case 'still':
      return presetPose(path.preset, size, viewport, FILL);
    case 'pose':
      return path.pose;
    case 'orbit': {
      const base = presetPose(path.preset, size, viewport, FILL);
      const d0 = directionOf(base);
      const dist = distanceOf(base);
      const angle = 2 * Math.PI * path.turns * s;
      const d = turnAboutZ(d0, angle);
      return poseAlong(base.target, d, dist, orbitZoom(d0, size, viewport));
    }
    case 'fly': {
      const a = presetPose(path.from, size, viewport, FILL), b = presetPose(path.to, size, viewport, FILL);
      // ease in and out: u = (1 − cos πs)/2 starts and stops with zero speed
      const u = (1 - Math.cos(Math.PI * clamp01(s))) / 2;
      const d = slerp(directionOf(a), directionOf(b), u);
      const dist = distanceOf(a) + (distanceOf(b) - distanceOf(a)) * u;
      const zoom = a.zoom * (b.zoom / a.zoom) ** u;
      return poseAlong(a.target, d, dist, zoom);
    }
  }
}

/** The zoom (pixels per µm) at which the volume [0, size], seen along `dir` (from the centre
 *  toward the camera) with +z up on screen, fills `fill` of the viewport's tighter side; the
 *  same rule as the viewer's presets, for any direction. */
export function fitZoom(dir: V3, size: V3, viewport: { width: number; height: number }, fill = FILL): number {
  const d = normalize(dir);
  const right = normalize(cross([0, 0, 1], d));
  const up = cross(d, right);
  let w = 0, h = 0;
  for (let c = 0; c < 8; c++) {
    const p: V3 = [((c & 1 ? 1 : 0) - 0.5) * size[0], ((c & 2 ? 1 : 0) - 0.5) * size[1], ((c & 4 ? 1 : 0) - 0.5) * size[2]];
    w = Math.max(w, 2 * Math.abs(dot(p, right)));
    h = Math.max(h, 2 * Math.abs(dot(p, up)));
  }
  return fill * Math.min(viewport.width / Math.max(w, 1e-9), viewport.height / Math.max(h, 1e-9));
}

/** The smallest fit zoom over a whole turn about z starting at d0. */
export function orbitZoom(d0: V3, size: V3, viewport: { width: number; height: number }): number {
  let z = Infinity;
  for (let k = 0; k < ORBIT_SAMPLES; k++) z = Math.min(z, fitZoom(turnAboutZ(d0, (2 * Math.PI * k) / ORBIT_SAMPLES), size, viewport));
  return z;
}

// --- private helpers ---

function poseAlong(target: V3, d: V3, dist: number, zoom: number): CameraPose {
  return { position: [target[0] + d[0] * dist, target[1] + d[1] * dist, target[2] + d[2] * dist], target: [...target], up: [0, 0, 1], zoom };
}

function directionOf(p: CameraPose): V3 {
  return normalize([p.position[0] - p.target[0], p.position[1] - p.target[1], p.position[2] - p.target[2]]);
}

function distanceOf(p: CameraPose): number {
  return Math.hypot(p.position[0] - p.target[0], p.position[1] - p.target[1], p.position[2] - p.target[2]);
}

/** Rotation by `angle` about +z (right-handed). */
function turnAboutZ(d: V3, angle: number): V3 {
  const c = Math.cos(angle), s = Math.sin(angle);
  return [d[0] * c - d[1] * s, d[0] * s + d[1] * c, d[2]];
}

/** Spherical linear interpolation of unit vectors: sin((1−u)ω)/sin ω · a + sin(uω)/sin ω · b. */
function slerp(a: V3, b: V3, u: number): V3 {
  const cos = Math.max(-1, Math.min(1, dot(a, b)));
  const omega = Math.acos(cos);
  if (omega < 1e-6) return a;
  if (Math.PI - omega < 1e-6) return turnAboutZ(a, Math.PI * u); // opposite: go round the vertical
  const sa = Math.sin((1 - u) * omega) / Math.sin(omega), sb = Math.sin(u * omega) / Math.sin(omega);
  return normalize([a[0] * sa + b[0] * sb, a[1] * sa + b[1] * sb, a[2] * sa + b[2] * sb]);
}

function clamp01(x: number): number {
  return x < 0 ? 0 : x > 1 ? 1 : x;
}
