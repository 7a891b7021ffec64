/**
 * Child process of the bad-file test (bad-files.test.ts): opens each crafted file the way
 * the program does, so a native crash or a hang takes down this process, not the test run.
 * Usage: open-probe <cases.json> <migrations-dir>. For each case it prints one JSON line:
 * the store's verdict (ProjectStore.open: kind and message, or the semantic problems of
 * the opened requirements), then the host's (the `project.open` / `project.importJson`
 * request, which also builds the snapshot the window draws), then, when the file opened,
 * a Save As of it to `saveTo` through the host (edits and saves are where planted SQL
 * would run).
 */
import { readFileSync } from 'node:fs';
import { OpenError, ProjectStore } from '../../src-main/store/project-store.ts';
import { setMigrationsDir } from '../../src-main/store/migrations.ts';
import { validateRequirements } from '../../src-main/engine/validate.ts';
import { createApi } from '../../src-main/api/index.ts';

export interface ProbeCase {
  name: string;
  /** A project file to open, or JSON text to import. */
  path?: string;
  jsonPath?: string;
  saveTo?: string;
}

export interface ProbeResult {
  name: string;
  store?: { opened: true; problems: { path: string; message: string }[] } | { opened: false; kind: string | null; message: string; errorName: string };
  host: { ok: boolean; message: string; notes?: string[] };
  save?: { ok: boolean; message: string };
  ms: number;
}

const [casesFile, migrations] = process.argv.slice(2);
if (!casesFile || !migrations) throw new Error('usage: open-probe <cases.json> <migrations-dir>');
setMigrationsDir(migrations);
const cases = JSON.parse(readFileSync(casesFile, 'utf8')) as ProbeCase[];

for (const c of cases) {
  const t0 = performance.now();
  const out: ProbeResult = { name: c.name, host: { ok: false, message: '' }, ms: 0 };
  if (c.path) {
    try {
      const s = ProjectStore.open(c.path);
      out.store = { opened: true, problems: validateRequirements(s.getRequirements()) };
      s.close();
    } catch (e) {
      const err = e as Error;
      out.store = { opened: false, kind: e instanceof OpenError ? e.kind : null, message: err.message, errorName: err.name };
    }
  }
  const api = createApi({ host: 'test', userDataDir: null, pathPolicy: (p) => p });
  const r = c.path
    ? await api.request('project.open', { path: c.path })
    : await api.request('project.importJson', { text: readFileSync(c.jsonPath!, 'utf8') });
  if (r.ok) {
    const snap = r.value as { plan?: { notes?: string[] } | null };
    out.host = { ok: true, message: '', notes: snap.plan?.notes ?? [] };
    if (c.saveTo) {
      const w = await api.request('project.save', { path: c.saveTo });
      out.save = { ok: w.ok, message: w.ok ? '' : w.error.message };
    }
  } else {
    out.host = { ok: false, message: r.error.message };
  }
  out.ms = performance.now() - t0;
  process.stdout.write(JSON.stringify(out) + '\n');
}
