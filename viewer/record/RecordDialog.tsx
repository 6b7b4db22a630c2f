// The record control: a button in the viewer's header and a small dialog to choose a video's
// size, frame rate, length, camera path, overlays and format, then record it frame by frame
// and offer the file for download. The same button also saves a still (PNG) of the moment
// shown. Mounting it also offers the recorder to scripts (pageApi.ts), for `axonloom record`.
import { useEffect, useMemo, useRef, useState, type ReactNode } from 'react';
import type { RunModel } from '../model/runModel.ts';
import type { ViewStore } from '../state/viewState.ts';
import type { CameraLink } from '../render/cameraLink.ts';
import { CAMERA_PRESETS, type CameraPreset } from '../geometry/cameraPresets.ts';
import type { CameraPath } from './cameraPath.ts';
import { OVERLAYS, OVERLAY_HELP, parseSize, checkVideoOptions, checkStillOptions, frameCount, type OverlayName, type VideoOptions } from './recordOptions.ts';
import { recordVideo, recordStill, runSpan, RecordError, type RecordStats } from './recorder.ts';
import { installRecorderApi } from './pageApi.ts';
import { lookOf, splitWidth } from './stage.ts';
import './record.css';

export interface RecordButtonProps {
  models: RunModel[];
  store: ViewStore;
  link: CameraLink;
}

export function RecordButton(p: RecordButtonProps) {
  const [open, setOpen] = useState(false);
  useEffect(() => installRecorderApi(() => ({ models: p.models, look: lookOf(p.store.get()) })), [p.models, p.store]);
  return (
    <>
      <button className="seg record-open" data-testid="record-open" onClick={() => setOpen(true)} title="record a video or a still of the replay">
        <span className="record-dot" aria-hidden="true" /> Record…
      </button>
      {open && <RecordDialog {...p} onClose={() => setOpen(false)} />}
    </>
  );
}

const SIZES = ['1280x720', '1920x1080', '2560x1440', '3840x2160'];
const FPS_CHOICES = [24, 25, 30, 50, 60];
type PathKind = 'still' | 'orbit' | 'fly';

interface Done {
  url: string;
  name: string;
  stats: RecordStats | null;
  bytes: number;
}

