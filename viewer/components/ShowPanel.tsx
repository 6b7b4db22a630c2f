// What to draw: populations, final statuses, regions, the volume outline and the growth cones.
import type { ViewStore } from '../state/viewState.ts';
import { toggled } from '../state/viewState.ts';
import { useStore } from '../state/store.ts';
import type { RunModel } from '../model/runModel.ts';
import { ROLE_STYLE } from '../geometry/regionLayer.ts';
import { AXON_STATUS } from '../../engine/io/runFormat.ts';
import { formatCount } from './format.ts';

export function ShowPanel({ store, model }: { store: ViewStore; model: RunModel }) {
  // each field read on its own, so moving the time does not re-render this panel
  const s = {
    hiddenPops: useStore(store, (x) => x.hiddenPops),
    hiddenStatuses: useStore(store, (x) => x.hiddenStatuses),
    hiddenRegions: useStore(store, (x) => x.hiddenRegions),
    showBox: useStore(store, (x) => x.showBox),
    showTips: useStore(store, (x) => x.showTips),
  };
  const popCounts = model.manifest.populations.map((p) => p.count);
  return (
    <section className="panel" aria-label="show and hide">
      <h2>Show</h2>
      <fieldset>
        <legend>Populations</legend>
        {model.populations.map((name, i) => (
          <Check key={name} label={name} count={popCounts[i]} checked={!s.hiddenPops.has(name)}
            onChange={() => store.set({ hiddenPops: toggled(s.hiddenPops, name) })} testId={`pop-${name}`} />
        ))}
      </fieldset>
      <fieldset>
        <legend>Final status</legend>
        {AXON_STATUS.filter((st) => model.statusCounts.has(st)).map((st) => (
          <Check key={st} label={st} count={model.statusCounts.get(st)} checked={!s.hiddenStatuses.has(st)}
            onChange={() => store.set({ hiddenStatuses: toggled(s.hiddenStatuses, st) })} testId={`status-${st}`} />
        ))}
      </fieldset>
      <fieldset>
        <legend>Regions</legend>
        {model.regions.map((r) => {
          const role = model.roles.get(r.name) ?? 'region';
          return (
            <Check key={r.name} label={r.name} tag={ROLE_STYLE[role].label} swatch={`#${ROLE_STYLE[role].edge.toString(16).padStart(6, '0')}`}
              checked={!s.hiddenRegions.has(r.name)} onChange={() => store.set({ hiddenRegions: toggled(s.hiddenRegions, r.name) })} />
          );
        })}
        <Check label="volume outline" checked={s.showBox} onChange={() => store.set({ showBox: !s.showBox })} />
        <Check label="growth cones" checked={s.showTips} onChange={() => store.set({ showTips: !s.showTips })} />
      </fieldset>
    </section>
  );
}

function Check(p: { label: string; count?: number; tag?: string; swatch?: string; checked: boolean; onChange: () => void; testId?: string }) {
  return (
    <label className="check">
      <input type="checkbox" checked={p.checked} onChange={p.onChange} data-testid={p.testId} />
      {p.swatch && <span className="swatch" style={{ background: p.swatch }} />}
      <span className="check-label">{p.label}</span>
      {p.tag && <span className="tag">{p.tag}</span>}
      {p.count !== undefined && <span className="count">{formatCount(p.count)}</span>}
    </label>
  );
}
