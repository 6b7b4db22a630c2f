// A minimal observable store: one state object, replaced (never mutated) on every change, and a
// React hook that re-renders a component only when the slice it reads changes.
import { useSyncExternalStore } from 'react';

export interface Store<S> {
  get(): S;
  set(patch: Partial<S> | ((s: S) => Partial<S>)): void;
  subscribe(listener: (s: S, prev: S) => void): () => void;
}

export function createStore<S extends object>(initial: S): Store<S> {
  let state = initial;
  const listeners = new Set<(s: S, prev: S) => void>();
  return {
    get: () => state,
    set(patch) {
      const p = typeof patch === 'function' ? patch(state) : patch;
      let changed = false;
      for (const k in p) if (!Object.is(p[k], state[k])) changed = true;
      if (!changed) return;
      const prev = state;
      state = { ...state, ...p };
      for (const l of listeners) l(state, prev);
    },
    subscribe(l) {
      listeners.add(l);
      return () => listeners.delete(l);
    },
  };
}

/** Reads `pick(state)` and re-renders when it changes (by Object.is). */
export function useStore<S, T>(store: Store<S>, pick: (s: S) => T): T {
  return useSyncExternalStore(store.subscribe, () => pick(store.get()), () => pick(store.get()));
}
