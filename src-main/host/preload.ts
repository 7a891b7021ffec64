/**
 * Preload of the desktop window (sandboxed; bundled to CommonJS). Exposes exactly one
 * object, `window.railwright`, that satisfies the contract's bridge; nothing of Electron
 * or Node leaks into the page.
 */
import { contextBridge, ipcRenderer, type IpcRendererEvent } from 'electron';
import type { ApiResult, EventName, Events, RailwrightBridge, RequestArgs, RequestName, RequestValue } from '../api/contract.ts';

const REQUEST_CHANNEL = 'railwright:request';
const EVENT_CHANNEL = 'railwright:event';
const DIALOG_CHANNEL = 'railwright:choose-path';

const listeners = new Map<string, Set<(p: unknown) => void>>();
ipcRenderer.on(EVENT_CHANNEL, (_e: IpcRendererEvent, event: string, payload: unknown) => {
  for (const l of listeners.get(event) ?? []) l(payload);
});

const bridge = {
  host: 'electron' as const,
  request<K extends RequestName>(name: K, args: RequestArgs<K>): Promise<ApiResult<RequestValue<K>>> {
    return ipcRenderer.invoke(REQUEST_CHANNEL, name, args) as Promise<ApiResult<RequestValue<K>>>;
  },
  on<E extends EventName>(event: E, listener: (payload: Events[E]) => void): () => void {
    let set = listeners.get(event);
    if (!set) listeners.set(event, (set = new Set()));
    const l = listener as (p: unknown) => void;
    set.add(l);
    return () => set.delete(l);
  },
  choosePath(purpose: 'open-project' | 'save-project' | 'export', suggestedName: string): Promise<string | null> {
    return ipcRenderer.invoke(DIALOG_CHANNEL, purpose, suggestedName) as Promise<string | null>;
  },
} satisfies RailwrightBridge;

contextBridge.exposeInMainWorld('railwright', bridge);
