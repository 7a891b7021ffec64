/**
 * Entry of the local web host (`npm start` without the Electron binary): a session on the
 * user's project (first run: the demo, saved into the user data folder), the handlers over
 * HTTP on 127.0.0.1 with a per-run token, autosave to the recovery folder.
 */
import { mkdirSync } from 'node:fs';
import { homedir, tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { createApi, type Api } from '../api/index.ts';
import { autosave, loadRecent, openAtStart, openPath } from '../api/files.ts';
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
  // The window may use the projects folder, the folder of the project it opens, and the
  // folders the user picks for Open or Save as (inside home or the temporary folder), never
  // a hidden folder (paths.ts).
  const policy = makePathPolicy({
    allowedRoots: [projects, ...(opts.allowedRoots ?? [])], chooseRoots: [homedir(), tmpdir()], baseDir: projects, refuseHidden: true,
  });
  const api = createApi({ host: 'web', userDataDir: opts.userDataDir, pathPolicy: policy, autosaveMs: opts.autosaveMs ?? 30_000 });
  const s = api.session;
  if (opts.project) {
    // Named on the command line by the user: its folder is allowed.
    policy.allowFolder(dirname(resolve(opts.project)));
    loadRecent(s);
    openPath(s, opts.project);
  } else {
    await openAtStart(s, { demoFile: join(projects, 'demo.rwproj'), approve: (p) => policy.allowFolder(dirname(p)), planFirstRun: opts.firstRunPlan !== false });
  }
  const host = await startWebHost({ api, rendererDir: opts.rendererDir, port: opts.port });
  s.emit = (event, payload) => host.broadcast(event, payload);
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
