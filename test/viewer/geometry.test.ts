import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import seedrandom from 'seedrandom';
import * as THREE from 'three';
import { buildPathIndex, tailIndex, motionSpan } from '../../viewer/geometry/pathIndex.ts';
import { spreadOrder } from '../../viewer/geometry/spreadOrder.ts';
import { pickPath, pickPoint2d } from '../../viewer/geometry/pick.ts';
import { scaleBar } from '../../viewer/geometry/scaleBar.ts';
import { presetPose, CAMERA_PRESETS } from '../../viewer/geometry/cameraPresets.ts';
import { sliceVolume } from '../../viewer/geometry/fieldSlice.ts';
import { surfaceNets } from '../../viewer/geometry/surfaceNets.ts';

/** Random walks of N axons over F frames with stretches where an axon waits or has stopped. */
function walks(F: number, N: number, seed: string): Float32Array {
  const rng = seedrandom(seed);
  const out = new Float32Array(F * N * 3);
  for (let a = 0; a < N; a++) {
    const start = Math.floor(rng() * F * 0.4), stop = start + Math.floor(rng() * (F - start));
    let x = rng() * 100, y = rng() * 100, z = rng() * 100;
    for (let f = 0; f < F; f++) {
      if (f > start && f <= stop) {
        x += rng() - 0.5;
        y += rng() - 0.5;
        z += rng();
      }
      out.set([x, y, z], (f * N + a) * 3);
    }
  }
  return out;
}

const moved = (p: Float32Array, i: number, j: number) => p[i * 3] !== p[j * 3] || p[i * 3 + 1] !== p[j * 3 + 1] || p[i * 3 + 2] !== p[j * 3 + 2];

describe('path index', () => {
  it('a prefix draws exactly the moving segments that end by that frame (brute force)', () => {
    fc.assert(fc.property(fc.integer({ min: 2, max: 12 }), fc.integer({ min: 1, max: 9 }), fc.integer({ min: 1, max: 4 }), fc.string(), (F, N, stride, seed) => {
      const p = walks(F, N, seed);
      const idx = buildPathIndex(p, F, N, null, stride);
      for (let f = 0; f < F; f++) {
        const got = new Set<string>();
        for (let k = 0; k < idx.prefixEnd[f]; k += 2) got.add(`${idx.index[k]}-${idx.index[k + 1]}`);
        const want = new Set<string>();
        for (let e = stride; e <= f; e += stride) for (let a = 0; a < N; a++) {
          const i = (e - stride) * N + a, j = e * N + a;
          if (moved(p, i, j)) want.add(`${i}-${j}`);
        }
        expect(got).toEqual(want);
      }
    }));
  });

  it('a thinned path plus its tail joins the first frame to the shown frame', () => {
    const F = 40, N = 6, stride = 7;
    const p = walks(F, N, 'tail');
    const axons = Int32Array.from([0, 2, 5]);
    const idx = buildPathIndex(p, F, N, axons, stride);
    const tail = new Uint32Array(2 * N);
    for (let f = 0; f < F; f++) {
      const n = tailIndex(p, N, axons, stride, f, tail);
      for (const a of axons) {
        // follow the chain of segments of axon a from frame 0: it must end where the axon is at f
        let at = a;
        const segs: [number, number][] = [];
        for (let k = 0; k < idx.prefixEnd[f]; k += 2) if (idx.index[k] % N === a) segs.push([idx.index[k], idx.index[k + 1]]);
        for (let k = 0; k < n; k += 2) if (tail[k] % N === a) segs.push([tail[k], tail[k + 1]]);
        for (const [i, j] of segs.sort((s, t) => s[0] - t[0])) {
          expect(p.slice(i * 3, i * 3 + 3)).toEqual(p.slice(at * 3, at * 3 + 3)); // each segment starts where the last ended
          at = j;
        }
        expect(p.slice(at * 3, at * 3 + 3)).toEqual(p.slice((f * N + a) * 3, (f * N + a) * 3 + 3));
      }
    }
  });

  it('motion span is the first and last frame of movement (brute force)', () => {
    const F = 30, N = 8;
    const p = walks(F, N, 'span');
    const { first, last } = motionSpan(p, F, N);
    for (let a = 0; a < N; a++) {
      let f0 = -1, f1 = -1;
      for (let f = 1; f < F; f++) if (moved(p, (f - 1) * N + a, f * N + a)) {
        if (f0 < 0) f0 = f - 1;
        f1 = f;
      }
      expect([first[a], last[a]]).toEqual([f0, f1]);
    }
  });
});