function RecordDialog({ models, store, link, onClose }: RecordButtonProps & { onClose: () => void }) {
  const primary = models[0];
  const [size, setSize] = useState('1920x1080');
  const [customSize, setCustomSize] = useState('1920x1080');
  const [fps, setFps] = useState(30);
  const [seconds, setSeconds] = useState('10');
  const [kind, setKind] = useState<PathKind>('still');
  const [still, setStill] = useState<CameraPreset | 'current'>(link.last ? 'current' : store.get().camera);
  const [orbitFrom, setOrbitFrom] = useState<CameraPreset>('oblique');
  const [flyFrom, setFlyFrom] = useState<CameraPreset>('top');
  const [flyTo, setFlyTo] = useState<CameraPreset>('oblique');
  const [overlays, setOverlays] = useState<Set<OverlayName>>(new Set(OVERLAYS));
  const [title, setTitle] = useState(primary.manifest.name);
  const [container, setContainer] = useState<'mp4' | 'webm'>('mp4');
  const [progress, setProgress] = useState<{ done: number; total: number; started: number } | null>(null);
  const [message, setMessage] = useState<string | null>(null);
  const [done, setDone] = useState<Done | null>(null);
  const abort = useRef<AbortController | null>(null);
  const download = useRef<HTMLAnchorElement>(null);

  // the browser's download starts as soon as the link to a new file is on the page (the link
  // stays, for a second copy); its memory is given back when a newer file replaces it or the
  // dialog closes
  useEffect(() => {
    if (!done) return;
    download.current?.click();
    return () => URL.revokeObjectURL(done.url);
  }, [done]);
  useEffect(() => () => abort.current?.abort(), []);

  const chosen = useMemo(() => {
    try {
      const { width, height } = parseSize(size === 'custom' ? customSize : size, true);
      const camera = cameraPath(kind, still, orbitFrom, flyFrom, flyTo, link, width, height, models.length);
      const opts: VideoOptions = { width, height, fps, seconds: Number(seconds), container, camera, overlays: OVERLAYS.filter((o) => overlays.has(o)), title };
      checkVideoOptions(opts);
      return { opts, error: null, frames: frameCount(opts.fps, opts.seconds) };
    } catch (e) {
      return { opts: null, error: (e as Error).message.replace(/^--\w+:? ?/, ''), frames: 0 };
    }
  }, [size, customSize, fps, seconds, kind, still, orbitFrom, flyFrom, flyTo, overlays, title, container, models.length]);

  const busy = progress !== null;
  const baseName = `${models.map((m) => m.name).join('-vs-')}`;
  const subject = () => ({ models, look: lookOf(store.get()) });

  const startVideo = async () => {
    if (!chosen.opts) return;
    const opts = chosen.opts;
    abort.current = new AbortController();
    setMessage(null);
    setDone(null);
    setProgress({ done: 0, total: chosen.frames, started: performance.now() });
    try {
      const { stats, buffer } = await recordVideo(subject(), opts, null, {
        signal: abort.current.signal,
        onProgress: (d, n) => setProgress((p) => (p ? { ...p, done: d, total: n } : p)),
      });
      const blob = new Blob([buffer!], { type: opts.container === 'mp4' ? 'video/mp4' : 'video/webm' });
      offer({ url: URL.createObjectURL(blob), name: `${baseName}-${opts.width}x${opts.height}.${opts.container}`, stats, bytes: blob.size });
    } catch (e) {
      setMessage(e instanceof RecordError && e.code === 'cancelled' ? 'Recording cancelled.' : (e as Error).message);
    } finally {
      setProgress(null);
      abort.current = null;
    }
  };

  const startStill = async () => {
    if (!chosen.opts) return;
    const { width, height, camera, overlays: ov } = chosen.opts;
    const [t0, dur] = runSpan(models);
    const at = dur > 0 ? Math.min(1, Math.max(0, (store.get().timeH - t0) / dur)) : 1;
    const opts = { width, height, camera, overlays: ov, title, at };
    setMessage(null);
    try {
      checkStillOptions(opts);
      const png = await recordStill(subject(), opts);
      offer({ url: URL.createObjectURL(png), name: `${baseName}-t${at.toFixed(3)}-${width}x${height}.png`, stats: null, bytes: png.size });
    } catch (e) {
      setMessage((e as Error).message);
    }
  };

  const offer = (d: Done) => setDone(d);

  const toggle = (o: OverlayName) => setOverlays((s) => {
    const n = new Set(s);
    if (n.has(o)) n.delete(o);
    else n.add(o);
    return n;
  });
  const presetSelect = (value: string, set: (v: CameraPreset) => void, testId: string, extra?: ReactNode) => (
    <select value={value} onChange={(e) => set(e.target.value as CameraPreset)} data-testid={testId} disabled={busy}>
      {extra}
      {CAMERA_PRESETS.map((c) => <option key={c} value={c}>{c}</option>)}
    </select>
  );

  return (
    <div className="record-backdrop" onClick={(e) => e.target === e.currentTarget && !busy && onClose()}>
      <div className="record-dialog" role="dialog" aria-modal="true" aria-label="record a video" data-testid="record-dialog">
        <h2>Record the replay</h2>
        <p className="muted small">Drawn frame by frame with every axon, so no frame is dropped however slow the machine; the whole run is spread over the video.</p>
        <div className="record-grid">
          <label>Size
            <span className="record-row">
              <select value={size} onChange={(e) => setSize(e.target.value)} disabled={busy} data-testid="record-size">
                {SIZES.map((s) => <option key={s} value={s}>{s.replace('x', ' × ')}</option>)}
                <option value="custom">other…</option>
              </select>
              {size === 'custom' && <input className="record-text" value={customSize} onChange={(e) => setCustomSize(e.target.value)} placeholder="W×H" disabled={busy} aria-label="custom size" />}
            </span>
          </label>
          <label>Frame rate
            <select value={fps} onChange={(e) => setFps(Number(e.target.value))} disabled={busy} data-testid="record-fps">
              {FPS_CHOICES.map((f) => <option key={f} value={f}>{f} fps</option>)}
            </select>
          </label>
          <label>Length
            <span className="record-row">
              <input className="record-number" type="number" min={0.1} step={0.5} value={seconds} onChange={(e) => setSeconds(e.target.value)} disabled={busy} data-testid="record-seconds" /> s
            </span>
          </label>
          <fieldset className="record-camera" disabled={busy}>
            <legend>Camera</legend>
            {(['still', 'orbit', 'fly'] as const).map((k) => (
              <label key={k} className="record-radio">
                <input type="radio" name="record-camera" checked={kind === k} onChange={() => setKind(k)} data-testid={`record-camera-${k}`} />
                {k === 'still' ? 'still' : k === 'orbit' ? 'orbit (one turn)' : 'fly between two views'}
              </label>
            ))}
            <span className="record-row">
              {kind === 'still' && presetSelect(still, (v) => setStill(v), 'record-still', link.last ? <option value="current">current view</option> : undefined)}
              {kind === 'orbit' && <>from {presetSelect(orbitFrom, setOrbitFrom, 'record-orbit')}</>}
              {kind === 'fly' && <>from {presetSelect(flyFrom, setFlyFrom, 'record-fly-from')} to {presetSelect(flyTo, setFlyTo, 'record-fly-to')}</>}
            </span>
          </fieldset>
          <fieldset className="record-overlays" disabled={busy}>
            <legend>Burn in</legend>
            {OVERLAYS.map((o) => (
              <label key={o} className="record-check">
                <input type="checkbox" checked={overlays.has(o)} onChange={() => toggle(o)} data-testid={`record-overlay-${o}`} /> {OVERLAY_HELP[o]}
              </label>
            ))}
            <input className="record-text record-title" value={title} onChange={(e) => setTitle(e.target.value)} placeholder="title" aria-label="title" disabled={busy || !overlays.has('title')} />
          </fieldset>
          <fieldset className="record-format" disabled={busy}>
            <legend>File</legend>
            <label className="record-radio"><input type="radio" name="record-format" checked={container === 'mp4'} onChange={() => setContainer('mp4')} /> MP4 (H.264), plays in slide software</label>
            <label className="record-radio"><input type="radio" name="record-format" checked={container === 'webm'} onChange={() => setContainer('webm')} data-testid="record-webm" /> WebM (VP9)</label>
          </fieldset>
        </div>
        <p className={chosen.error ? 'note' : 'muted small'} data-testid="record-summary">
          {chosen.error ?? `${chosen.frames.toLocaleString('en-US')} frames; ${primary.manifest.name}'s ${formatH(runSpan(models)[1])} h over ${seconds} s`}
        </p>
        {progress && (
          <div className="record-progress" data-testid="record-progress">
            <progress value={progress.done} max={progress.total} />
            <span>frame {progress.done} / {progress.total}{progress.done > 0 ? ` · ${eta(progress)}` : ''}</span>
          </div>
        )}
        {message && <p className="note" role="alert" data-testid="record-message">{message}</p>}
        {done && (
          <p className="record-done" data-testid="record-done">
            <a ref={download} href={done.url} download={done.name}>Download {done.name}</a>{' '}
            <span className="muted">({(done.bytes / 2 ** 20).toFixed(1)} MB{done.stats ? `, ${done.stats.frames} frames, ${done.stats.codecLabel}, ${done.stats.framesPerSecond.toFixed(1)} frames/s` : ''})</span>
          </p>
        )}
        <div className="record-buttons">
          {busy ? (
            <button className="seg" onClick={() => abort.current?.abort()} data-testid="record-cancel">Cancel</button>
          ) : (
            <>
              <button className="seg on" onClick={startVideo} disabled={!chosen.opts} data-testid="record-start">Record video</button>
              <button className="seg" onClick={startStill} disabled={!chosen.opts} data-testid="record-still-png">Save still (PNG) of the time shown</button>
              <button className="seg" onClick={onClose}>Close</button>
            </>
          )}
        </div>
      </div>
    </div>
  );
}

