/**
 * The preload: the only bridge between the sandboxed page and the main
 * process. It exposes exactly two functions — call a contract method, listen
 * to a contract event — and nothing of ipcRenderer itself.
 */
import { contextBridge, ipcRenderer, type IpcRendererEvent } from 'electron';
import { CALL_CHANNEL, EVENT_CHANNEL } from './channels';
import { SERVICE_EVENT_NAMES } from '../app/contract/events';

const EVENT_NAMES = new Set<string>(SERVICE_EVENT_NAMES);

contextBridge.exposeInMainWorld('rolloff', {
  call(method: string, args: unknown[]): Promise<unknown> {
    return ipcRenderer.invoke(CALL_CHANNEL, String(method), Array.isArray(args) ? args : []);
  },
  on(event: string, listener: (payload: unknown) => void): () => void {
    if (!EVENT_NAMES.has(event)) throw new Error(`Unknown Rolloff event "${event}".`);
    const handler = (_e: IpcRendererEvent, name: string, payload: unknown) => {
      if (name === event) listener(payload);
    };
    ipcRenderer.on(EVENT_CHANNEL, handler);
    return () => ipcRenderer.removeListener(EVENT_CHANNEL, handler);
  },
});
