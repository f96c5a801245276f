// The preload's API as the renderer sees it. Every answer was already checked against the contract by the
// bridge (electron/bridge.ts) before it reaches the interface.
import type { HingeplanApi } from '../electron/bridge';

declare global {
  interface Window {
    hingeplan?: HingeplanApi;
  }
}

export function getApi(): HingeplanApi | undefined {
  return typeof window === 'undefined' ? undefined : window.hingeplan;
}

export type { HingeplanApi };
