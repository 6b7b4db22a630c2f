// Cue fields: pick a cue, place a slice plane through it (or see it painted on its sheet), read
// the colour bar, optionally add an isosurface.
import type { ViewStore } from '../state/viewState.ts';
import { useStore } from '../state/store.ts';
import type { RunModel } from '../model/runModel.ts';
import { fieldRampCss } from '../colour/fieldRamp.ts';
import { levelAt } from '../geometry/fieldLayer.ts';
import { formatValue } from './format.ts';

export function CuePanel({ store, model }: { store: ViewStore; model: RunModel }) {
  // each field read on its own, so moving the time does not re-render this panel
  const s = {
    cue: useStore(store, (x) => x.cue),
    sliceAxis: useStore(store, (x) => x.sliceAxis),
    sliceFrac: useStore(store, (x) => x.sliceFrac),
    logScale: useStore(store, (x) => x.logScale),
    showSlice: useStore(store, (x) => x.showSlice),
    showIso: useStore(store, (x) => x.showIso),
    isoFrac: useStore(store, (x) => x.isoFrac),
  };
  const fields = model.run.fieldInfos;
  const info = fields.find((f) => f.cue === s.cue) ?? null;
  const motion = () => performance.now();
  if (fields.length === 0) {
    return (
      <section className="panel" aria-label="cue field">
        <h2>Cue field</h2>
        <p className="muted">This run stored no cue fields.</p>
      </section>
    );
  }
  const axisIndex = { x: 0, y: 1, z: 2 }[s.sliceAxis];
  const canLog = !!info && !(info.min < 0);
  const log = s.logScale && canLog;
  let at: number | null = null;
  if (info?.space === 'volume') {
    const n = [info.shape[2], info.shape[1], info.shape[0]][axisIndex];
    at = (info.origin?.[axisIndex] ?? 0) + s.sliceFrac * (n - 1) * (info.spacing ?? 1);
  }
  return (
    <section className="panel" aria-label="cue field">
      <h2>Cue field</h2>
      <label className="row">
        cue
        <select value={s.cue ?? ''} onChange={(e) => store.set({ cue: e.target.value || null })} data-testid="cue-select">
          <option value="">none</option>
          {fields.map((f) => (
            <option key={f.cue} value={f.cue}>{f.cue} ({f.space === 'volume' ? 'volume' : `on ${f.region}`})</option>
          ))}
        </select>
      </label>
      {info && (
        <>
          {info.space === 'volume' ? (
            <>
              <div className="row">
                slice ⟂
                {(['x', 'y', 'z'] as const).map((a) => (
                  <button key={a} className={`seg ${s.sliceAxis === a ? 'on' : ''}`} onClick={() => store.set({ sliceAxis: a })}>{a}</button>
                ))}
                <label className="inline"><input type="checkbox" checked={s.showSlice} onChange={() => store.set({ showSlice: !s.showSlice })} /> show</label>
              </div>
              <label className="row">
                at {s.sliceAxis} = {formatValue(at)} µm
                <input type="range" min={0} max={1} step={0.005} value={s.sliceFrac} onChange={(e) => store.set({ sliceFrac: Number(e.target.value), lastMotion: motion() })} />
              </label>
              <div className="row">
                <label className="inline"><input type="checkbox" checked={s.showIso} onChange={() => store.set({ showIso: !s.showIso })} /> isosurface</label>
                <input type="range" min={0.02} max={0.98} step={0.01} value={s.isoFrac} disabled={!s.showIso}
                  onChange={(e) => store.set({ isoFrac: Number(e.target.value), lastMotion: motion() })} aria-label="isosurface level" />
              </div>
              {s.showIso && <div className="muted small">surface at c = {formatValue(levelAt(info.min, info.max, log, s.isoFrac))}</div>}
            </>
          ) : (
            <p className="muted small">Painted on sheet “{info.region}”.</p>
          )}
          {canLog ? (
            <label className="row inline"><input type="checkbox" checked={s.logScale} onChange={() => store.set({ logScale: !s.logScale })} /> log scale</label>
          ) : (
            <p className="muted small">Linear scale: this field has negative values{info.border ? ` (${info.border.species[0]} − ${info.border.species[1]}; the border is at 0)` : ''}.</p>
          )}
          <ColourBar lo={info.min} hi={info.max} log={log} cue={info.cue} />
        </>
      )}
    </section>
  );
}

function ColourBar({ lo, hi, log, cue }: { lo: number; hi: number; log: boolean; cue: string }) {
  const ticks = [0, 0.25, 0.5, 0.75, 1];
  return (
    <div className="colour-bar" data-testid="colour-bar">
      <div className="colour-bar-ramp" style={{ background: fieldRampCss('to right') }} />
      <div className="colour-bar-ticks">
        {ticks.map((t) => (
          <span key={t} style={{ left: `${t * 100}%` }}>{formatValue(levelAt(lo, hi, log, t), 2)}</span>
        ))}
      </div>
      <div className="muted small">{cue} concentration (scene units){log ? ', log scale' : ''}</div>
    </div>
  );
}
