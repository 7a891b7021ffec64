// The handlers the window calls, without a window: cell edits in engineering notation,
// refusals that name the cell and change nothing, undo/redo, files, autosave/recovery,
// planning in a worker with progress and cancel.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createApi, type Api } from '../../src-main/api/index.ts';
import { autosave, newProject, openDemo, recoverIfAny } from '../../src-main/api/files.ts';
import { makePathPolicy } from '../../src-main/host/paths.ts';
import type { Events, Snapshot } from '../../src-main/api/contract.ts';
import { TABLE_COLUMNS } from '../../src-main/api/tables.ts';

let dir: string;
beforeAll(() => { dir = mkdtempSync(join(tmpdir(), 'rw-api-')); });
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function demoApi(events: { e: string; p: unknown }[] = []): Api {
  const api = createApi({
    host: 'test', userDataDir: join(dir, 'data'),
    pathPolicy: makePathPolicy({ allowedRoots: [dir], baseDir: dir }),
    emit: (e, p) => events.push({ e, p }),
  });
  openDemo(api.session);
  return api;
}

async function ok<T>(p: Promise<{ ok: boolean; value?: unknown; error?: { message: string } }>): Promise<T> {
  const r = await p;
  if (!r.ok) throw new Error(r.error!.message);
  return r.value as T;
}

describe('cell edits', () => {
  it('reads engineering notation into SI units (values from the notation rules, common practice)', async () => {
    const api = demoApi();
    const l = api.session.requirements.loads[0]!;
    const m = api.session.requirements.modes[0]!;
    const cases: [string, string, string, number][] = [
      ['loads', 'voltage', '3V3', 3.3],
      ['loads', 'tolerance', '±2.5%', 0.025],
      ['loads', 'rippleLimit', '30m', 0.03],
      ['loads', `current:${m.id}`, '4u7', 4.7e-6],
      ['loads', `current:${m.id}`, '1.5', 1.5],
    ];
    for (const [table, field, text, want] of cases) {
      const s = await ok<Snapshot>(api.request('requirements.editCell', { table, rowId: l.id, field, text }));
      const row = s.requirements.loads[0]!;
      const got = field.startsWith('current:') ? row.current[m.id]! : (row as unknown as Record<string, number>)[field]!;
      expect(got, `${field} ${text}`).toBeCloseTo(want, 12);
    }
    const p = await ok<Snapshot>(api.request('requirements.editCell', { table: 'preferences', rowId: 'project', field: 'switchingFrequency', text: '1.2M' }));
    expect(p.requirements.preferences.switchingFrequency).toBeCloseTo(1.2e6, 6);
    // The allowed stage kinds, typed comma-separated (any case), are the project setting.
    const k = await ok<Snapshot>(api.request('requirements.editCell', { table: 'preferences', rowId: 'project', field: 'allowedKinds', text: 'buck, LDO,boost buck-boost-4s' }));
    expect(k.requirements.preferences.allowedKinds).toEqual(['buck', 'ldo', 'boost', 'buck-boost-4s']);
    // The cell shows each kind's trade word, and that text typed back is the same setting.
    const col = TABLE_COLUMNS.preferences.find((c) => c.key === 'allowedKinds')!;
    const shown = col.kind.type === 'list' ? ['buck', 'cwbuck', 'iso-module'].map((x) => col.kind.type === 'list' ? col.kind.labels?.[x] ?? x : x).join(', ') : '';
    expect(shown).toBe('buck, coupled-winding buck, isolated module');
    const w = await ok<Snapshot>(api.request('requirements.editCell', { table: 'preferences', rowId: 'project', field: 'allowedKinds', text: shown }));
    expect(w.requirements.preferences.allowedKinds).toEqual(['buck', 'cwbuck', 'iso-module']);
    const bad = await api.request('requirements.editCell', { table: 'preferences', rowId: 'project', field: 'allowedKinds', text: 'buck, flyback' });
    expect(bad.ok).toBe(false);
    if (!bad.ok) expect(bad.error.message).toMatch(/"flyback" is not one of .*coupled-winding buck/);
    const sh = await ok<Snapshot>(api.request('requirements.editCell', { table: 'modes', rowId: m.id, field: 'share', text: '70%' }));
    expect(sh.requirements.modes[0]!.share).toBeCloseTo(0.7, 12);
    expect(sh.problems.some((x) => /add up to/.test(x.message))).toBe(true);
  });

  it('refuses bad input with a message naming table, row and column, and changes nothing', async () => {
    const api = demoApi();
    const before = JSON.stringify(api.session.requirements);
    const src = api.session.requirements.sources[0]!;
    const l = api.session.requirements.loads[0]!;
    const bad: [string, string, string, string, RegExp][] = [
      ['loads', l.id, 'voltage', '3.3 Hz', new RegExp(`loads › ${l.name} › Voltage`)],
      ['loads', l.id, 'tolerance', '5', /tolerance/],
      ['loads', l.id, 'domainId', 'Nowhere', /not a domain/],
      ['loads', l.id, 'noiseClass', 'loud', /not one of/],
      ['loads', l.id, 'name', api.session.requirements.loads[1]!.name, /already called/],
      ['sources', src.id, 'vMin', '100', /V min ≤ V nominal/],
      ['limits', 'project', 'tjMax', '30', /must stay above the ambient/],
      ['modes', api.session.requirements.modes[0]!.id, 'share', '150%', /outside/],
      ['preferences', 'project', 'allowedKinds', 'buck, flyback', /Allowed stage kinds: "flyback" is not one of buck, coupled-winding buck, LDO, boost/],
      ['preferences', 'project', 'allowedKinds', 'buck, buck', /"buck" is listed twice/],
      ['preferences', 'project', 'allowedKinds', ' ', /list at least one of/],
    ];
    for (const [table, rowId, field, text, re] of bad) {
      const r = await api.request('requirements.editCell', { table, rowId, field, text });
      expect(r.ok, `${field}=${text}`).toBe(false);
      if (!r.ok) expect(r.error.message, `${field}=${text}`).toMatch(re);
    }
    expect(JSON.stringify(api.session.requirements)).toBe(before);
    expect(api.session.undoStack).toHaveLength(0);
    expect(api.session.dirty).toBe(false);
  });
});

