// The legend: the (u, v) colour map of the source sheet with its axis names, and what the marks
// in the 3D view mean.
import { useEffect, useRef } from 'react';
import type { RunModel } from '../model/runModel.ts';
import { sheetColour } from '../colour/sheetColour.ts';

export function SourceKey({ model }: { model: RunModel }) {
  const ref = useRef<HTMLCanvasElement>(null);
  useEffect(() => {
    const c = ref.current;
    const ctx = c?.getContext('2d', { willReadFrequently: true });
    if (!c || !ctx) return;
    const n = c.width;
    const img = ctx.createImageData(n, n);
    for (let y = 0; y < n; y++) for (let x = 0; x < n; x++) {
      const [r, g, b] = sheetColour(x / (n - 1), 1 - y / (n - 1)); // v grows upward
      img.data.set([r * 255, g * 255, b * 255, 255].map(Math.round), (y * n + x) * 4);
    }
    ctx.putImageData(img, 0, 0);
  }, []);
  const sheet = model.sourceSheet;
  return (
    <section className="panel key" aria-label="colour key">
      <h2>Colour = where an axon started</h2>
      <div className="key-body">
        <div className="key-map">
          <span className="key-v">v{sheet?.vName ? ` (${sheet.vName})` : ''}</span>
          <canvas ref={ref} width={96} height={96} data-testid="colour-key" />
          <span className="key-u">u{sheet?.uName ? ` (${sheet.uName})` : ''}</span>
        </div>
        <ul className="key-marks">
          <li><span className="mark mark-cone" /> growth cone, advancing</li>
          <li><span className="mark mark-stop" /> axon end, stopped</li>
          <li><span className="mark mark-sel" /> selected axon</li>
          <li className="muted small">on source sheet “{sheet?.name ?? model.manifest.populations[0]?.source ?? '?'}”</li>
        </ul>
      </div>
    </section>
  );
}
