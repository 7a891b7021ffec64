/**
 * The window's only way out: `window.railwright` when a desktop host's preload provides it,
 * otherwise the same interface over HTTP to the local web host (events as a server-sent
 * stream read with fetch). The host authenticates the window by the HttpOnly cookie its
 * one-time launch address set, together with the `x-railwright-request` header; a token
 * given in the address (tests) is taken once, removed from the address bar and sent as a
 * header.
 */
import type { ApiResult, EventName, Events, RailwrightBridge, RequestArgs, RequestName, RequestValue } from '../../src-main/api/contract.ts';

declare global {
  interface Window {
    railwright?: RailwrightBridge;
  }
}

const TOKEN_KEY = 'railwright-token';

function takeToken(): string {
  const url = new URL(location.href);
  const t = url.searchParams.get('token');
  if (t) {
    sessionStorage.setItem(TOKEN_KEY, t);
    url.searchParams.delete('token');
    history.replaceState(null, '', url.pathname + url.search + url.hash);
    return t;
  }
  return sessionStorage.getItem(TOKEN_KEY) ?? '';
}

function webBridge(): RailwrightBridge {
  const token = takeToken();
  const auth: Record<string, string> = token ? { 'x-railwright-request': '1', 'x-railwright-token': token } : { 'x-railwright-request': '1' };
  const listeners = new Map<string, Set<(p: unknown) => void>>();
  let streaming = false;

  async function stream(): Promise<void> {
    for (;;) {
      try {
        const res = await fetch('/api/events', { headers: auth, cache: 'no-store', credentials: 'same-origin' });
        if (!res.ok || !res.body) throw new Error(`events: ${res.status}`);
        const reader = res.body.pipeThrough(new TextDecoderStream()).getReader();
        let buf = '';
        for (;;) {
          const { value, done } = await reader.read();
          if (done) break;
          buf += value;
          let i: number;
          while ((i = buf.indexOf('\n\n')) >= 0) {
            const block = buf.slice(0, i);
            buf = buf.slice(i + 2);
            let ev = '';
            let data = '';
            for (const line of block.split('\n')) {
              if (line.startsWith('event: ')) ev = line.slice(7);
              else if (line.startsWith('data: ')) data += line.slice(6);
            }
            if (!ev || !data) continue;
            const payload = JSON.parse(data) as unknown;
            for (const l of listeners.get(ev) ?? []) l(payload);
          }
        }
      } catch {
        // The host went away or restarted: try again shortly.
      }
      await new Promise((r) => setTimeout(r, 1000));
    }
  }

  return {
    host: 'web',
    async request<K extends RequestName>(name: K, args: RequestArgs<K>): Promise<ApiResult<RequestValue<K>>> {
      try {
        const res = await fetch('/api/request', {
          method: 'POST',
          headers: { 'content-type': 'application/json', ...auth },
          credentials: 'same-origin',
          body: JSON.stringify({ name, args }),
        });
        if (res.status === 401) return { ok: false, error: { message: 'the host refused the request (token missing or wrong): open the address printed at start-up' } };
        return (await res.json()) as ApiResult<RequestValue<K>>;
      } catch (e) {
        return { ok: false, error: { message: `the host did not answer: ${(e as Error).message}` } };
      }
    },
    on<E extends EventName>(event: E, listener: (payload: Events[E]) => void) {
      if (!streaming) {
        streaming = true;
        void stream();
      }
      let set = listeners.get(event);
      if (!set) listeners.set(event, (set = new Set()));
      set.add(listener as (p: unknown) => void);
      return () => set.delete(listener as (p: unknown) => void);
    },
  };
}

export const bridge: RailwrightBridge = window.railwright ?? webBridge();
