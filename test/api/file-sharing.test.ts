// Issue 10 items 2-4 through the handlers the window calls: a save that would lose someone
// else's newer version, a Save As or an export onto an existing file, and a file with
// another program's unfinished change beside it all come back as typed refusals
// (`error.code`) the window turns into a question, and change nothing on disk.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createApi, type Api } from '../../src-main/api/index.ts';
import { openDemo } from '../../src-main/api/files.ts';
import { makePathPolicy } from '../../src-main/host/paths.ts';
import { ProjectStore } from '../../src-main/store/project-store.ts';
import type { ApiError, ProjectState, Snapshot } from '../../src-main/api/contract.ts';
import { crashMidTransaction } from '../helpers/sqlite-writer.ts';

let dir: string;
beforeAll(() => { dir = mkdtempSync(join(tmpdir(), 'rw-share-')); });
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const sha = (p: string) => createHash('sha256').update(readFileSync(p)).digest('hex');

function api(): Api {
  const a = createApi({ host: 'test', userDataDir: join(dir, 'data'), pathPolicy: makePathPolicy({ allowedRoots: [dir], baseDir: dir }) });
  openDemo(a.session);
  return a;
}

async function ok<T>(p: Promise<{ ok: boolean; value?: unknown; error?: ApiError }>): Promise<T> {
  const r = await p;
  if (!r.ok) throw new Error(r.error!.message);
  return r.value as T;
}

async function refused(p: Promise<{ ok: boolean; error?: ApiError }>): Promise<ApiError> {
  const r = await p;
  expect(r.ok, 'the request was not refused').toBe(false);
  return r.error!;
}

async function rename(a: Api, name: string): Promise<void> {
  await ok<Snapshot>(a.request('project.rename', { name }));
}

describe('the window\'s Save and the file on disk', () => {
  it('refuses (code "changed") to save over a version saved by the CLI since it was opened', async () => {
    const p = join(dir, 'shared.rwproj');
    const a = api();
    await ok<ProjectState>(a.request('project.save', { path: p }));
    // The CLI (or another window) saves a newer version of the same file.
    const cli = ProjectStore.open(p);
    const req = cli.getRequirements();
    req.meta.name = 'newer, saved by the CLI';
    cli.setRequirements(req);
    cli.save();
    cli.close();
    const newer = sha(p);
    await rename(a, 'older, in the window');
    const e = await refused(a.request('project.save', {}));
    expect(e.code).toBe('changed');
    expect(e.field).toBe('path');
    expect(e.message).toContain(p);
    expect(e.message).toMatch(/Save As/);
    expect(sha(p)).toBe(newer);
    expect(a.session.dirty).toBe(true);
    // Naming the same file in Save As, even "confirmed", is still that Save.
    expect((await refused(a.request('project.save', { path: p, overwrite: true }))).code).toBe('changed');
    expect(sha(p)).toBe(newer);
    // Save As to a new file works, and then Save works again and again.
    const q = join(dir, 'mine.rwproj');
    expect((await ok<ProjectState>(a.request('project.save', { path: q }))).path).toBe(q);
    await rename(a, 'second');
    await ok<ProjectState>(a.request('project.save', {}));
    await rename(a, 'third');
    await ok<ProjectState>(a.request('project.save', {}));
    expect(ProjectStore.open(q).getRequirements().meta.name).toBe('third');
    // Reopen shows the newer version.
    const s = await ok<Snapshot>(a.request('project.open', { path: p, discard: true }));
    expect(s.requirements.meta.name).toBe('newer, saved by the CLI');
  });

  it('asks (code "exists") before Save As replaces an existing file, and replaces it when confirmed', async () => {
    const other = join(dir, 'other.rwproj');
    const b = api();
    await ok<ProjectState>(b.request('project.save', { path: other }));
    const h = sha(other);
    const a = api();
    await rename(a, 'replacement');
    const e = await refused(a.request('project.save', { path: other }));
    expect(e.code).toBe('exists');
    expect(e.message).toContain(other);
    expect(sha(other)).toBe(h);
    expect(a.session.path).toBeNull();
    const st = await ok<ProjectState>(a.request('project.save', { path: other, overwrite: true }));
    expect(st.path).toBe(other);
    expect(ProjectStore.open(other).getRequirements().meta.name).toBe('replacement');
  });

  it('refuses to open (code "side-file") a file a crashed SQLite writer left half-changed', { timeout: 60_000 }, async () => {
    const p = join(dir, 'torn.rwproj');
    const a = api();
    await ok<ProjectState>(a.request('project.save', { path: p }));
    await crashMidTransaction(p);
    const h = sha(p);
    const b = api();
    const e = await refused(b.request('project.open', { path: p, discard: true }));
    expect(e.code).toBe('side-file');
    expect(e.message).toContain(`${p}-journal`);
    expect(b.session.path).toBeNull(); // the demo is still shown, not the torn file
    const s = await refused(a.request('project.save', {}));
    expect(s.code).toBe('side-file');
    expect(sha(p)).toBe(h);
  });
});

describe('the window\'s export', () => {
  it('asks (code "exists") before replacing an existing file, and replaces it when confirmed', async () => {
    const a = api();
    const out = join(dir, 'project.json');
    writeFileSync(out, 'keep me');
    const e = await refused(a.request('export.file', { kind: 'json', path: out }));
    expect(e.code).toBe('exists');
    expect(e.message).toContain(out);
    expect(readFileSync(out, 'utf8')).toBe('keep me');
    const f = await ok<{ writtenTo: string }>(a.request('export.file', { kind: 'json', path: out, overwrite: true }));
    expect(f.writtenTo).toBe(out);
    expect(JSON.parse(readFileSync(out, 'utf8')).format).toBe('railwright-project');
    // A new file needs no confirmation.
    const fresh = join(dir, 'fresh.json');
    expect((await ok<{ writtenTo: string }>(a.request('export.file', { kind: 'json', path: fresh }))).writtenTo).toBe(fresh);
  });
});
