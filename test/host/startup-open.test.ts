// A project that fails to open at start-up is not reopened automatically at the next start
// (issue 10 item 5): a hostile file that was the most recent one used to leave the window at
// "Loading the project…" after every restart. Both hosts (the local web host's main and the
// desktop backend) fall back to the demo, show why, and mark the recent entry.
import { afterAll, describe, expect, it } from 'vitest';
import Database from 'better-sqlite3';
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { startWebMain } from '../../src-main/host/web-main.ts';
import { createBackend } from '../../src-main/host/backend.ts';
import { addRecent, readRecent } from '../../src-main/store/recent.ts';
import { ProjectStore } from '../../src-main/store/project-store.ts';
import { demoDocument } from '../../src-main/store/demo.ts';
import type { ProjectState } from '../../src-main/api/contract.ts';

const made: string[] = [];
afterAll(() => { for (const d of made) rmSync(d, { recursive: true, force: true }); });
function temp(prefix: string): string {
  const d = mkdtempSync(join(tmpdir(), prefix));
  made.push(d);
  return d;
}

/** A demo project whose first load carries a JSON cell nested 10,000 levels deep. */
function hostileProject(path: string): void {
  const s = ProjectStore.fromDocument(demoDocument());
  const db = new Database(s.serialize());
  s.close();
  db.prepare('UPDATE loads SET extra = ? WHERE pos = 0').run(`{"deep":${'['.repeat(10_000)}${']'.repeat(10_000)}}`);
  writeFileSync(path, db.serialize());
  db.close();
}

function goodProject(path: string, name: string): void {
  const doc = demoDocument();
  doc.requirements.meta.name = name;
  const s = ProjectStore.fromDocument(doc);
  s.save(path, { overwrite: true }); // replaces the hostile file on purpose
  s.close();
}

describe('start-up of the local web host', () => {
  const data = temp('rw-startup-web-');
  const renderer = temp('rw-startup-renderer-');
  writeFileSync(join(renderer, 'index.html'), '<!doctype html><p>window</p>');
  const start = async () => {
    const m = await startWebMain({ userDataDir: data, rendererDir: renderer, autosaveMs: 0 });
    const state = m.api.session.state();
    const snap = await m.api.request('project.snapshot', {});
    await m.stop();
    return { state, snapshotOk: snap.ok };
  };

  it('falls back to the demo with the reason shown, marks the entry, and does not retry it', { timeout: 60_000 }, async () => {
    const first = await start();
    expect(first.state.path).toBe(join(data, 'projects', 'demo.rwproj'));
    expect(first.state.notice).toBeNull();

    const bad = join(data, 'projects', 'hostile.rwproj');
    hostileProject(bad);
    addRecent(data, bad);
    const second = await start();
    expect(second.snapshotOk).toBe(true);
    expect(second.state.path).toBe(join(data, 'projects', 'demo.rwproj'));
    expect(second.state.notice).toMatch(/hostile\.rwproj\) could not be opened, so the demo is shown; it will not be reopened automatically/);
    expect(second.state.notice).toMatch(/table loads, row "[^"]+", column extra\): nested more than 64 levels/);
    const entry = readRecent(data).find((e) => e.path === bad)!;
    expect(entry.failed?.message).toMatch(/nested more than 64 levels/);
    // Still offered under Open (the user may try it again on purpose).
    expect(second.state.recent).toContain(bad);

    const third = await start();
    expect(third.state.path).toBe(join(data, 'projects', 'demo.rwproj'));
    expect(third.state.notice).toBeNull();
    expect(readRecent(data).find((e) => e.path === bad)!.failed).toEqual(entry.failed);
  });

  it('a file repaired and opened on purpose is reopened at the next start again', { timeout: 60_000 }, async () => {
    const bad = join(data, 'projects', 'hostile.rwproj');
    goodProject(bad, 'Repaired project');
    const m = await startWebMain({ userDataDir: data, rendererDir: renderer, autosaveMs: 0 });
    const r = await m.api.request('project.open', { path: bad, discard: true });
    expect(r.ok).toBe(true);
    await m.stop();
    expect(readRecent(data)[0]).toMatchObject({ path: bad });
    expect(readRecent(data)[0]!.failed).toBeUndefined();
    const again = await startWebMain({ userDataDir: data, rendererDir: renderer, autosaveMs: 0 });
    expect(again.api.session.state()).toMatchObject({ path: bad, name: 'Repaired project', notice: null });
    await again.stop();
  });
});

describe('start-up of the desktop backend', () => {
  it('falls back to the demo with the reason shown and marks the entry', { timeout: 60_000 }, async () => {
    const data = temp('rw-startup-backend-');
    mkdirSync(join(data, 'projects'), { recursive: true });
    const bad = join(data, 'projects', 'hostile.rwproj');
    hostileProject(bad);
    addRecent(data, bad);
    const sent: unknown[] = [];
    const b = createBackend({ userDataDir: data, send: (m) => sent.push(m), autosaveMs: 0 });
    const r = await b.api.request('project.snapshot', {});
    b.stop();
    expect(r.ok).toBe(true);
    const state = (r as { value: { state: ProjectState } }).value.state;
    expect(state.path).toBe(join(data, 'projects', 'demo.rwproj'));
    expect(state.notice).toMatch(/could not be opened, so the demo is shown/);
    expect(readRecent(data).find((e) => e.path === bad)!.failed).toBeDefined();
  });
});
