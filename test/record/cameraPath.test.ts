// Camera paths, checked with three.js (a reference library): its orthographic camera projects the
// volume's corners to see the framing, its axis-angle rotation and quaternion slerp give the
// directions an orbit and a fly must follow.
import { describe, it, expect } from 'vitest';
import * as THREE from 'three';
import { cameraPathPose, fitZoom, orbitZoom, type CameraPath } from '../../viewer/record/cameraPath.ts';
import { CAMERA_PRESETS, presetPose, type CameraPose } from '../../viewer/geometry/cameraPresets.ts';

type V3 = [number, number, number];
const size: V3 = [1000, 500, 500];
const viewport = { width: 1280, height: 720 };

/** Largest |x| and |y| of the volume's corners in normalised device coordinates, as three.js's
 *  orthographic camera projects them (frustum = viewport in pixels, zoom = px per µm). */
function extentNdc(pose: CameraPose, vp = viewport): { x: number; y: number } {
  const cam = new THREE.OrthographicCamera(-vp.width / 2, vp.width / 2, vp.height / 2, -vp.height / 2, 1, 1e6);
  cam.up.set(...pose.up);
  cam.position.set(...pose.position);
  cam.zoom = pose.zoom;
  cam.lookAt(...pose.target);
  cam.updateProjectionMatrix();
  cam.updateMatrixWorld();
  let x = 0, y = 0;
  for (let c = 0; c < 8; c++) {
    const p = new THREE.Vector3(c & 1 ? size[0] : 0, c & 2 ? size[1] : 0, c & 4 ? size[2] : 0).project(cam);
    x = Math.max(x, Math.abs(p.x));
    y = Math.max(y, Math.abs(p.y));
  }
  return { x, y };
}

const dirOf = (p: CameraPose) => new THREE.Vector3(...p.position).sub(new THREE.Vector3(...p.target)).normalize();

describe('camera paths', () => {
  it("fitZoom agrees with the viewer's presets, and fills 86 % of the tighter side", () => {
    for (const name of CAMERA_PRESETS) {
      const pose = presetPose(name, size, viewport);
      expect(fitZoom(dirOf(pose).toArray() as V3, size, viewport)).toBeCloseTo(pose.zoom, 9);
      const e = extentNdc(pose);
      expect(Math.max(e.x, e.y)).toBeCloseTo(0.86, 6);
    }
  });

  it('a still path is its preset for the whole video', () => {
    const path: CameraPath = { kind: 'still', preset: 'side' };
    expect(cameraPathPose(path, 0.37, size, viewport)).toEqual(presetPose('side', size, viewport, 0.86));
  });

  it('an orbit turns about +z through the centre at a constant distance, and never lets the volume out of the frame', () => {
    const path: CameraPath = { kind: 'orbit', preset: 'oblique', turns: 1 };
    const start = presetPose('oblique', size, viewport);
    const d0 = dirOf(start);
    const dist0 = new THREE.Vector3(...start.position).distanceTo(new THREE.Vector3(...start.target));
    let widest = 0;
    for (let k = 0; k <= 96; k++) {
      const s = k / 96;
      const pose = cameraPathPose(path, s, size, viewport);
      const expected = d0.clone().applyAxisAngle(new THREE.Vector3(0, 0, 1), 2 * Math.PI * s);
      expect(dirOf(pose).distanceTo(expected)).toBeLessThan(1e-9);
      expect(new THREE.Vector3(...pose.position).distanceTo(new THREE.Vector3(...pose.target))).toBeCloseTo(dist0, 6);
      expect(pose.target).toEqual(start.target);
      const e = extentNdc(pose);
      widest = Math.max(widest, e.x, e.y);
      expect(Math.max(e.x, e.y)).toBeLessThanOrEqual(0.86 + 1e-3);
      expect(pose.zoom).toBe(cameraPathPose(path, 0, size, viewport).zoom); // the scale bar stays put
    }
    // and the zoom is the tightest fit of the turn, not needlessly small
    expect(widest).toBeGreaterThan(0.85);
    expect(orbitZoom(d0.toArray() as V3, size, viewport)).toBeLessThanOrEqual(start.zoom);
  });

  it('a fly starts and ends on its presets and turns along the great circle between them', () => {
    const path: CameraPath = { kind: 'fly', from: 'top', to: 'side' };
    const a = presetPose('top', size, viewport), b = presetPose('side', size, viewport);
    const p0 = cameraPathPose(path, 0, size, viewport), p1 = cameraPathPose(path, 1, size, viewport);
    for (let c = 0; c < 3; c++) {
      expect(p0.position[c]).toBeCloseTo(a.position[c], 6);
      expect(p1.position[c]).toBeCloseTo(b.position[c], 6);
    }
    expect(p0.zoom).toBeCloseTo(a.zoom, 9);
    expect(p1.zoom).toBeCloseTo(b.zoom, 9);
    // three.js's quaternion slerp from identity to the rotation taking a's direction to b's
    const da = dirOf(a), db = dirOf(b);
    const q = new THREE.Quaternion().setFromUnitVectors(da, db);
    for (const s of [0.1, 0.25, 0.5, 0.8]) {
      const u = (1 - Math.cos(Math.PI * s)) / 2; // the path's easing
      const expected = da.clone().applyQuaternion(new THREE.Quaternion().slerp(q, u));
      expect(dirOf(cameraPathPose(path, s, size, viewport)).distanceTo(expected)).toBeLessThan(1e-9);
      const z = cameraPathPose(path, s, size, viewport).zoom;
      expect(z).toBeCloseTo(a.zoom * (b.zoom / a.zoom) ** u, 9); // geometric: equal steps look equal
    }
  });
});
