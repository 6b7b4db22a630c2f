// Shareable views: the URL's query carries the run, the time (as a fraction of the run's
// duration), the camera preset, a second run to compare, the selected axon and the cue shown.
import { isCameraPreset, type CameraPreset } from '../geometry/cameraPresets.ts';

export interface UrlView {
  run: string | null;
  compare: string | null;
  /** fraction of the run's duration, [0, 1] */
  t: number | null;
  cam: CameraPreset | null;
  axon: number | null;
  cue: string | null;
}

export function parseUrlView(search: string): UrlView {
  const q = new URLSearchParams(search);
  const num = (k: string) => {
    const s = q.get(k);
    if (s === null || s.trim() === '') return null;
    const x = Number(s);
    return Number.isFinite(x) ? x : null;
  };
  const t = num('t');
  const axon = num('axon');
  const cam = q.get('cam');
  return {
    run: q.get('run') || null,
    compare: q.get('compare') || null,
    t: t === null ? null : Math.min(1, Math.max(0, t)),
    cam: isCameraPreset(cam) ? cam : null,
    axon: axon !== null && Number.isInteger(axon) && axon >= 0 ? axon : null,
    cue: q.get('cue') || null,
  };
}

export function formatUrlView(v: UrlView): string {
  const q = new URLSearchParams();
  if (v.run) q.set('run', v.run);
  if (v.compare) q.set('compare', v.compare);
  if (v.t !== null) q.set('t', String(Number(v.t.toFixed(4))));
  if (v.cam) q.set('cam', v.cam);
  if (v.axon !== null) q.set('axon', String(v.axon));
  if (v.cue) q.set('cue', v.cue);
  const s = q.toString();
  return s ? `?${s}` : '';
}
