// The preload: the only code with access to Electron in the renderer process. It exposes the named API of
// electron/bridge.ts as `window.hingeplan` and nothing else (no ipcRenderer, no generic invoke).
import { contextBridge, ipcRenderer, type IpcRendererEvent } from 'electron';
import { createHingeplanApi } from './bridge';

const api = createHingeplanApi({
  invoke: (channel, payload) => ipcRenderer.invoke(channel, payload),
  on: (event, listener) => {
    const handler = (_e: IpcRendererEvent, payload: unknown) => listener(payload);
    ipcRenderer.on(event, handler);
    return () => {
      ipcRenderer.removeListener(event, handler);
    };
  },
});

contextBridge.exposeInMainWorld('hingeplan', api);
