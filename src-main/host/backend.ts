/**
 * The backend child process of the desktop shell. It runs under plain Node (the same Node
 * that installed better-sqlite3, so the native module's ABI matches), owns the session,
 * the store and the handlers, and answers the Electron main process over the IPC channel.
 * Paths are accepted only when the main process approved them (a native dialog result or
 * a recent file), after the usual normalisation.
 */
import { homedir } from 'node:os';
import { join, resolve } from 'node:path';
import { mkdirSync } from 'node:fs';
import { createApi } from '../api/index.ts';
import { autosave, clearRecovery, openAtStart } from '../api/files.ts';
import { ApiFailure } from '../api/registry.ts';
import { makePathPolicy } from './paths.ts';
import type { FromBackend, ToBackend } from './backend-protocol.ts';

export interface BackendOptions {
  userDataDir: string;
  send: (m: FromBackend) => void;
  autosaveMs?: number;
}

/** The backend's message handler (also used in tests without a child process). */
export function createBackend(opts: BackendOptions) {
  const approved = new Set<string>();
  mkdirSync(join(opts.userDataDir, 'projects'), { recursive: true });
  const base = makePathPolicy({ allowedRoots: [homedir(), opts.userDataDir, '/'], baseDir: opts.userDataDir });
  const api = createApi({
    host: 'electron',
    userDataDir: opts.userDataDir,
    autosaveMs: opts.autosaveMs ?? 30_000,
    emit: (event, payload) => opts.send({ type: 'event', event, payload }),
    pathPolicy: (raw, purpose, ext) => {
      const p = base(raw, purpose, ext);
      if (!approved.has(p) && !api.session.recent.includes(p)) {
        throw new ApiFailure('path: not chosen in a file dialog; use Open or Save as', 'path');
      }
      return p;
    },
  });
  const s = api.session;
  // Requests wait behind the start-up open (they go through the same queue).
  void s.serialise(() => openAtStart(s, { demoFile: join(opts.userDataDir, 'projects', 'demo.rwproj'), approve: (p) => approved.add(p), planFirstRun: true }));
  const timer = s.autosaveMs > 0 ? setInterval(() => void s.serialise(() => { try { autosave(s); } catch { /* retry next period */ } }), s.autosaveMs) : null;
  timer?.unref();

  return {
    api,
    async receive(m: unknown): Promise<void> {
      const msg = m as ToBackend;
      if (!msg || typeof msg !== 'object') return;
      if (msg.type === 'request' && Number.isInteger(msg.id)) {
        const result = await api.request(msg.name, msg.args);
        opts.send({ type: 'response', id: msg.id, result });
      } else if (msg.type === 'approve-path' && typeof msg.path === 'string') {
        approved.add(resolve(msg.path));
      } else if (msg.type === 'shutdown') {
        if (timer) clearInterval(timer);
        if (!s.dirty) clearRecovery(s);
      }
    },
    stop() {
      if (timer) clearInterval(timer);
    },
  };
}

// Started as a child process: wire to the IPC channel.
if (process.env.RAILWRIGHT_BACKEND === '1' && typeof process.send === 'function') {
  const send = (m: FromBackend) => process.send!(m);
  try {
    const b = createBackend({ userDataDir: process.env.RAILWRIGHT_DATA ?? join(homedir(), '.local', 'share', 'railwright'), send });
    process.on('message', (m) => void b.receive(m).catch((e) => send({ type: 'fatal', message: String((e as Error).message) })));
    process.on('disconnect', () => { b.stop(); process.exit(0); });
    send({ type: 'ready', pid: process.pid });
  } catch (e) {
    send({ type: 'fatal', message: String((e as Error).message) });
    process.exit(1);
  }
}