describe('spread order', () => {
  it('is a permutation whose prefixes cover the source sheet level by level', () => {
    const rng = seedrandom('spread');
    const n = 2000;
    const u = Float64Array.from({ length: n }, () => rng()), v = Float64Array.from({ length: n }, () => rng());
    const group = Uint16Array.from({ length: n }, () => (rng() < 0.5 ? 0 : 1));
    const order = spreadOrder(u, v, group);
    expect([...order].sort((a, b) => a - b)).toEqual([...Array(n).keys()]);
    // level l of the quadtree: once 1 + 4 + … + 4^l cells per group were filled, every
    // non-empty cell of that level holds a chosen axon of each group present there.
    for (const level of [1, 2, 3]) {
      const side = 1 << level;
      const cellsUpTo = ((4 ** (level + 1) - 1) / 3) * 2;
      const chosen = new Set<string>();
      for (let i = 0; i < Math.min(n, cellsUpTo); i++) {
        const a = order[i];
        chosen.add(`${group[a]}:${Math.min(side - 1, Math.floor(u[a] * side))}:${Math.min(side - 1, Math.floor(v[a] * side))}`);
      }
      for (let a = 0; a < n; a++) {
        expect(chosen.has(`${group[a]}:${Math.min(side - 1, Math.floor(u[a] * side))}:${Math.min(side - 1, Math.floor(v[a] * side))}`)).toBe(true);
      }
    }
  });
});

describe('picking', () => {
  it('projects as three.js does and finds the nearest path point (brute force)', () => {
    // reference: three's own Vector3.project with an orthographic camera
    const cam = new THREE.OrthographicCamera(-400, 400, 300, -300, 1, 5000);
    cam.position.set(800, -900, 700);
    cam.up.set(0, 0, 1);
    cam.zoom = 1.7;
    cam.lookAt(300, 200, 200);
    cam.updateProjectionMatrix();
    cam.updateMatrixWorld();
    const vp = new THREE.Matrix4().multiplyMatrices(cam.projectionMatrix, cam.matrixWorldInverse);
    const F = 20, N = 15, W = 800, H = 600;
    const p = walks(F, N, 'pick').map((x) => x * 4);
    const rng = seedrandom('clicks');
    for (let t = 0; t < 50; t++) {
      const px = rng() * W, py = rng() * H, last = Math.floor(rng() * F);
      let best = -1, bestD = 40;
      const q = new THREE.Vector3();
      for (let f = 0; f <= last; f++) for (let a = 0; a < N; a++) {
        q.set(p[(f * N + a) * 3], p[(f * N + a) * 3 + 1], p[(f * N + a) * 3 + 2]).project(cam);
        const d = Math.hypot((q.x + 1) / 2 * W - px, (1 - q.y) / 2 * H - py);
        if (d < bestD) {
          bestD = d;
          best = a;
        }
      }
      const hit = pickPath(p, F, N, last, null, vp.elements, W, H, px, py, 40);
      expect(hit?.axon ?? -1).toBe(best);
      if (hit) expect(hit.distancePx).toBeCloseTo(bestD, 6);
    }
  });
  it('skips hidden axons', () => {
    expect(pickPoint2d([0, 10], [0, 0], Uint8Array.from([0, 1]), 1, 0, 20)).toBe(1);
    expect(pickPoint2d([0, 10], [0, 0], null, 1, 0, 20)).toBe(0);
    expect(pickPoint2d([0, 10], [0, 0], null, 100, 0, 20)).toBe(-1);
  });
});

describe('scale bar', () => {
  it('is the longest 1-2-5 length that fits', () => {
    fc.assert(fc.property(fc.double({ min: 1e-3, max: 1e3, noNaN: true }), fc.integer({ min: 40, max: 300 }), (pxPerUm, maxPx) => {
      const b = scaleBar(pxPerUm, maxPx)!;
      expect(b.px).toBeLessThanOrEqual(maxPx * (1 + 1e-9));
      const mant = b.um / 10 ** Math.floor(Math.log10(b.um) + 1e-12);
      expect([1, 2, 5].some((m) => Math.abs(mant - m) < 1e-6)).toBe(true);
      const next = mant === 1 ? 2 : mant === 2 ? 5 : 10;
      expect((b.um / mant) * next * pxPerUm).toBeGreaterThan(maxPx);
    }));
    expect(scaleBar(1.3, 140)?.label).toBe('100 µm');
    expect(scaleBar(0.05, 140)?.label).toBe('2 mm');
  });
});

