// Issue 10 item 5: one JSON cell nested 10,000 levels deep (about 20 KB, in a load's extra
// data) used to pass `validate` and `summary`, make `plan` print "Maximum call stack size
// exceeded" and never exit (the planning worker was never ended), and break the web host.
// The store now refuses any stored JSON value deeper than the importer's 64 levels before
// parsing it, naming the table, row and column; any planning-worker failure ends the
// worker. Every child process here is bounded in time.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import Database from 'better-sqlite3';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { request } from 'node:http';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { ProjectStore } from '../../src-main/store/project-store.ts';
import { demoDocument } from '../../src-main/store/demo.ts';
import { jsonTextProblem } from '../../src-main/store/json-format.ts';
import { createApi } from '../../src-main/api/index.ts';
import { newProject } from '../../src-main/api/files.ts';
import { makePathPolicy } from '../../src-main/host/paths.ts';
import { startWebHost, type WebHost } from '../../src-main/host/web-host.ts';

const ROOT = join(import.meta.dirname, '../..');
const BIN = join(ROOT, 'bin/railwright.mjs');
const LEVELS = 10_000;

const dir = mkdtempSync(join(tmpdir(), 'rw-deep-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** The demo project with one load's extra data nested LEVELS deep. */
function deepProject(column: 'loads.extra' | 'meta' | 'plan' = 'loads.extra'): string {
  const s = ProjectStore.fromDocument(demoDocument(), { clock: () => new Date('2026-03-01T12:00:00Z') });
  const db = new Database(s.serialize());
  s.close();
  const deep = '['.repeat(LEVELS) + ']'.repeat(LEVELS);
  if (column === 'loads.extra') db.prepare('UPDATE loads SET extra = ? WHERE pos = 0').run(`{"deep":${deep}}`);
  else if (column === 'meta') db.prepare("INSERT INTO meta (key, value) VALUES ('deep', ?)").run(deep);
  else db.prepare("INSERT INTO plan_results (slot, revision, computed_at, result) VALUES (1, 0, 'now', ?)").run(`{"rails":${deep}}`);
  const path = join(dir, `deep-${column.replace('.', '-')}.rwproj`);
  writeFileSync(path, db.serialize());
  db.close();
  return path;
}

function rw(args: string[]) {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd: dir, encoding: 'utf8', timeout: 60_000 });
  return { code: r.status, signal: r.signal, out: r.stdout, err: r.stderr };
}

describe('stored JSON values are bounded like imported ones', () => {
  it('the text scan refuses depth and size without parsing, ignoring brackets inside strings', () => {
    expect(jsonTextProblem('['.repeat(65) + ']'.repeat(65))).toMatch(/nested more than 64 levels/);
    expect(jsonTextProblem('['.repeat(64) + ']'.repeat(64))).toBeNull();
    expect(jsonTextProblem(JSON.stringify({ s: '[[[[\\"{{{{'.repeat(100) }))).toBeNull();
    expect(jsonTextProblem(' '.repeat(16_000_001))).toMatch(/more than the 16000000/);
  });

  it('the store refuses each deep column with the table, row and column named', () => {
    const cases: [Parameters<typeof deepProject>[0], RegExp][] = [
      ['loads.extra', /table loads, row "[^"]+", column extra\): nested more than 64 levels/],
      ['meta', /table meta, row "deep", column value\): nested more than 64 levels/],
      ['plan', /table plan_results, column result\): nested more than 64 levels/],
    ];
    for (const [col, re] of cases) {
      const p = deepProject(col);
      expect(statSync(p).size).toBeLessThan(200_000);
      expect(() => ProjectStore.open(p), col).toThrow(re);
    }
  });
});

describe('the store never writes a value its reader would refuse', () => {
  it('refuses a deep plan result, library parameter or extra field, and keeps what it had', () => {
    const s = ProjectStore.fromDocument(demoDocument());
    const deep = JSON.parse('['.repeat(100) + ']'.repeat(100)) as unknown;
    const lib = s.getLibrary();
    expect(() => s.setLibrary([{ id: 'x', partClass: 'capacitor', name: 'x', cost: 1, params: { deep } }])).toThrow(/part library row x refused: nested more than 64 levels/);
    expect(s.getLibrary()).toEqual(lib);
    const req = s.getRequirements();
    const before = JSON.stringify(req);
    (req.loads[0] as unknown as Record<string, unknown>).deep = deep;
    expect(() => s.setRequirements(req)).toThrow(/extra fields of .* refused: nested more than 64 levels/);
    expect(JSON.stringify(s.getRequirements())).toBe(before);
    const result = { revision: s.revision, rails: [deep], best: null, alternatives: [], infeasible: [], stats: {} };
    expect(() => s.setPlanResult(result as never)).toThrow(/plan result refused: nested more than 64 levels/);
    expect(s.getPlanResult()).toBeNull();
    s.close();
  });
});

