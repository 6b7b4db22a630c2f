// The 3D view of one run: volume, regions, axon paths up to the shown time, growth cones, the
// cue field; with its title, time stamp, scale bar, region labels and a note saying how much of
// the picture is drawn. Geometry lives in plain modules (viewer/geometry); this component wires
// them to the shared view state, the camera controls and the frame loop.
import { useEffect, useMemo, useRef, useState, type RefObject } from 'react';
import { Canvas, useFrame, useThree } from '@react-three/fiber';
import * as THREE from 'three';
import { OrbitControls } from 'three/examples/jsm/controls/OrbitControls.js';
import type { RunModel } from '../model/runModel.ts';
import { frameAt, visibleMask } from '../model/runModel.ts';
import type { ViewState, ViewStore } from '../state/viewState.ts';
import { useStore } from '../state/store.ts';
import { AxonLayer } from '../geometry/axonLayer.ts';
import { RegionLayer, type RegionLabel } from '../geometry/regionLayer.ts';
import { FieldLayer } from '../geometry/fieldLayer.ts';
import { presetPose } from '../geometry/cameraPresets.ts';
import { pickPath } from '../geometry/pick.ts';
import { scaleBar, type ScaleBar } from '../geometry/scaleBar.ts';
import { ProgressiveRenderer, type DrawReport } from '../render/progressiveRender.ts';
import type { CameraLink } from '../render/cameraLink.ts';
import type { SheetRegion } from '../../engine/scene/schema.ts';
import { formatHours } from './format.ts';
import { warmUpShaders } from '../render/warmUp.ts';

export const BACKGROUND = 0x0f1318;
/** How long after the last scrub or camera move the picture is completed, ms. */
const SETTLE_MS = 260;

export interface GrowthViewProps {
  name: string;
  /** null while the run is still loading: the view then compiles its shaders meanwhile */
  model: RunModel | null;
  store: ViewStore | null;
  link: CameraLink;
  subtitle?: string;
  viewIndex: number;
  onReady: () => void;
  onReport?: (r: DrawReport) => void;
}

export function GrowthView(p: GrowthViewProps) {
  const [report, setReport] = useState<DrawReport | null>(null);
  const [bar, setBar] = useState<ScaleBar | null>(null);
  const labelsRef = useRef<HTMLDivElement>(null);
  // The note is text the page must lay out and paint (in software, here): update it when what it
  // says changes, and its frame time at most four times a second.
  const shown = useRef({ at: 0, key: '' });
  const onReport = (r: DrawReport) => {
    p.onReport?.(r);
    const key = `${r.mode}|${r.axonsDrawn}|${r.axonsVisible}|${Math.round(r.progress * 20)}`;
    const now = performance.now();
    if (key !== shown.current.key || now - shown.current.at > 250) {
      shown.current = { at: now, key };
      setReport(r);
    }
  };
  const { model, store } = p;
  return (
    <section className="growth-view" data-testid={`view-${p.viewIndex}`}>
      <Canvas
        orthographic
        frameloop="demand"
        dpr={1}
        flat
        linear
        legacy
        gl={{ preserveDrawingBuffer: true, antialias: false, alpha: false, powerPreference: 'low-power' }}
        camera={{ near: 1, far: 1e6, position: [0, 0, 1000], zoom: 1 }}
        onCreated={({ gl }) => {
          gl.setClearColor(BACKGROUND, 1);
          mark(`canvasCreated:${p.viewIndex}`);
        }}
      >
        {model && store ? (
          <ViewContents {...p} model={model} store={store} onReport={onReport} onScale={setBar} labelsRef={labelsRef} />
        ) : (
          <WarmUp index={p.viewIndex} />
        )}
      </Canvas>
      <div className="view-labels" ref={labelsRef} aria-hidden="true" />
      <header className="view-title">
        <span className="run-name">{p.name}</span>
        {p.subtitle && <span className="run-sub">{p.subtitle}</span>}
      </header>
      {model && store ? <TimeStamp model={model} store={store} index={p.viewIndex} /> : <div className="view-loading">Loading run “{p.name}”…</div>}
      <DrawNote report={report} />
      {bar && (
        <div className="scale-bar" data-testid="scale-bar">
          <div className="scale-bar-line" style={{ width: `${bar.px}px` }} />
          <span>{bar.label}</span>
        </div>
      )}
    </section>
  );
}

