// The timeline: play, pause, speed, scrub, step, and the time in hours. One clock drives every
// view; the frames of each run are looked up by time, so runs with different frame spacing stay
// in step.
import { useEffect, useRef } from 'react';
import type { ViewStore } from '../state/viewState.ts';
import { PLAY_SECONDS, SPEEDS } from '../state/viewState.ts';
import { useStore } from '../state/store.ts';
import { frameAt } from '../model/runModel.ts';
import { formatHours } from './format.ts';

export interface ClockProps {
  store: ViewStore;
  /** frame times of the run that sets the steps (the first one shown) */
  times: number[];
  durationH: number;
}

export function Clock({ store, times, durationH }: ClockProps) {
  const timeH = useStore(store, (s) => s.timeH);
  const playing = useStore(store, (s) => s.playing);
  const speed = useStore(store, (s) => s.speed);
  const frame = frameAt(times, timeH);
  const last = useRef(0);

  // Playback advances by wall-clock time, so a slow frame does not slow the run down.
  useEffect(() => {
    if (!playing) return;
    let raf = 0;
    last.current = performance.now();
    const tick = (now: number) => {
      const dt = (now - last.current) / 1000;
      last.current = now;
      const s = store.get();
      const next = s.timeH + (dt * s.speed * durationH) / PLAY_SECONDS;
      if (next >= durationH) store.set({ timeH: durationH, playing: false });
      else {
        store.set({ timeH: next });
        raf = requestAnimationFrame(tick);
      }
    };
    raf = requestAnimationFrame(tick);
    return () => cancelAnimationFrame(raf);
  }, [playing, durationH, store]);

  const step = (d: number) => {
    const f = Math.max(0, Math.min(times.length - 1, frame + d));
    store.set({ timeH: times[f], playing: false, lastMotion: performance.now() });
  };
  const togglePlay = () => {
    const s = store.get();
    if (s.playing) store.set({ playing: false });
    else store.set({ playing: true, timeH: s.timeH >= durationH ? 0 : s.timeH });
  };

  useEffect(() => {
    const onKey = (e: KeyboardEvent) => {
      const t = e.target as HTMLElement;
      if (t.tagName === 'INPUT' && (t as HTMLInputElement).type !== 'range') return;
      if (t.tagName === 'SELECT') return;
      if (e.key === ' ') { e.preventDefault(); togglePlay(); }
      else if (e.key === 'ArrowRight' && t.tagName !== 'INPUT') step(1);
      else if (e.key === 'ArrowLeft' && t.tagName !== 'INPUT') step(-1);
      else if (e.key === 'Home') store.set({ timeH: 0, playing: false });
      else if (e.key === 'End') store.set({ timeH: durationH, playing: false });
    };
    window.addEventListener('keydown', onKey);
    return () => window.removeEventListener('keydown', onKey);
  });

  const stepH = times.length > 1 ? durationH / (times.length - 1) : 1;
  return (
    <div className="clock" role="group" aria-label="timeline">
      <button className="clock-btn" onClick={() => step(-1)} title="previous frame (←)" aria-label="previous frame">◀︎|</button>
      <button className="clock-btn play" onClick={togglePlay} data-testid="play" aria-label={playing ? 'pause' : 'play'} title="play / pause (space)">
        {playing ? '❚❚' : '▶︎'}
      </button>
      <button className="clock-btn" onClick={() => step(1)} title="next frame (→)" aria-label="next frame">|▶︎</button>
      <label className="clock-speed">
        speed
        <select value={speed} onChange={(e) => store.set({ speed: Number(e.target.value) })} aria-label="playback speed">
          {SPEEDS.map((v) => (
            <option key={v} value={v}>
              {v}× ({formatHours((v * durationH) / PLAY_SECONDS)} h/s)
            </option>
          ))}
        </select>
      </label>
      <input
        className="clock-scrub"
        type="range"
        min={0}
        max={durationH}
        step={stepH / 4}
        value={timeH}
        data-testid="scrub"
        aria-label="time"
        onChange={(e) => store.set({ timeH: Number(e.target.value), playing: false, lastMotion: performance.now() })}
      />
      <div className="clock-time">
        <strong>{formatHours(times[frame] ?? 0)} h</strong>
        <span> / {formatHours(durationH)} h</span>
      </div>
    </div>
  );
}
