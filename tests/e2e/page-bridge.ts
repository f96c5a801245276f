// Injected into the page before the renderer starts: the very API the preload exposes (electron/bridge.ts),
// over the harness's page binding instead of Electron's IPC. Events from Node arrive through __hpEmit.
import { createHingeplanApi } from '../../electron/bridge';
import type { Channel, EventName } from '../../electron/contract';

type Listener = (payload: unknown) => void;

// functions that tests send with page.evaluate() are compiled by tsx, which names them through a helper
// `__name`; the page needs it too
(globalThis as unknown as { __name?: (f: unknown) => unknown }).__name ??= (f) => f;
const w = window as unknown as {
  __hpInvoke(channel: Channel, payload: unknown): Promise<unknown>;
  __hpEmit(event: EventName, payload: unknown): void;
  hingeplan: unknown;
};
const listeners = new Map<EventName, Set<Listener>>();

w.__hpEmit = (event, payload) => {
  for (const l of listeners.get(event) ?? []) l(payload);
};

w.hingeplan = createHingeplanApi({
  invoke: (channel, payload) => w.__hpInvoke(channel, payload),
  on(event, listener) {
    if (!listeners.has(event)) listeners.set(event, new Set());
    listeners.get(event)!.add(listener);
    return () => listeners.get(event)!.delete(listener);
  },
});