describe('the CLI on a project with a 10,000-level JSON cell', () => {
  let file: string;
  let before: Buffer;
  beforeAll(() => {
    file = deepProject();
    before = readFileSync(file);
  });

  it.each([['plan'], ['validate'], ['summary']])('%s exits non-zero promptly with the cell named', { timeout: 90_000 }, (cmd) => {
    const r = rw([cmd, file]);
    expect(r.signal, `${cmd} was killed by the time bound: ${r.err}`).toBeNull();
    expect(r.code).not.toBe(0);
    expect(r.err).toMatch(/table loads, row "[^"]+", column extra\): nested more than 64 levels/);
    expect(r.err).not.toMatch(/Maximum call stack/);
    expect(readFileSync(file).equals(before)).toBe(true);
  });
});

describe('the planning worker', () => {
  it('a value that cannot be handed to the worker, or a failure inside it, ends it: the process exits by itself', { timeout: 90_000 }, () => {
    const r = spawnSync(process.execPath, [join(import.meta.dirname, 'deep-worker-child.mjs')], { cwd: ROOT, encoding: 'utf8', timeout: 60_000 });
    expect(r.signal, `the child did not exit within 60 s: ${r.stdout}${r.stderr}`).toBeNull();
    expect(r.stdout).toMatch(/RESULT refused: planner: the requirements could not be handed to the planner/);
    expect(r.stdout).toMatch(/RESULT2 refused: planner: \S/);
    expect(r.status).toBe(0);
  });
});

describe('the web host with a 10,000-level JSON cell', () => {
  let host: WebHost;
  const api = createApi({
    host: 'web', userDataDir: null,
    pathPolicy: makePathPolicy({ allowedRoots: [dir], baseDir: dir }),
  });
  beforeAll(async () => {
    newProject(api.session);
    const r = mkdtempSync(join(dir, 'renderer-'));
    writeFileSync(join(r, 'index.html'), '<!doctype html><p>window</p>');
    host = await startWebHost({ api, rendererDir: r });
  });
  afterAll(() => host.close());

  const call = (name: string, args: unknown) => new Promise<{ status: number; body: { ok: boolean; error?: { message: string }; value?: unknown } }>((ok, fail) => {
    const body = JSON.stringify({ name, args });
    const req = request({
      host: '127.0.0.1', port: host.port, path: '/api/request', method: 'POST', timeout: 30_000,
      headers: { host: `127.0.0.1:${host.port}`, 'content-type': 'application/json', 'x-railwright-token': host.token },
    }, (res) => {
      let text = '';
      res.on('data', (c) => (text += c));
      res.on('end', () => ok({ status: res.statusCode!, body: JSON.parse(text) }));
    });
    req.on('timeout', () => req.destroy(new Error('no answer within 30 s')));
    req.on('error', fail);
    req.end(body);
  });

  it('refuses to open the file with the cell named, and keeps serving', { timeout: 60_000 }, async () => {
    const file = deepProject();
    const r = await call('project.open', { path: file, discard: true });
    expect(r.body.ok).toBe(false);
    expect(r.body.error?.message).toMatch(/table loads, row "[^"]+", column extra\): nested more than 64 levels/);
    for (const name of ['project.snapshot', 'project.snapshot']) {
      const s = await call(name, {});
      expect(s.status).toBe(200);
      expect(s.body.ok).toBe(true);
    }
    const imp = await call('project.importJson', { text: `{"format":"railwright-project","version":1,"x":${'['.repeat(LEVELS)}${']'.repeat(LEVELS)}}`, discard: true });
    expect(imp.body.ok).toBe(false);
    expect((await call('project.snapshot', {})).body.ok).toBe(true);
  });

  it('a session holding a deep value (however it got there) fails each request with a message, and a new project recovers', { timeout: 60_000 }, async () => {
    let deep: unknown = {};
    for (let i = 0; i < LEVELS; i++) deep = { d: deep };
    (api.session.requirements.meta as unknown as Record<string, unknown>).deep = deep;
    for (const name of ['project.snapshot', 'plan.start']) {
      const r = await call(name, {});
      expect(r.status, name).toBe(200);
      expect(r.body.ok, name).toBe(false);
      expect(r.body.error?.message, name).toMatch(/Maximum call stack size exceeded/);
    }
    expect((await call('project.new', { discard: true })).body.ok).toBe(true);
    expect((await call('project.snapshot', {})).body.ok).toBe(true);
  });
});
