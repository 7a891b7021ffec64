/**
 * The Electron main process's side of the backend: spawns `node --import tsx backend.ts`
 * with the system Node (never Electron's own runtime, whose ABI differs from the one
 * better-sqlite3 was built for), relays requests, and forwards events.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { join } from 'node:path';
import type { ApiResult, EventName, Events } from '../api/contract.ts';
import type { FromBackend, ToBackend } from './backend-protocol.ts';

export interface BackendClientOptions {
  /** Node binary (npm's `npm_node_execpath` / start.mjs's process.execPath). */
  nodePath: string;
  root: string;
  userDataDir: string;
  onEvent: <E extends EventName>(event: E, payload: Events[E]) => void;
  onExit?: (code: number | null) => void;
}

export class BackendClient {
  private child: ChildProcess;
  private nextId = 1;
  private waiting = new Map<number, (r: ApiResult<unknown>) => void>();
  readonly ready: Promise<void>;

  constructor(opts: BackendClientOptions) {
    const env: NodeJS.ProcessEnv = { ...process.env, RAILWRIGHT_BACKEND: '1', RAILWRIGHT_DATA: opts.userDataDir };
    delete env.ELECTRON_RUN_AS_NODE;
    this.child = spawn(opts.nodePath, ['--import', 'tsx', join(opts.root, 'src-main', 'host', 'backend.ts')], {
      cwd: opts.root,
      stdio: ['ignore', 'inherit', 'inherit', 'ipc'],
      env,
      serialization: 'json',
    });
    this.ready = new Promise((ok, fail) => {
      const onMsg = (m: FromBackend) => {
        if (m.type === 'ready') ok();
        else if (m.type === 'fatal') fail(new Error(m.message));
      };
      this.child.on('message', onMsg as (m: unknown) => void);
      this.child.once('exit', (code) => fail(new Error(`backend exited early (code ${code})`)));
      this.child.once('error', fail);
    });
    this.child.on('message', (raw: unknown) => {
      const m = raw as FromBackend;
      if (m.type === 'response') {
        this.waiting.get(m.id)?.(m.result);
        this.waiting.delete(m.id);
      } else if (m.type === 'event') {
        opts.onEvent(m.event, m.payload as never);
      }
    });
    this.child.on('exit', (code) => {
      for (const w of this.waiting.values()) w({ ok: false, error: { message: 'the backend process stopped' } });
      this.waiting.clear();
      opts.onExit?.(code);
    });
  }

  private post(m: ToBackend): void {
    if (this.child.connected) this.child.send(m);
  }

  request(name: string, args: unknown): Promise<ApiResult<unknown>> {
    const id = this.nextId++;
    return new Promise((ok) => {
      if (!this.child.connected) return ok({ ok: false, error: { message: 'the backend process is not running' } });
      this.waiting.set(id, ok);
      this.post({ type: 'request', id, name, args });
    });
  }

  approvePath(path: string): void {
    this.post({ type: 'approve-path', path });
  }

  async stop(): Promise<void> {
    this.post({ type: 'shutdown' });
    await new Promise((r) => setTimeout(r, 50));
    this.child.disconnect?.();
    await new Promise<void>((ok) => {
      if (this.child.exitCode !== null) return ok();
      const t = setTimeout(() => { this.child.kill(); ok(); }, 2000);
      this.child.once('exit', () => { clearTimeout(t); ok(); });
    });
  }
}
