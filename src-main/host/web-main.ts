/**
 * Entry of the local web host (`npm start` without the Electron binary): a session on the
 * user's project (first run: the demo, saved into the user data folder), the handlers over
 * HTTP on 127.0.0.1 with a per-run token, autosave to the recovery folder.
 */
import { mkdirSync, existsSync } from 'node:fs';
import { homedir, tmpdir } from 'node:os';
import { join } from 'node:path';
import { createApi, type Api } from '../api/index.ts';
import { autosave, loadRecent, openDemo, openPath, recoverIfAny, saveTo, newProject } from '../api/files.ts';
import { makePathPolicy } from './paths.ts';
import { startWebHost, type WebHost } from './web-host.ts';

export interface WebMainOptions {
  userDataDir: string;
  rendererDir: string;
  port?: number;
  /** Project to open instead of the last one / the demo. */
  project?: string;
  autosaveMs?: number;
  /** Extra folders the window may read and write (tests use a temp folder). */
  allowedRoots?: string[];
  /** Plan the demo at first run so the window opens on a tree (default true). */
  firstRunPlan?: boolean;
}

export function defaultUserDataDir(): string {
  const base = process.env.XDG_DATA_HOME || join(homedir(), '.local', 'share');
  return join(base, 'railwright');
}

export async function startWebMain(opts: WebMainOptions): Promise<{ api: Api; host: WebHost; stop(): Promise<void> }> {
  const projects = join(opts.userDataDir, 'projects');
  mkdirSync(projects, { recursive: true });
  const policy = makePathPolicy({ allowedRoots: [projects, homedir(), tmpdir(), ...(opts.allowedRoots ?? [])], baseDir: projects });
  const api = createApi({ host: 'web', userDataDir: opts.userDataDir, pathPolicy: policy, autosaveMs: opts.autosaveMs ?? 30_000 });
  const s = api.session;
  loadRecent(s);
  let firstRun = false;
  if (opts.project) {
    openPath(s, opts.project);
  } else if (!recoverIfAny(s)) {
    const demoFile = join(projects, 'demo.rwproj');
    const last = s.recent.find((p) => existsSync(p));
    try {
      if (last) openPath(s, last);
      else if (existsSync(demoFile)) openPath(s, demoFile);
      else {
        openDemo(s);
        saveTo(s, demoFile);
        firstRun = true;
      }
    } catch {
      newProject(s);
    }
  }
  const host = await startWebHost({ api, rendererDir: opts.rendererDir, port: opts.port });
  s.emit = (event, payload) => host.broadcast(event, payload);
  // The window plans the first run's demo once it is shown (after its first paint, so the
  // planning worker does not compete with the window's start).
  if (firstRun && opts.firstRunPlan !== false) s.planOnOpen = true;
  const timer = s.autosaveMs > 0 ? setInterval(() => {
    void s.serialise(() => { try { autosave(s); } catch { /* next period tries again */ } });
  }, s.autosaveMs) : null;
  timer?.unref();
  return {
    api,
    host,
    stop: async () => {
      if (timer) clearInterval(timer);
      s.planJob?.abort.abort();
      await host.close();
    },
  };
}
