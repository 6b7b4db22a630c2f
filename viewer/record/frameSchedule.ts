// Which moment of the run, and which point of the camera path, each output frame shows. The
// run's whole duration is spread over the video's frames: the first frame shows the start, the
// last shows the end, evenly between. A fly ends on its second preset; an orbit turns at a
// constant rate and its last frame stops one step short of the start, so the video loops.
import type { CameraPath } from './cameraPath.ts';

/** Progress through the run, [0, 1], of frame i of n. */
export function runFraction(i: number, n: number): number {
  return n <= 1 ? 1 : i / (n - 1);
}

/** Progress along the camera path, [0, 1], of frame i of n. */
export function cameraFraction(path: CameraPath, i: number, n: number): number {
  if (path.kind === 'orbit') return n <= 0 ? 0 : i / n;
  return runFraction(i, n);
}

/** Presentation time of frame i, µs: whole microseconds, so durations add up to the whole
 *  video exactly (frame i lasts timestampUs(i + 1) − timestampUs(i)). */
export function timestampUs(i: number, fps: number): number {
  return Math.round((i * 1e6) / fps);
}