function TimeStamp({ model, store, index }: { model: RunModel; store: ViewStore; index: number }) {
  const timeH = useStore(store, (s) => s.timeH);
  const frame = frameAt(model.times, timeH);
  return (
    <div className="time-stamp" data-testid={`time-${index}`}>
      t = {formatHours(model.times[frame] ?? 0)} h
      <span className="frame-no">frame {frame + 1} / {model.F}</span>
    </div>
  );
}

/** Compiles the scene's shaders while the run downloads (see warmUp.ts). */
function WarmUp({ index }: { index: number }) {
  const { gl, camera } = useThree();
  useEffect(() => {
    const t0 = performance.now();
    void warmUpShaders(gl, camera).then(() => {
      const t = window.__axonloom?.timings;
      if (t) t[`warmUp:${index}`] = performance.now() - t0;
    });
  }, [gl, camera]);
  return null;
}

function DrawNote({ report }: { report: DrawReport | null }) {
  if (!report) return null;
  const n = (x: number) => x.toLocaleString('en-US');
  const text =
    report.mode === 'all'
      ? `all ${n(report.axonsVisible)} axons`
      : report.mode === 'sample'
        ? `sample of ${n(report.axonsDrawn)} / ${n(report.axonsVisible)} axons while moving`
        : `completing: ${Math.round(report.progress * 100)}% of paths`;
  return (
    <div className={`draw-note draw-${report.mode}`} data-testid="draw-note" data-mode={report.mode} data-frame-ms={report.frameMs.toFixed(1)}>
      {text} · {report.frameMs.toFixed(0)} ms/frame
    </div>
  );
}

interface ContentsProps extends GrowthViewProps {
  model: RunModel;
  store: ViewStore;
  onReport: (r: DrawReport) => void;
  onScale: (b: ScaleBar | null) => void;
  labelsRef: RefObject<HTMLDivElement | null>;
}

