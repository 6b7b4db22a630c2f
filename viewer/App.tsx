// The viewer page: loads the run(s) named in the URL through the run store reader, then lays
// out the 3D view(s), the timeline, the panels and the map check. The root element carries
// data-run-state = "loading" | "ready" | "error" so scripts and tests know when the run is
// drawn, and an error is always shown as a readable message, never a blank page.
import { Component, useEffect, useMemo, useRef, useState, type ReactNode } from 'react';
import { readRun, fetchLoader, RunReadError } from '../engine/io/runReader.ts';
import { buildRunModel, type RunModel } from './model/runModel.ts';
import { createViewState, type ViewStore } from './state/viewState.ts';
import { parseUrlView, formatUrlView, type UrlView } from './state/urlState.ts';
import { useStore } from './state/store.ts';
import { prefetchingFetch } from './state/prefetch.ts';
import { CameraLink } from './render/cameraLink.ts';
import type { DrawReport } from './render/progressiveRender.ts';
import { CAMERA_PRESETS } from './geometry/cameraPresets.ts';
import { GrowthView } from './components/GrowthView.tsx';
import { Clock } from './components/Clock.tsx';
import { ShowPanel } from './components/ShowPanel.tsx';
import { CuePanel } from './components/CuePanel.tsx';
import { SourceKey } from './components/SourceKey.tsx';
import { AxonRecord } from './components/AxonRecord.tsx';
import { MapCheck } from './components/MapCheck.tsx';
import { formatCount } from './components/format.ts';
import { RecordButton } from './record/RecordDialog.tsx';

/** What the page exposes for the benchmark and the end-to-end tests. */
export interface ViewerProbe {
  timings: Record<string, number>;
  reports: DrawReport[][];
  store?: ViewStore;
  models?: { name: string; axons: number; frames: number }[];
  /** per 3D view: where a point in µm appears on the page (CSS px), for tests and the benchmark */
  views: { project(x: number, y: number, z: number): [number, number] }[];
}

declare global {
  interface Window {
    __axonloom?: ViewerProbe;
  }
}

