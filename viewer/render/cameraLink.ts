// Keeps the cameras of side-by-side views in step: whichever view the person turns, the others
// follow, so a variant and its normal run are always seen from the same place.
import type * as THREE from 'three';

export interface CameraState {
  position: [number, number, number];
  target: [number, number, number];
  zoom: number;
}

type Listener = (s: CameraState, from: number) => void;

export class CameraLink {
  private listeners = new Map<number, Listener>();
  private next = 1;
  last: CameraState | null = null;

  /** Registers a view; returns its id and a function that unregisters it. */
  join(onChange: Listener): [number, () => void] {
    const id = this.next++;
    this.listeners.set(id, onChange);
    return [id, () => this.listeners.delete(id)];
  }

  publish(from: number, camera: THREE.OrthographicCamera, target: THREE.Vector3): void {
    const s: CameraState = {
      position: [camera.position.x, camera.position.y, camera.position.z],
      target: [target.x, target.y, target.z],
      zoom: camera.zoom,
    };
    this.last = s;
    for (const [id, l] of this.listeners) if (id !== from) l(s, from);
  }
}