describe('undo and redo', () => {
  it('undo restores the exact state of every edit in reverse order; redo reapplies', async () => {
    const api = demoApi();
    const s = api.session;
    const states = [JSON.stringify({ ...s.requirements, meta: { ...s.requirements.meta, revision: 0 } })];
    const snap = () => JSON.stringify({ ...s.requirements, meta: { ...s.requirements.meta, revision: 0 } });
    await ok(api.request('requirements.editCell', { table: 'loads', rowId: s.requirements.loads[0]!.id, field: 'voltage', text: '2V5' }));
    states.push(snap());
    await ok(api.request('requirements.addRow', { table: 'loads' }));
    states.push(snap());
    await ok(api.request('requirements.removeRow', { table: 'loads', rowId: s.requirements.loads[1]!.id }));
    states.push(snap());
    for (let i = states.length - 2; i >= 0; i--) {
      await ok(api.request('requirements.undo', {}));
      expect(snap()).toBe(states[i]);
    }
    expect((await api.request('requirements.undo', {})).ok).toBe(false);
    for (let i = 1; i < states.length; i++) {
      await ok(api.request('requirements.redo', {}));
      expect(snap()).toBe(states[i]);
    }
    expect(s.state().canRedo).toBe(false);
  });
});

describe('files', () => {
  it('saves, reopens the same project, and refuses paths the policy refuses', async () => {
    const api = demoApi();
    const m = api.session.requirements.modes[0]!;
    await ok(api.request('requirements.editCell', { table: 'loads', rowId: api.session.requirements.loads[2]!.id, field: `current:${m.id}`, text: '333m' }));
    const path = join(dir, 'round.rwproj');
    const st = await ok<{ dirty: boolean; path: string }>(api.request('project.save', { path }));
    expect(st.dirty).toBe(false);
    expect(st.path).toBe(path);
    const saved = JSON.stringify(api.session.requirements);
    newProject(api.session);
    const again = await ok<Snapshot>(api.request('project.open', { path }));
    expect(JSON.stringify(again.requirements)).toBe(saved);
    expect(again.state.recent[0]).toBe(path);
    for (const p of ['/etc/passwd', join(dir, 'x.txt'), join(dir, '..', 'escape.rwproj')]) {
      expect((await api.request('project.save', { path: p })).ok, p).toBe(false);
    }
  });

  it('will not drop unsaved changes unless told to', async () => {
    const api = demoApi();
    await ok(api.request('project.rename', { name: 'Changed' }));
    const r = await api.request('project.new', {});
    expect(r.ok).toBe(false);
    expect(api.session.requirements.meta.name).toBe('Changed');
    expect((await api.request('project.new', { discard: true })).ok).toBe(true);
  });

  it('autosaves unsaved work and recovers it after an unclean exit', async () => {
    const data = join(dir, 'crash');
    const a = createApi({ host: 'test', userDataDir: data });
    openDemo(a.session);
    await ok(a.request('project.rename', { name: 'Unsaved work' }));
    expect(autosave(a.session)).toBe(true);
    expect(existsSync(join(data, 'recovery'))).toBe(true);
    // A new process: the session comes back from the autosave copy, marked recovered and dirty.
    const b = createApi({ host: 'test', userDataDir: data });
    expect(recoverIfAny(b.session)).toBe(true);
    expect(b.session.requirements.meta.name).toBe('Unsaved work');
    expect(b.session.state()).toMatchObject({ recovered: true, dirty: true });
  });

  it('imports JSON and names the first problem of a bad document', async () => {
    const api = demoApi();
    const good = await ok<{ base64: string }>(api.request('export.file', { kind: 'json' }));
    const text = Buffer.from(good.base64, 'base64').toString('utf8');
    const snap = await ok<Snapshot>(api.request('project.importJson', { text, discard: true }));
    expect(snap.requirements.loads.length).toBe(api.session.requirements.loads.length);
    const broken = JSON.parse(text);
    broken.loads[0].voltage = 'three volts';
    const r = await api.request('project.importJson', { text: JSON.stringify(broken), discard: true });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.message).toMatch(/loads\[0\]\.voltage/);
  });
});

