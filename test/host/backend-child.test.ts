// The desktop shell's backend runs in a plain Node child (better-sqlite3 built for Node's
// ABI); this drives the real child process over its IPC channel, as the Electron main does.
import { afterAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { BackendClient } from '../../src-main/host/backend-client.ts';
import type { Snapshot, ProjectState } from '../../src-main/api/contract.ts';

const ROOT = resolve(import.meta.dirname, '../..');

describe('backend child process protocol', () => {
  const dir = mkdtempSync(join(tmpdir(), 'rw-backend-'));
  const events: string[] = [];
  const client = new BackendClient({ nodePath: process.execPath, root: ROOT, userDataDir: dir, onEvent: (e) => events.push(e) });
  afterAll(async () => {
    await client.stop();
    rmSync(dir, { recursive: true, force: true });
  });

  it('starts on the demo, answers requests, relays events, and accepts only approved paths', async () => {
    await client.ready;
    const snap = await client.request('project.snapshot', {});
    expect(snap.ok).toBe(true);
    const s = (snap as { value: Snapshot }).value;
    expect(s.state.host).toBe('electron');
    expect(s.requirements.loads.length).toBeGreaterThan(5);
    // First run saved the demo in the user data folder.
    expect(existsSync(join(dir, 'projects', 'demo.rwproj'))).toBe(true);

    const load = s.requirements.loads[0]!;
    const mode = s.requirements.modes[0]!;
    const edit = await client.request('requirements.editCell', { table: 'loads', rowId: load.id, field: `current:${mode.id}`, text: '77m' });
    expect(edit.ok).toBe(true);
    expect((edit as { value: Snapshot }).value.requirements.loads[0]!.current[mode.id]).toBeCloseTo(0.077, 12);
    expect(events).toContain('project.state');

    const target = join(dir, 'copy.rwproj');
    const refused = await client.request('project.save', { path: target });
    expect(refused.ok).toBe(false);
    client.approvePath(target);
    const saved = await client.request('project.save', { path: target });
    expect(saved.ok).toBe(true);
    expect((saved as { value: ProjectState }).value.dirty).toBe(false);
    expect(existsSync(target)).toBe(true);

    const bad = await client.request('no.such', {});
    expect(bad.ok).toBe(false);
  });
});
