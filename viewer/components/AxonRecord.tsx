// The selected axon's row from axons.csv, for each run shown (the same axon index in each).
import type { ViewStore } from '../state/viewState.ts';
import { useStore } from '../state/store.ts';
import type { RunModel } from '../model/runModel.ts';
import { sheetColourCss } from '../colour/sheetColour.ts';

export function AxonRecord({ store, models }: { store: ViewStore; models: RunModel[] }) {
  const sel = useStore(store, (s) => s.selected);
  if (sel === null) {
    return (
      <section className="panel" aria-label="axon record">
        <h2>Axon record</h2>
        <p className="muted small">Click an axon in the 3D view or on a sheet to see its row of axons.csv.</p>
      </section>
    );
  }
  const rows = models.map((m) => (sel < m.N ? m.run.axons.row(sel) : null));
  const header = models[0].run.axons.header;
  const m0 = models[0];
  return (
    <section className="panel" aria-label="axon record" data-testid="axon-record" data-axon={sel}>
      <h2>
        <span className="swatch big" style={{ background: sel < m0.N ? sheetColourCss(m0.sourceU[sel], m0.sourceV[sel]) : '#888' }} />
        Axon {sel}
        <button className="link" onClick={() => store.set({ selected: null })} aria-label="clear selection">clear</button>
      </h2>
      <table className="record">
        {models.length > 1 && (
          <thead><tr><th /> {models.map((m) => <th key={m.name}>{m.name}</th>)}</tr></thead>
        )}
        <tbody>
          {header.map((h) => (
            <tr key={h}>
              <th>{h}</th>
              {rows.map((r, i) => <td key={i} data-col={h}>{r ? r[h] : '—'}</td>)}
            </tr>
          ))}
        </tbody>
      </table>
    </section>
  );
}