/** The camera path the dialog describes. "current view" takes the viewer's camera, its zoom
 *  rescaled from the page's canvas to the output so the same part of the volume fills it. */
function cameraPath(kind: PathKind, still: CameraPreset | 'current', orbitFrom: CameraPreset, flyFrom: CameraPreset, flyTo: CameraPreset,
  link: CameraLink, width: number, height: number, views: number): CameraPath {
  if (kind === 'orbit') return { kind: 'orbit', preset: orbitFrom, turns: 1 };
  if (kind === 'fly') {
    if (flyFrom === flyTo) throw new Error('a fly needs two different views');
    return { kind: 'fly', from: flyFrom, to: flyTo };
  }
  const last = link.last;
  if (still === 'current' && last) {
    const pageHeight = document.querySelector<HTMLCanvasElement>('[data-testid="view-0"] canvas')?.clientHeight || height;
    const outHeight = splitWidth(width, height, views)[0].h;
    return { kind: 'pose', pose: { position: last.position, target: last.target, up: [0, 0, 1], zoom: last.zoom * (outHeight / pageHeight) } };
  }
  return { kind: 'still', preset: still === 'current' ? 'oblique' : still };
}

function formatH(h: number): string {
  return String(Number(h.toPrecision(3)));
}

function eta(p: { done: number; total: number; started: number }): string {
  const el = (performance.now() - p.started) / 1000;
  const left = (el / p.done) * (p.total - p.done);
  return left < 90 ? `${left.toFixed(0)} s left` : `${(left / 60).toFixed(1)} min left`;
}
