// The narrow, named API the renderer sees as `window.hingeplan`. Built over a transport (Electron's
// ipcRenderer in the preload; page bindings in the e2e harness) so both expose exactly the same thing.
// Requests are checked before they leave and answers are checked when they arrive.

import {
  parseEnvelope,
  parseEvent,
  parseRequest,
  type Channel,
  type Envelope,
  type EventName,
  type EventOf,
  type RequestOf,
  type ResponseOf,
} from './contract';

export interface Transport {
  invoke(channel: Channel, payload: unknown): Promise<unknown>;
  /** subscribe to a main → renderer event; returns the unsubscribe function */
  on(event: EventName, listener: (payload: unknown) => void): () => void;
}

export type Call<C extends Channel> = (request: RequestOf<C>) => Promise<Envelope<ResponseOf<C>>>;

export interface HingeplanApi {
  startup: Call<'app:startup'>;
  newDocument: Call<'doc:new'>;
  open: Call<'doc:open'>;
  openRecent: Call<'doc:open-recent'>;
  rereadDrawing: Call<'doc:reread-drawing'>;
  save: Call<'doc:save'>;
  exportFile: Call<'doc:export'>;
  exportChart: Call<'doc:export-chart'>;
  setDocumentState: Call<'doc:state'>;
  confirmDiscard: Call<'doc:confirm-discard'>;
  writeRecovery: Call<'recovery:write'>;
  clearRecovery: Call<'recovery:clear'>;
  restoreRecovery: Call<'recovery:restore'>;
  setPattern: Call<'pattern:set'>;
  solve: Call<'solve'>;
  branches: Call<'branches'>;
  sweep: Call<'sweep'>;
  tolerance: Call<'tolerance'>;
  shape: Call<'shape'>;
  cancelJob: Call<'job:cancel'>;
  copyText: Call<'clipboard:write'>;
  closeReady: Call<'app:close-ready'>;
  onProgress(listener: (event: EventOf<'job:progress'>) => void): () => void;
  onMenuCommand(listener: (event: EventOf<'menu:command'>) => void): () => void;
}

/** Which channel each named call uses; the preload exposes these names and nothing else. */
export const API_CHANNELS = {
  startup: 'app:startup',
  newDocument: 'doc:new',
  open: 'doc:open',
  openRecent: 'doc:open-recent',
  rereadDrawing: 'doc:reread-drawing',
  save: 'doc:save',
  exportFile: 'doc:export',
  exportChart: 'doc:export-chart',
  setDocumentState: 'doc:state',
  confirmDiscard: 'doc:confirm-discard',
  writeRecovery: 'recovery:write',
  clearRecovery: 'recovery:clear',
  restoreRecovery: 'recovery:restore',
  setPattern: 'pattern:set',
  solve: 'solve',
  branches: 'branches',
  sweep: 'sweep',
  tolerance: 'tolerance',
  shape: 'shape',
  cancelJob: 'job:cancel',
  copyText: 'clipboard:write',
  closeReady: 'app:close-ready',
} as const satisfies Record<string, Channel>;

function call<C extends Channel>(transport: Transport, channel: C): Call<C> {
  return async (request) => {
    const checked = parseRequest(channel, request);
    if (!checked.ok) return checked;
    let raw: unknown;
    try {
      raw = await transport.invoke(channel, checked.value);
    } catch (err) {
      return { ok: false, error: { code: 'ipc-failed', message: `${channel}: ${err instanceof Error ? err.message : String(err)}`, where: channel } };
    }
    return parseEnvelope(channel, raw);
  };
}

function subscribe<E extends EventName>(transport: Transport, name: E, listener: (event: EventOf<E>) => void): () => void {
  return transport.on(name, (payload) => {
    const event = parseEvent(name, payload);
    if (event) listener(event);
  });
}

export function createHingeplanApi(transport: Transport): HingeplanApi {
  const calls = Object.fromEntries(
    Object.entries(API_CHANNELS).map(([name, channel]) => [name, call(transport, channel)]),
  ) as unknown as Omit<HingeplanApi, 'onProgress' | 'onMenuCommand'>;
  // a frozen plain object: the page cannot swap a method for another
  return Object.freeze({
    ...calls,
    onProgress: (listener) => subscribe(transport, 'job:progress', listener),
    onMenuCommand: (listener) => subscribe(transport, 'menu:command', listener),
  } satisfies HingeplanApi);
}
