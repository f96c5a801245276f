// A minimal store around the pure reducer: the controller reads and dispatches synchronously, the views
// subscribe to the slices they draw (useSyncExternalStore).

import { useSyncExternalStore } from 'react';
import { initialState, reducer, type Action, type AppState } from './app';

export interface Store {
  getState(): AppState;
  dispatch(action: Action): void;
  subscribe(listener: () => void): () => void;
}

export function createStore(state: AppState = initialState): Store {
  const listeners = new Set<() => void>();
  return {
    getState: () => state,
    dispatch(action) {
      const next = reducer(state, action);
      if (next === state) return;
      state = next;
      for (const l of [...listeners]) l();
    },
    subscribe(listener) {
      listeners.add(listener);
      return () => listeners.delete(listener);
    },
  };
}

export function useStore<T>(store: Store, select: (s: AppState) => T): T {
  return useSyncExternalStore(store.subscribe, () => select(store.getState()));
}