function ViewContents(p: ContentsProps) {
  const { gl, camera, scene, size, invalidate } = useThree();
  const cam = camera as THREE.OrthographicCamera;
  const { model, store } = p;

  const built = useMemo(() => {
    mark(`layersStart:${p.viewIndex}`);
    const axons = new AxonLayer(model);
    const regions = new RegionLayer(model);
    const field = new FieldLayer(model.regions.filter((r): r is SheetRegion => r.shape === 'sheet'));
    const refineScene = new THREE.Scene();
    refineScene.add(axons.refineObject, axons.refineTips);
    mark(`layersBuilt:${p.viewIndex}`);
    return { axons, regions, field, refineScene };
  }, [model]);
  const progressive = useMemo(() => new ProgressiveRenderer(gl, scene, built.refineScene, built.axons, p.onReport), [gl, scene, built]);
  const live = useRef({ ready: false, lastMove: 0, settle: 0 as ReturnType<typeof setTimeout> | 0, mask: new Uint8Array(model.N).fill(1) as Uint8Array, zoom: 0, controls: null as OrbitControls | null });

  // Settling: once nothing has moved for SETTLE_MS, draw the full picture.
  const settleSoon = () => {
    const l = live.current;
    if (l.settle) clearTimeout(l.settle);
    l.settle = setTimeout(() => {
      l.settle = 0;
      const s = store.get();
      if (s.playing) return;
      if (performance.now() - Math.max(l.lastMove, s.lastMotion) < SETTLE_MS - 20) return settleSoon();
      progressive.still();
      invalidate();
    }, SETTLE_MS);
  };
  const moved = () => {
    live.current.lastMove = performance.now();
    progressive.moving();
    invalidate();
    settleSoon();
  };

  const applyPreset = (s: ViewState) => {
    const pose = presetPose(s.camera, model.size, { width: size.width, height: size.height });
    cam.up.set(...pose.up);
    cam.position.set(...pose.position);
    cam.zoom = pose.zoom;
    cam.near = 1;
    cam.far = 8 * Math.hypot(...model.size) + 10;
    cam.lookAt(...pose.target);
    cam.updateProjectionMatrix();
    live.current.controls?.target.set(...pose.target);
  };

  // Scene objects, controls and state wiring.
  useEffect(() => {
    const { axons, regions, field } = built;
    scene.add(regions.object, field.object, axons.object);
    const s0 = store.get();
    applyState(s0, null);
    applyPreset(s0);

    const controls = new OrbitControls(cam, gl.domElement);
    controls.enableDamping = false;
    controls.screenSpacePanning = true;
    controls.zoomSpeed = 1.4;
    controls.target.set(model.size[0] / 2, model.size[1] / 2, model.size[2] / 2);
    live.current.controls = controls;
    applyPreset(s0);
    const [linkId, leave] = p.link.join((c) => {
      cam.position.set(...c.position);
      cam.zoom = c.zoom;
      controls.target.set(...c.target);
      cam.lookAt(controls.target);
      cam.updateProjectionMatrix();
      moved();
    });
    const onChange = () => {
      p.link.publish(linkId, cam, controls.target);
      moved();
    };
    controls.addEventListener('change', onChange);

    const unsub = store.subscribe((s, prev) => applyState(s, prev));

    // Click (a press and release without dragging) picks the nearest path.
    let down: { x: number; y: number } | null = null;
    const el = gl.domElement;
    const onDown = (e: PointerEvent) => (down = { x: e.clientX, y: e.clientY });
    const onUp = (e: PointerEvent) => {
      if (!down || Math.hypot(e.clientX - down.x, e.clientY - down.y) > 4) return;
      down = null;
      const rect = el.getBoundingClientRect();
      cam.updateMatrixWorld();
      const m = new THREE.Matrix4().multiplyMatrices(cam.projectionMatrix, cam.matrixWorldInverse);
      const hit = pickPath(model.positions, model.F, model.N, axons.frameShown, live.current.mask, m.elements, rect.width, rect.height,
        e.clientX - rect.left, e.clientY - rect.top, 9, model.F > 300 ? 2 : 1);
      store.set({ selected: hit ? hit.axon : null });
    };
    el.addEventListener('pointerdown', onDown);
    el.addEventListener('pointerup', onUp);

    const probe = window.__axonloom;
    if (probe) {
      probe.views[p.viewIndex] = {
        project(x, y, z) {
          const r = el.getBoundingClientRect();
          cam.updateMatrixWorld();
          tmp.set(x, y, z).project(cam);
          return [r.left + ((tmp.x + 1) / 2) * r.width, r.top + ((1 - tmp.y) / 2) * r.height];
        },
      };
    }

    progressive.moving();
    invalidate();
    mark(`wired:${p.viewIndex}`);
    return () => {
      unsub();
      leave();
      controls.removeEventListener('change', onChange);
      controls.dispose();
      el.removeEventListener('pointerdown', onDown);
      el.removeEventListener('pointerup', onUp);
      if (live.current.settle) clearTimeout(live.current.settle);
      scene.remove(regions.object, field.object, axons.object);
      axons.dispose();
      regions.dispose();
      field.dispose();
    };
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [built]);

  // A resize clears the canvas: draw again (the first size is the mount, already drawing).
  const sized = useRef(false);
  useEffect(() => {
    if (!sized.current) {
      sized.current = true;
      return;
    }
    progressive.still();
    invalidate();
  }, [size.width, size.height]);

  function applyState(s: ViewState, prev: ViewState | null) {
    const { axons, regions } = built;
    let still = false, moving = false;
    if (!prev || s.hiddenPops !== prev.hiddenPops || s.hiddenStatuses !== prev.hiddenStatuses) {
      live.current.mask = visibleMask(model, s.hiddenPops, s.hiddenStatuses);
      axons.setVisible(live.current.mask);
      still = true;
    }
    if (!prev || s.timeH !== prev.timeH) {
      axons.setFrame(frameAt(model.times, s.timeH));
      if (s.playing || performance.now() - s.lastMotion < SETTLE_MS) moving = true;
      else still = true;
    }
    if (prev && prev.playing && !s.playing) still = true;
    if (!prev || s.selected !== prev.selected) {
      axons.setSelected(s.selected);
      still = true;
    }
    if (!prev || s.showTips !== prev.showTips) {
      axons.setTipsVisible(s.showTips);
      still = true;
    }
    if (!prev || s.hiddenRegions !== prev.hiddenRegions || s.showBox !== prev.showBox) {
      regions.setHidden(s.hiddenRegions, s.showBox);
      still = true;
    }
    if (prev && (s.camera !== prev.camera || s.cameraRevision !== prev.cameraRevision)) {
      applyPreset(s);
      still = true;
    }
    if (!prev || s.cue !== prev.cue || s.sliceAxis !== prev.sliceAxis || s.sliceFrac !== prev.sliceFrac || s.logScale !== prev.logScale
      || s.showSlice !== prev.showSlice || s.showIso !== prev.showIso || s.isoFrac !== prev.isoFrac) {
      void updateField(s);
    }
    if (!prev) return;
    if (moving) {
      progressive.moving();
      settleSoon();
      invalidate();
    } else if (still) {
      progressive.still();
      invalidate();
    }
  }

  async function updateField(s: ViewState) {
    const has = s.cue !== null && model.run.fieldInfos.some((f) => f.cue === s.cue);
    const grid = has ? await model.run.field(s.cue!).catch(() => null) : null;
    if (store.get().cue !== s.cue) return; // a newer choice arrived meanwhile
    built.field.show(grid, { axis: s.sliceAxis, frac: s.sliceFrac, log: s.logScale, showSlice: s.showSlice, showIso: s.showIso, isoFrac: s.isoFrac });
    if (performance.now() - s.lastMotion < SETTLE_MS) {
      progressive.moving();
      settleSoon();
    } else progressive.still();
    invalidate();
  }

  useFrame(() => {
    if (!progressive.busy) return;
    const timings = window.__axonloom?.timings;
    if (!live.current.ready && timings) {
      // Compiling the shaders is the largest one-off cost of the first frame in software WebGL;
      // timed on its own so the benchmark can say where the time goes.
      const t0 = performance.now();
      gl.compile(scene, cam);
      gl.compile(built.refineScene, cam);
      timings[`compile:${p.viewIndex}`] = performance.now() - t0;
      const t1 = performance.now();
      built.axons.uploadPositions(gl, cam);
      timings[`upload:${p.viewIndex}`] = performance.now() - t1;
      timings[`firstDrawStart:${p.viewIndex}`] = performance.now();
    }
    progressive.step(cam);
    if (!live.current.ready && timings) {
      timings[`firstPrepare:${p.viewIndex}`] = progressive.lastPrepareMs;
      timings[`firstDraw:${p.viewIndex}`] = window.__axonloom?.reports[p.viewIndex]?.[0]?.frameMs ?? NaN;
    }
    updateLabels(p.labelsRef.current, built.regions.labels, cam, size, store.get().hiddenRegions);
    if (cam.zoom !== live.current.zoom) {
      live.current.zoom = cam.zoom;
      p.onScale(scaleBar(cam.zoom));
    }
    if (!live.current.ready) {
      live.current.ready = true;
      p.onReady();
      if (!store.get().playing) progressive.still();
    }
    if (progressive.busy) invalidate();
  }, 1);

  return null;
}

/** Records a time for the benchmark (ms since navigation started). */
function mark(name: string): void {
  const t = window.__axonloom?.timings;
  if (t && !(name in t)) t[name] = performance.now();
}

const tmp = new THREE.Vector3();
/** Places the region and axis labels over the canvas (HTML text stays crisp and readable). */
function updateLabels(host: HTMLDivElement | null, labels: RegionLabel[], cam: THREE.Camera, size: { width: number; height: number }, hidden: ReadonlySet<string>) {
  if (!host) return;
  if (host.childElementCount !== labels.length) {
    host.replaceChildren(...labels.map((l) => {
      const s = document.createElement('span');
      s.className = `label label-${l.role}`;
      s.textContent = l.text;
      return s;
    }));
  }
  labels.forEach((l, i) => {
    const el = host.children[i] as HTMLElement;
    tmp.copy(l.position).project(cam);
    const off = !(tmp.z >= -1 && tmp.z <= 1) || (l.region !== undefined && hidden.has(l.region));
    const display = off ? 'none' : '';
    if (el.style.display !== display) el.style.display = display;
    const t = `translate(${Math.round(((tmp.x + 1) / 2) * size.width)}px, ${Math.round(((1 - tmp.y) / 2) * size.height)}px) translate(-50%, -50%)`;
    if (el.style.transform !== t) el.style.transform = t; // unchanged labels cost nothing
  });
}