export function App() {
  const url = useMemo(() => parseUrlView(window.location.search), []);
  const probe = useMemo<ViewerProbe>(() => (window.__axonloom = { timings: { start: performance.now() }, reports: [], views: [] }), []);
  const [names, setNames] = useState<string[] | null>(url.run ? runNames(url.run, url.compare) : null);
  const [runList, setRunList] = useState<string[]>([]);
  const [models, setModels] = useState<RunModel[] | null>(null);
  const [error, setError] = useState<{ title: string; message: string } | null>(null);

  useEffect(() => {
    let cancelled = false;
    (async () => {
      const listing = prefetchingFetch('runs/index.json').then((r) => (r.ok ? r.json() : null)).catch(() => null) as Promise<{ default?: string; runs?: string[] } | null>;
      void listing.then((l) => !cancelled && setRunList(l?.runs ?? []));
      let wanted = names;
      if (!wanted) {
        const l = await listing;
        if (!l?.default) throw new RunReadError('runs/index.json', 'no run named in the URL (?run=NAME) and the server offers none');
        wanted = runNames(l.default, url.compare);
        if (!cancelled) setNames(wanted);
      }
      // Both runs download at once; the views compile their shaders meanwhile.
      const loaded = await Promise.all(wanted.map(async (n) => {
        const t0 = performance.now();
        let run;
        try {
          run = await readRun(fetchLoader(`runs/${encodeURIComponent(n)}`, prefetchingFetch));
        } catch (e) {
          throw Object.assign(e as Error, { runName: n });
        }
        probe.timings[`read:${n}`] = performance.now() - t0;
        const t1 = performance.now();
        const m = buildRunModel(n, run);
        probe.timings[`model:${n}`] = performance.now() - t1;
        return m;
      }));
      probe.timings.loaded = performance.now();
      probe.models = loaded.map((m) => ({ name: m.name, axons: m.N, frames: m.F }));
      if (!cancelled) setModels(loaded);
    })().catch((e: Error & { runName?: string }) => {
      if (cancelled) return;
      const which = e.runName ? `run “${e.runName}”` : 'the run';
      const file = e instanceof RunReadError ? ` (problem in ${e.file})` : '';
      setError({ title: `Could not open ${which}${file}`, message: e.message });
    });
    return () => {
      cancelled = true;
    };
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [url, probe]);

  if (error) return <ErrorScreen title={error.title} message={error.message} />;
  if (!names) {
    return (
      <div id="axonloom" className="loading" data-run-state="loading">
        <p>Finding the run…</p>
      </div>
    );
  }
  return (
    <ErrorBoundary>
      <Layout names={names} models={models} url={url} runList={runList} probe={probe} />
    </ErrorBoundary>
  );
}

function runNames(run: string, compare: string | null): string[] {
  return compare && compare !== run ? [run, compare] : [run];
}

/** One layout for loading and loaded, so the 3D views (and their compiled shaders) carry over. */
function Layout({ names, models, url, runList, probe }: { names: string[]; models: RunModel[] | null; url: UrlView; runList: string[]; probe: ViewerProbe }) {
  const store = useMemo(() => {
    if (!models) return null;
    const primary = models[0];
    const durationH = Math.max(...models.map((m) => m.durationH));
    const s = createViewState({
      timeH: (url.t ?? 1) * durationH,
      camera: url.cam ?? 'oblique',
      selected: url.axon !== null && url.axon < primary.N ? url.axon : null,
      cue: url.cue && primary.run.fieldInfos.some((f) => f.cue === url.cue) ? url.cue : null,
    });
    probe.store = s;
    return s;
  }, [models]);
  const link = useMemo(() => new CameraLink(), []);
  const [readyCount, setReadyCount] = useState(0);
  const readyOnce = useRef(new Set<number>());
  const ready = models !== null && readyCount >= models.length;
  const durationH = models ? Math.max(...models.map((m) => m.durationH)) : 0;

  // Keep the address bar a shareable link to what is shown (not while playing).
  useEffect(() => {
    if (!store || !models) return;
    let timer: ReturnType<typeof setTimeout> | 0 = 0;
    return store.subscribe((s) => {
      if (s.playing) return;
      if (timer) clearTimeout(timer);
      timer = setTimeout(() => {
        const next = formatUrlView({
          run: models[0].name, compare: models[1]?.name ?? null, t: durationH > 0 ? s.timeH / durationH : 0,
          cam: s.camera, axon: s.selected, cue: s.cue,
        });
        window.history.replaceState(null, '', next);
      }, 400);
    });
  }, [store]);

  const primary = models?.[0];
  const variantOf = (m: RunModel) => (m.manifest.variant ? `variant ${m.manifest.variant}` : m.manifest.edits?.length ? 'edited' : 'normal');
  return (
    <div id="axonloom" data-run-state={ready ? 'ready' : 'loading'} className={names.length > 1 ? 'compare' : ''}>
      <header className="top">
        <h1>axonloom <span className="muted">viewer</span></h1>
        {primary ? (
          <span className="run-summary">
            {primary.manifest.name} · {formatCount(primary.N)} axons · {formatCount(primary.F)} frames · {primary.manifest.status}
          </span>
        ) : (
          <span className="run-summary">loading {names.join(' and ')}…</span>
        )}
        {store && <CameraButtons store={store} />}
        {store && models && <RecordButton models={models} store={store} link={link} />}
        <CompareChooser runs={runList} current={names} />
      </header>
      <main className="views">
        {names.map((n, i) => (
          <GrowthView
            key={n}
            name={n}
            model={models?.[i] ?? null}
            store={store}
            link={link}
            viewIndex={i}
            subtitle={models ? `${variantOf(models[i])} · ${formatCount(models[i].N)} axons` : 'loading…'}
            onReady={() => {
              if (readyOnce.current.has(i)) return;
              readyOnce.current.add(i);
              probe.timings[`firstFrame:${i}`] = performance.now();
              setReadyCount((c) => c + 1);
            }}
            onReport={(r) => {
              (probe.reports[i] ??= []).push(r);
              if (probe.reports[i].length > 400) probe.reports[i].shift();
            }}
          />
        ))}
      </main>
      {models && store && primary ? (
        <>
          <Clock store={store} times={primary.times} durationH={durationH} />
          {/* drawn once the 3D view is up: its plots would otherwise delay the first frame */}
          {ready ? <MapCheck store={store} models={models} /> : <section className="map-check muted">Map check follows the first frame…</section>}
          <aside className="side">
            <SourceKey model={primary} />
            <AxonRecord store={store} models={models} />
            <ShowPanel store={store} model={primary} />
            <CuePanel store={store} model={primary} />
            <p className="disclaimer">Model output: a hypothesis to test, not a substitute for experiment.</p>
          </aside>
        </>
      ) : (
        <aside className="side"><p className="muted">Reading run.json, frames.npy and axons.csv…</p></aside>
      )}
    </div>
  );
}

function CameraButtons({ store }: { store: ViewStore }) {
  const cam = useStore(store, (s) => s.camera);
  return (
    <div className="cams" role="group" aria-label="camera">
      <span className="muted">view</span>
      {CAMERA_PRESETS.map((p) => (
        <button key={p} className={`seg ${cam === p ? 'on' : ''}`} data-testid={`cam-${p}`}
          onClick={() => store.set((s) => ({ camera: p, cameraRevision: s.cameraRevision + 1 }))}>{p}</button>
      ))}
    </div>
  );
}

/** Opens a second run beside the first (a page load, so both start from a clean state). */
function CompareChooser({ runs, current }: { runs: string[]; current: string[] }) {
  const others = runs.filter((r) => r !== current[0]);
  if (others.length === 0) return null;
  const go = (name: string) => {
    const q = new URLSearchParams(window.location.search);
    q.set('run', current[0]);
    if (name) q.set('compare', name);
    else q.delete('compare');
    window.location.search = q.toString();
  };
  return (
    <label className="compare-choose">
      <span className="muted">compare with</span>
      <select value={current[1] ?? ''} onChange={(e) => go(e.target.value)} data-testid="compare-select">
        <option value="">—</option>
        {others.map((r) => <option key={r} value={r}>{r}</option>)}
      </select>
    </label>
  );
}

export function ErrorScreen({ title, message }: { title: string; message: string }) {
  return (
    <div id="axonloom" className="failed" data-run-state="error">
      <div className="error-box" role="alert" data-testid="error">
        <h1>{title}</h1>
        <p className="error-message">{message}</p>
        <p className="muted">
          The run directory may be incomplete or damaged (for example a run that was cut off while writing). Run it
          again, or open another run with <code>?run=NAME</code>.
        </p>
      </div>
    </div>
  );
}

/** Turns a crash while drawing (for example no WebGL at all) into the error screen. */
class ErrorBoundary extends Component<{ children: ReactNode }, { error: Error | null }> {
  state = { error: null as Error | null };
  static getDerivedStateFromError(error: Error) {
    return { error };
  }
  render() {
    if (this.state.error) {
      const webgl = /webgl|context/i.test(this.state.error.message);
      return <ErrorScreen title={webgl ? 'This browser could not start WebGL' : 'The viewer failed while drawing'} message={this.state.error.message} />;
    }
    return this.props.children;
  }
}