describe('planning job', () => {
  it('runs in a worker, reports progress, and stops when cancelled', { timeout: 120_000 }, async () => {
    const events: { e: string; p: unknown }[] = [];
    const api = demoApi(events);
    const job = await ok<{ jobId: string }>(api.request('plan.start', {}));
    expect((await api.request('plan.start', {})).ok).toBe(false);
    // The event loop stays free while the worker plans: a request is answered meanwhile.
    expect((await api.request('project.snapshot', {})).ok).toBe(true);
    // Wait for the first progress report (the worker has started searching), then cancel.
    await new Promise<void>((resolve) => {
      const t = setInterval(() => { if (events.some((x) => x.e === 'plan.progress')) { clearInterval(t); resolve(); } }, 20);
    });
    expect(await ok<{ cancelled: boolean }>(api.request('plan.cancel', { jobId: job.jobId }))).toEqual({ cancelled: true });
    const finished = await new Promise<Events['plan.finished']>((resolve) => {
      const t = setInterval(() => {
        const f = events.find((x) => x.e === 'plan.finished');
        if (f) { clearInterval(t); resolve(f.p as Events['plan.finished']); }
      }, 20);
    });
    expect(finished.jobId).toBe(job.jobId);
    expect(['cancelled', 'done']).toContain(finished.outcome);
    expect(events.some((x) => x.e === 'plan.progress')).toBe(true);
    expect(api.session.planJob).toBeNull();
  });
});

describe('barrier leakage check', () => {
  it('computes I = 2π·f·C·V from notation and names bad fields', async () => {
    const api = demoApi();
    const limits = await ok<{ id: string; limit: number }[]>(api.request('isolation.limits', {}));
    expect(limits.length).toBeGreaterThan(2);
    const r = await ok<{ current: number; ok: boolean; maxCapacitance: number }>(api.request('isolation.check', { capacitance: '2n2', voltageRms: '250', frequency: '50', limitId: limits[0]!.id }));
    // Capacitive reactance Xc = 1/(2πfC), I = V/Xc (any circuits textbook): 2π·50·2.2e-9·250 = 172.788 µA.
    expect(r.current).toBeCloseTo(172.788e-6, 8);
    expect(r.ok).toBe(r.current <= limits[0]!.limit);
    expect(r.maxCapacitance).toBeCloseTo(limits[0]!.limit / (2 * Math.PI * 50 * 250), 15);
    const bad = await api.request('isolation.check', { capacitance: '2 nH', voltageRms: '250', frequency: '50', limitId: limits[0]!.id });
    expect(bad.ok).toBe(false);
    if (!bad.ok) expect(bad.error.field).toBe('capacitance');
  });
});
