// Shader warm-up: while a run is still downloading, the 3D view's renderer compiles the very
// programs the real scene will use, from a two-axon stand-in scene. Software WebGL takes about a
// second to compile them; done in parallel with the download, the first real frame skips it.
// three.js reuses a compiled program for any material with the same program key, so the stand-in
// must match the real scene in everything that enters the key (materials, and the lights).
import * as THREE from 'three';
import type { RunModel } from '../model/runModel.ts';
import { AxonLayer } from '../geometry/axonLayer.ts';
import { RegionLayer } from '../geometry/regionLayer.ts';
import { FieldLayer } from '../geometry/fieldLayer.ts';
import type { Region, SheetRegion } from '../../engine/scene/schema.ts';

/** Compiles and draws the stand-in scene; its objects are kept (not disposed) so the programs
 *  stay alive until the real materials take them over. Resolves when the GPU has finished. */
export function warmUpShaders(renderer: THREE.WebGLRenderer, camera: THREE.Camera): Promise<void> {
  const m = standInModel();
  const axons = new AxonLayer(m);
  axons.setSelected(0);
  axons.useSample(1e9);
  axons.useFull();
  const regions = new RegionLayer(m);
  const field = new FieldLayer(m.regions.filter((r): r is SheetRegion => r.shape === 'sheet'));
  const scene = new THREE.Scene();
  axons.prepareRefineTips();
  scene.add(regions.object, field.object, axons.object, axons.refineObject, axons.refineTips);
  kept.push({ axons, regions, field });
  // Compiling the programs is not all: SwiftShader also builds a pipeline for each program and
  // draw state (points or lines, blending, depth writes) at its first draw, so the stand-in is
  // drawn too, every object once, with the states the real scene uses.
  renderer.compile(scene, camera);
  axons.setFrame(1);
  renderer.render(scene, camera);
  const auto = renderer.autoClear;
  renderer.autoClear = false;
  renderer.render(scene, camera);
  renderer.autoClear = auto;
  return new Promise((resolve) => {
    // wait (without blocking the page) for the GPU process to get through it
    const gl = renderer.getContext() as WebGL2RenderingContext;
    const sync = gl.fenceSync(gl.SYNC_GPU_COMMANDS_COMPLETE, 0);
    gl.flush();
    const poll = () => {
      const s = sync ? gl.clientWaitSync(sync, 0, 0) : gl.ALREADY_SIGNALED;
      if (s === gl.ALREADY_SIGNALED || s === gl.CONDITION_SATISFIED || s === gl.WAIT_FAILED) {
        if (sync) gl.deleteSync(sync);
        resolve();
      } else setTimeout(poll, 20);
    };
    poll();
  });
}

const kept: unknown[] = [];

function standInModel(): RunModel {
  const sheet = (name: string, x: number): SheetRegion => ({ name, permissive: true, shape: 'sheet', origin: [x, 0, 0], uAxis: [0, 1, 0], vAxis: [0, 0, 1] });
  const regions: Region[] = [
    sheet('a', 0), sheet('b', 2),
    { name: 'w', permissive: false, shape: 'box', min: [1, 0, 0], max: [1.2, 1, 1] },
    { name: 'e', permissive: true, shape: 'ellipsoid', center: [1, 1, 1], radii: [0.2, 0.2, 0.2] },
  ];
  const roles = new Map([['a', 'source'], ['b', 'target'], ['w', 'wall'], ['e', 'region']] as const);
  return {
    N: 2, F: 2, size: [2, 1, 1], regions, roles: new Map(roles),
    positions: Float32Array.from([0, 0.2, 0.2, 0, 0.8, 0.8, 2, 0.3, 0.3, 2, 0.7, 0.7]),
    colours: Uint8Array.from([200, 100, 50, 255, 50, 100, 200, 255]),
    firstMove: Int32Array.from([0, 0]), lastMove: Int32Array.from([1, 1]), statusOf: Uint8Array.from([0, 1]),
    order: Int32Array.from([0, 1]),
  } as unknown as RunModel;
}