describe('camera presets', () => {
  it('show the whole volume and fill most of the view (checked with three.js projection)', () => {
    const size: [number, number, number] = [1000, 500, 500];
    for (const name of CAMERA_PRESETS) {
      const W = 1000, H = 520;
      const pose = presetPose(name, size, { width: W, height: H });
      const cam = new THREE.OrthographicCamera(-W / 2, W / 2, H / 2, -H / 2, 1, 1e5);
      cam.up.set(...pose.up);
      cam.position.set(...pose.position);
      cam.zoom = pose.zoom;
      cam.lookAt(...pose.target);
      cam.updateProjectionMatrix();
      cam.updateMatrixWorld();
      let maxX = 0, maxY = 0;
      for (let c = 0; c < 8; c++) {
        const q = new THREE.Vector3(c & 1 ? size[0] : 0, c & 2 ? size[1] : 0, c & 4 ? size[2] : 0).project(cam);
        expect(Math.abs(q.x)).toBeLessThanOrEqual(1);
        expect(Math.abs(q.y)).toBeLessThanOrEqual(1);
        expect(q.z).toBeGreaterThan(-1);
        expect(q.z).toBeLessThan(1);
        maxX = Math.max(maxX, Math.abs(q.x));
        maxY = Math.max(maxY, Math.abs(q.y));
      }
      expect(Math.max(maxX, maxY), name).toBeCloseTo(0.86, 2);
    }
  });
});

describe('field slice', () => {
  it('is exact for a linear field at any plane position (linear interpolation is exact there), clamped at the grid', () => {
    const nx = 6, ny = 5, nz = 4, h = 10, o: [number, number, number] = [5, -3, 2];
    const f = (x: number, y: number, z: number) => 0.3 * x - 1.2 * y + 2.5 * z + 7;
    const data = new Float32Array(nx * ny * nz);
    for (let k = 0; k < nz; k++) for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++) data[(k * ny + j) * nx + i] = f(o[0] + i * h, o[1] + j * h, o[2] + k * h);
    for (const [axis, at] of [['x', 17.5], ['y', 12.25], ['z', 23]] as const) {
      const s = sliceVolume({ data, nx, ny, nz, origin: o, spacing: h }, axis, at);
      expect(s.at).toBeCloseTo(at, 10);
      for (let r = 0; r < s.height; r++) for (let c = 0; c < s.width; c++) {
        const p = { x: 0, y: 0, z: 0 };
        p[axis] = at;
        p[s.across] = s.acrossRange[0] + c * h;
        p[s.up] = s.upRange[0] + r * h;
        expect(s.values[r * s.width + c]).toBeCloseTo(f(p.x, p.y, p.z), 3);
      }
    }
    // beyond the last plane the slice stays on it
    expect(sliceVolume({ data, nx, ny, nz, origin: o, spacing: h }, 'z', 99).at).toBe(o[2] + (nz - 1) * h);
  });
});

describe('isosurface (surface nets)', () => {
  it('of a sphere: vertices on the sphere, surface closed and consistently oriented, Euler characteristic 2', () => {
    const n = 24, h = 1, R = 7.3, c = 11.7;
    const data = new Float32Array(n * n * n);
    for (let k = 0; k < n; k++) for (let j = 0; j < n; j++) for (let i = 0; i < n; i++) data[(k * n + j) * n + i] = R - Math.hypot(i - c, j - c, k - c);
    const mesh = surfaceNets(data, n, n, n, 0, [0, 0, 0], h);
    const V = mesh.positions.length / 3;
    expect(V).toBeGreaterThan(200);
    for (let v = 0; v < V; v++) {
      const r = Math.hypot(mesh.positions[v * 3] - c, mesh.positions[v * 3 + 1] - c, mesh.positions[v * 3 + 2] - c);
      expect(Math.abs(r - R)).toBeLessThan(0.5 * h); // a vertex sits within its cell, at edge crossings
    }
    // every directed edge appears once and its reverse once: a closed, orientable, consistently
    // wound surface; then V − E + F = 2 for a sphere (Euler's polyhedron formula)
    const directed = new Map<string, number>();
    const T = mesh.indices.length / 3;
    for (let t = 0; t < T; t++) for (let e = 0; e < 3; e++) {
      const a = mesh.indices[t * 3 + e], b = mesh.indices[t * 3 + ((e + 1) % 3)];
      directed.set(`${a}>${b}`, (directed.get(`${a}>${b}`) ?? 0) + 1);
    }
    for (const [k, count] of directed) {
      expect(count, k).toBe(1);
      const [a, b] = k.split('>');
      expect(directed.get(`${b}>${a}`), k).toBe(1);
    }
    const E = directed.size / 2;
    expect(V - E + T).toBe(2);
    // outward orientation: the winding's normals point away from the centre (higher values inside)
    let outward = 0;
    for (let t = 0; t < T; t++) {
      const [a, b, d] = [mesh.indices[t * 3], mesh.indices[t * 3 + 1], mesh.indices[t * 3 + 2]].map((i) => new THREE.Vector3().fromArray(mesh.positions, i * 3));
      const nrm = b.clone().sub(a).cross(d.clone().sub(a));
      if (nrm.dot(a.clone().sub(new THREE.Vector3(c, c, c))) > 0) outward++;
    }
    expect(outward === T || outward === 0).toBe(true);
  });
});
