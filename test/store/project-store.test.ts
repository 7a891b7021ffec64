// The project store: round trips, revisions, plan staleness, library, migrations, every
// bad-file case (file byte-identical afterwards) and save crash-safety. The file-format
// facts checked here (header magic, application_id at offset 68, user_version at offset
// 60, the write/read version bytes 18/19) come from SQLite's "Database File Format"
// documentation, from memory; they are read back with better-sqlite3 (an independent
// SQLite build) wherever possible.
import { describe, expect, it } from 'vitest';
import Database from 'better-sqlite3';
import { existsSync, mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import {
  APPLICATION_ID, OpenError, PROJECT_EXTENSION, ProjectStore, StoreError, newRequirements,
} from '../../src-main/store/project-store.ts';
import { expectedTables, loadMigrations, migrate, REQUIRED_TABLES, schemaVersion } from '../../src-main/store/migrations.ts';
import { demoDocument } from '../../src-main/store/demo.ts';
import { generateProject } from '../../src-main/store/generate.ts';
import { validateRequirements } from '../../src-main/engine/validate.ts';
import { fixedClock, sha256, tempDir } from './tmp.ts';
import { samplePlan } from './json-format.test.ts';

const clock = fixedClock();

function savedDemo(dir = tempDir()): string {
  const p = join(dir, `demo${PROJECT_EXTENSION}`);
  const s = ProjectStore.fromDocument(demoDocument(), { clock });
  s.save(p);
  s.close();
  return p;
}

describe('a new project', () => {
  it('starts valid, clean, unnamed, at revision 0 and the current schema', () => {
    const s = ProjectStore.create({ clock: fixedClock('2026-01-01T00:00:00.000Z') });
    expect(s.dirty).toBe(false);
    expect(s.path).toBeNull();
    expect(s.revision).toBe(0);
    expect(s.created).toBe('2026-01-01T00:00:00.000Z');
    expect(s.schemaVersion).toBe(schemaVersion());
    expect(s.getRequirements()).toEqual(newRequirements());
    expect(validateRequirements(s.getRequirements())).toEqual([]);
    expect(s.getPlanResult()).toBeNull();
    expect(s.getLibrary()).toEqual([]);
    expect(() => s.save()).toThrow(StoreError);
    s.close();
  });
});

describe('round trip through a file', () => {
  it('reopens the demo identically (requirements, plan, library, times)', () => {
    const dir = tempDir();
    const p = join(dir, 'a.rwproj');
    const s = ProjectStore.fromDocument(demoDocument(), { clock });
    s.setPlanResult(samplePlan(1), '2026-02-02T00:00:00.000Z');
    const lib = [{ id: 'r1', partClass: 'resistor', name: 'Thick film 0603 (estimate)', cost: 0.002, params: { tolerance: 0.01, series: 'E96' } }];
    s.setLibrary(lib);
    expect(s.dirty).toBe(true);
    s.save(p);
    expect(s.dirty).toBe(false);
    expect(s.path).toBe(p);
    const doc = s.toDocument();
    const t = ProjectStore.open(p, { clock });
    expect(t.toDocument()).toEqual(doc);
    expect(t.getRequirements()).toEqual(demoDocument().requirements);
    expect(t.getLibrary()).toEqual(lib);
    expect(t.getPlanResult()).toEqual({ revision: 1, computedAt: '2026-02-02T00:00:00.000Z', result: samplePlan(1), stale: false });
    expect(t.dirty).toBe(false);
    s.close(); t.close();
  });

  it('writes one self-contained SQLite file that an independent reader accepts', () => {
    const dir = tempDir();
    const p = savedDemo(dir);
    expect(readdirSync(dir)).toEqual(['demo.rwproj']); // no side files, no temp left
    const b = readFileSync(p);
    expect(b.subarray(0, 16).toString('latin1')).toBe('SQLite format 3\0');
    expect([b[18], b[19]]).toEqual([1, 1]); // rollback journal, not write-ahead log
    const db = new Database(p, { readonly: true, fileMustExist: true });
    expect(db.pragma('application_id', { simple: true })).toBe(APPLICATION_ID);
    expect(db.pragma('user_version', { simple: true })).toBe(loadMigrations().length);
    expect(db.pragma('integrity_check', { simple: true })).toBe('ok');
    const tables = (db.prepare("SELECT name FROM sqlite_master WHERE type='table'").all() as { name: string }[]).map((r) => r.name);
    for (const t of REQUIRED_TABLES) expect(tables).toContain(t);
    expect((db.prepare('SELECT count(*) AS n FROM loads').get() as { n: number }).n).toBe(demoDocument().requirements.loads.length);
    expect((db.prepare('SELECT number, name FROM applied_migrations ORDER BY number').all())).toEqual(
      loadMigrations().map((m) => ({ number: m.number, name: m.name })));
    db.close();
  });

  it('keeps fields added to the model later and a 200-load project exactly', () => {
    const doc = generateProject({ loads: 200, seed: 11 });
    (doc.requirements.sources[0] as unknown as Record<string, unknown>).inrushLimit = 3;
    (doc.requirements.limits as unknown as Record<string, unknown>).humidity = 0.9;
    doc.requirements.loads[5]!.railKey = '';
    doc.requirements.loads[6]!.railKey = 'k';
    const dir = tempDir();
    const s = ProjectStore.fromDocument(doc, { clock });
    s.save(join(dir, 'g.rwproj'));
    const t = ProjectStore.open(join(dir, 'g.rwproj'));
    expect(t.getRequirements()).toEqual(doc.requirements);
    s.close(); t.close();
  });
});

describe('revisions, dirty state and refusals', () => {
  it('bumps the revision on a change, not on an identical write', () => {
    const s = ProjectStore.fromDocument(demoDocument(), { clock });
    const r0 = s.revision;
    const req = s.getRequirements();
    expect(s.setRequirements(req)).toBe(r0);
    req.loads[0]!.current.measure = 0.13 as never;
    expect(s.setRequirements(req)).toBe(r0 + 1);
    expect(s.getRequirements().meta.revision).toBe(r0 + 1);
    s.close();
  });

  it('marks a saved plan stale when the requirements move on', () => {
    const dir = tempDir();
    const s = ProjectStore.fromDocument(demoDocument(), { clock });
    s.setPlanResult(samplePlan(s.revision));
    expect(s.getPlanResult()!.stale).toBe(false);
    const req = s.getRequirements();
    req.loads[0]!.voltage = 1.1 as never;
    s.setRequirements(req);
    expect(s.getPlanResult()!.stale).toBe(true);
    s.save(join(dir, 'p.rwproj'));
    expect(ProjectStore.open(join(dir, 'p.rwproj')).getPlanResult()!.stale).toBe(true);
    s.clearPlanResult();
    expect(s.getPlanResult()).toBeNull();
    s.close();
  });

  it('refuses badly shaped input with the field named, and changes nothing', () => {
    const s = ProjectStore.fromDocument(demoDocument(), { clock });
    const before = s.toDocument();
    const req = s.getRequirements();
    req.loads[2]!.voltage = NaN as never;
    expect(() => s.setRequirements(req)).toThrow(/loads\[2\]\.voltage/);
    const r2 = s.getRequirements();
    (r2.loads[1] as unknown as Record<string, unknown>).current = { measure: '12x' };
    expect(() => s.setRequirements(r2)).toThrow(/loads\[1\]\.current\.measure/);
    expect(() => s.setLibrary([{ id: 'a', partClass: 'x', name: 'a', cost: 1, params: {} }, { id: 'a', partClass: 'x', name: 'b', cost: 1, params: {} }]))
      .toThrow(/library\[1\]\.id: part id "a" is used twice/);
    expect(() => s.setPlanResult({ revision: 1 } as never)).toThrow(StoreError);
    expect(s.toDocument()).toEqual(before);
    s.close();
  });

  it('stores semantically invalid requirements (a design in progress) for validation to report', () => {
    const s = ProjectStore.create({ clock });
    const req = s.getRequirements();
    req.sources = [];
    s.setRequirements(req);
    expect(s.getRequirements().sources).toEqual([]);
    expect(validateRequirements(s.getRequirements()).map((p) => p.path)).toContain('sources');
    s.close();
  });

  it('fails to save into a missing folder with a clear error, staying dirty', () => {
    const s = ProjectStore.fromDocument(demoDocument(), { clock });
    const dir = tempDir();
    expect(() => s.save(join(dir, 'nope', 'x.rwproj'))).toThrow(/could not save to .*x\.rwproj/);
    expect(s.dirty).toBe(true);
    expect(s.path).toBeNull();
    expect(readdirSync(dir)).toEqual([]);
    s.close();
  });
});

describe('migrations', () => {
  it('numbers the migration files 1, 2, … and sets user_version to the last', () => {
    const ms = loadMigrations();
    expect(ms.map((m) => m.number)).toEqual(ms.map((_, i) => i + 1));
    const db = new Database(':memory:');
    expect(migrate(db)).toEqual(ms.map((m) => m.number));
    expect(db.pragma('user_version', { simple: true })).toBe(ms.length);
    expect(migrate(db)).toEqual([]); // idempotent
    db.close();
  });

  for (const m of loadMigrations()) {
    it(`migration ${m.number} (${m.name}) creates its tables on top of the previous schema`, () => {
      const db = new Database(':memory:');
      migrate(db, { upTo: m.number - 1 });
      const before = new Set((db.prepare("SELECT name FROM sqlite_master WHERE type='table'").all() as { name: string }[]).map((r) => r.name));
      expect(migrate(db, { upTo: m.number })).toEqual([m.number]);
      const after = (db.prepare("SELECT name FROM sqlite_master WHERE type='table'").all() as { name: string }[]).map((r) => r.name);
      expect(after.sort()).toEqual(expectedTables(m.number).sort());
      expect(after.filter((t) => !before.has(t)).length).toBeGreaterThan(0);
      expect(db.pragma('user_version', { simple: true })).toBe(m.number);
      db.close();
    });
  }

  it('the current schema has every table the store uses', () => {
    expect(expectedTables(schemaVersion())).toEqual([...REQUIRED_TABLES].sort());
  });

  it('rolls a failing migration back whole, keeping the previous version', () => {
    const db = new Database(':memory:');
    const good = loadMigrations().slice(0, 1);
    const bad = [...good, { number: 2, name: 'broken', sql: 'CREATE TABLE half (x); INSERT INTO nowhere VALUES (1);' }];
    migrate(db, { migrations: good });
    expect(() => migrate(db, { migrations: bad })).toThrow();
    expect(db.pragma('user_version', { simple: true })).toBe(1);
    expect(db.prepare("SELECT count(*) AS n FROM sqlite_master WHERE name='half'").get()).toEqual({ n: 0 });
    db.close();
  });

  it('opens a file of schema 1, migrates it in memory only, and writes schema 2 on save', () => {
    const dir = tempDir();
    const p = join(dir, 'old.rwproj');
    // A schema-1 file as the first release wrote it.
    const db = new Database(':memory:');
    migrate(db, { upTo: 1 });
    db.exec(`INSERT INTO meta VALUES ('name', '"Old"'), ('description', '""'), ('revision', '4');
      INSERT INTO sources VALUES ('s', 0, 'In', 12, 11, 13, 1, '{}');
      INSERT INTO domains VALUES ('d', 0, 'Main', 'none', 0, '{}');
      INSERT INTO modes VALUES ('m', 0, 'Run', 1, '{}');
      INSERT INTO loads VALUES ('l', 0, 'Logic', 'd', 3.3, 0.05, 0.03, 'standard', NULL, '{}');
      INSERT INTO load_currents VALUES ('l', 'm', 0, 0.2);`);
    const lim = db.prepare('INSERT INTO limits VALUES (?, ?)');
    for (const [k, v] of Object.entries(newRequirements().limits)) lim.run(k, JSON.stringify(v));
    const pref = db.prepare('INSERT INTO preferences VALUES (?, ?)');
    for (const [k, v] of Object.entries(newRequirements().preferences)) pref.run(k, JSON.stringify(v));
    writeFileSync(p, db.serialize());
    db.close();
    const hash = sha256(p);
    const s = ProjectStore.open(p, { clock });
    expect(s.schemaVersion).toBe(2);
    expect(s.revision).toBe(4);
    expect(s.getRequirements().loads[0]!.current).toEqual({ m: 0.2 });
    expect(s.getLibrary()).toEqual([]);
    expect(sha256(p)).toBe(hash); // migrated in memory, not on disk
    s.save();
    const check = new Database(p, { readonly: true });
    expect(check.pragma('user_version', { simple: true })).toBe(2);
    check.close();
    s.close();
  });
});

describe('bad files are refused with one clear message and left byte-identical', () => {
  const dir = tempDir();
  const demo = readFileSync(savedDemo(dir));
  const plainSqlite = (() => {
    const db = new Database(':memory:');
    db.exec('CREATE TABLE notes (t TEXT); INSERT INTO notes VALUES (\'hello\')');
    const b = db.serialize();
    db.close();
    return b;
  })();
  const withHeader = (b: Buffer, offset: number, value: number) => {
    const c = Buffer.from(b);
    c.writeUInt32BE(value, offset);
    return c;
  };
  const corruptPages = (() => {
    const c = Buffer.from(demo);
    // Overwrite every page after the first with noise: the schema page survives, data does not.
    for (let i = 4096; i < c.length; i++) c[i] = (i * 7919) & 0xff;
    return c;
  })();
  const emptyOurs = (() => {
    const db = new Database(':memory:');
    db.pragma(`application_id = ${APPLICATION_ID}`);
    db.pragma('user_version = 2');
    db.exec('CREATE TABLE meta (key TEXT)');
    const b = db.serialize();
    db.close();
    return b;
  })();

  const cases: [string, Buffer, OpenError['kind'], RegExp][] = [
    ['an empty file', Buffer.alloc(0), 'empty', /is empty \(0 bytes\)/],
    ['a text file', Buffer.from('name,voltage\ncore,1.2\n'), 'not-sqlite', /not an SQLite database/],
    ['random bytes', Buffer.from(Array.from({ length: 5000 }, (_, i) => (i * 131 + 17) & 0xff)), 'not-sqlite', /not an SQLite database/],
    ['the first 10 bytes of a project', demo.subarray(0, 10), 'truncated', /truncated/],
    ['the first 50 bytes of a project', demo.subarray(0, 50), 'truncated', /truncated/],
    ['half a project', demo.subarray(0, Math.floor(demo.length / 2) + 100), 'truncated', /truncated/],
    ['a project cut at a page boundary', demo.subarray(0, 4096 * 2), 'truncated', /truncated/],
    ['a foreign SQLite database', plainSqlite, 'foreign', /another program/],
    ['a project with another application id', withHeader(demo, 68, 0x12345678), 'foreign', /another program/],
    ['a project from a newer program', withHeader(demo, 60, 99), 'newer', /made by a newer Railwright \(file schema 99/],
    ['a project with damaged pages', corruptPages, 'corrupt', /damaged/],
    ['our header without our tables', emptyOurs, 'incomplete', /table .* is missing/],
  ];
  for (const [name, bytes, kind, msg] of cases) {
    it(`refuses ${name} (${kind})`, () => {
      const p = join(dir, `${name.replace(/\W+/g, '-')}.rwproj`);
      writeFileSync(p, bytes);
      const before = sha256(p);
      let err: unknown;
      try {
        ProjectStore.open(p).close();
      } catch (e) {
        err = e;
      }
      expect(err).toBeInstanceOf(OpenError);
      expect((err as OpenError).kind).toBe(kind);
      expect((err as OpenError).message).toMatch(msg);
      expect((err as OpenError).message).not.toContain('\n');
      expect(sha256(p)).toBe(before);
      expect(readdirSync(dir).filter((f) => f.startsWith(name.replace(/\W+/g, '-')))).toHaveLength(1); // no side files
    });
  }

  it('refuses a missing file and a folder', () => {
    expect(() => ProjectStore.open(join(dir, 'missing.rwproj'))).toThrow(expect.objectContaining({ kind: 'not-found' }));
    mkdirSync(join(dir, 'folder.rwproj'));
    expect(() => ProjectStore.open(join(dir, 'folder.rwproj'))).toThrow(expect.objectContaining({ kind: 'not-a-file' }));
    expect(existsSync(join(dir, 'missing.rwproj'))).toBe(false);
  });
});

describe('save crash-safety', () => {
  it('ignores a half-written temp file left by a crashed save', () => {
    const dir = tempDir();
    const p = savedDemo(dir);
    const hash = sha256(p);
    // What a save killed before its rename leaves behind: a partial temp beside the target.
    writeFileSync(join(dir, '.demo.rwproj.4242-1.saving'), readFileSync(p).subarray(0, 3000));
    const s = ProjectStore.open(p);
    expect(s.getRequirements()).toEqual(demoDocument().requirements);
    s.close();
    expect(sha256(p)).toBe(hash);
  });

  it('replaces the target in one step: a reader sees the old or the new file, never a mix', () => {
    const dir = tempDir();
    const p = savedDemo(dir);
    const s = ProjectStore.open(p, { clock });
    const req = s.getRequirements();
    req.meta.name = 'changed';
    s.setRequirements(req);
    s.save();
    expect(ProjectStore.open(p).getRequirements().meta.name).toBe('changed');
    expect(readdirSync(dir)).toEqual(['demo.rwproj']);
    s.close();
  });
});

describe('more refusals and file handling', () => {
  it('refuses repeated ids (they are keys) and a plan whose revisions disagree', () => {
    const s = ProjectStore.fromDocument(demoDocument(), { clock });
    const req = s.getRequirements();
    req.loads[4]!.id = req.loads[1]!.id;
    expect(() => s.setRequirements(req)).toThrow(/loads\[4\]\.id: load id "mcu-io" is already used by entry 1/);
    s.close();
  });

  it('refuses a write-ahead-log file of ours (it may depend on a side file), untouched', () => {
    const dir = tempDir();
    const p = join(dir, 'wal.rwproj');
    const db = new Database(p);
    migrate(db);
    db.pragma('journal_mode = WAL');
    db.close();
    const h = sha256(p);
    expect(() => ProjectStore.open(p)).toThrow(expect.objectContaining({ kind: 'corrupt', message: expect.stringMatching(/write-ahead-log/) }));
    expect(sha256(p)).toBe(h);
  });

  it('Save As writes the new file and leaves the old one as it was', () => {
    const dir = tempDir();
    const p = savedDemo(dir);
    const h = sha256(p);
    const s = ProjectStore.open(p, { clock });
    const req = s.getRequirements();
    req.meta.name = 'variant';
    s.setRequirements(req);
    s.save(join(dir, 'variant.rwproj'));
    expect(s.path).toBe(join(dir, 'variant.rwproj'));
    expect(sha256(p)).toBe(h);
    expect(ProjectStore.open(join(dir, 'variant.rwproj')).getRequirements().meta.name).toBe('variant');
    expect(() => s.save(dir)).toThrow(/could not save/); // a folder is not a file
    s.close();
  });

  it('clears temp files of crashed saves whose process is gone, keeping unrelated files', () => {
    const dir = tempDir();
    const p = savedDemo(dir);
    writeFileSync(join(dir, '.demo.rwproj.999999999-3.saving'), 'partial'); // no such process
    writeFileSync(join(dir, `.demo.rwproj.${process.pid}-77.saving`), 'ours, in flight');
    writeFileSync(join(dir, 'notes.txt'), 'keep');
    const s = ProjectStore.open(p);
    s.save();
    s.close();
    expect(readdirSync(dir).sort()).toEqual([`.demo.rwproj.${process.pid}-77.saving`, 'demo.rwproj', 'notes.txt']);
  });
});

describe('change detection', () => {
  it('sees the same requirements in another key order as no change', () => {
    const s = ProjectStore.fromDocument(demoDocument(), { clock });
    const dir = tempDir();
    s.save(join(dir, 'o.rwproj'));
    const req = s.getRequirements();
    const reordered = { ...req, loads: req.loads.map((l) => Object.fromEntries(Object.entries(l).reverse())) } as typeof req;
    expect(s.setRequirements(reordered)).toBe(req.meta.revision);
    expect(s.dirty).toBe(false);
    s.setLibrary(s.getLibrary());
    expect(s.dirty).toBe(false);
    s.close();
  });
});

describe('unusual files', () => {
  it('refuses a file larger than 1 GiB without reading it (sparse file)', async () => {
    const { truncateSync } = await import('node:fs');
    const dir = tempDir();
    const p = join(dir, 'huge.rwproj');
    writeFileSync(p, '');
    truncateSync(p, 1024 * 1024 * 1024 + 4096);
    expect(() => ProjectStore.open(p)).toThrow(expect.objectContaining({ kind: 'too-large' }));
  });

  it.skipIf(process.getuid?.() === 0)('refuses a file it may not read (skipped as root, who may read anything)', async () => {
    const { chmodSync } = await import('node:fs');
    const dir = tempDir();
    const p = savedDemo(dir);
    chmodSync(p, 0o000);
    try {
      expect(() => ProjectStore.open(p)).toThrow(expect.objectContaining({ kind: 'unreadable' }));
    } finally {
      chmodSync(p, 0o644);
    }
  });
});
