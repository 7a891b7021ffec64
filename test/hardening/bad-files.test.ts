// Issue 7 item 2: a corpus of crafted bad project files (and bad JSON imports). Each is
// opened in a child process (a native crash or a hang there cannot take the test run
// down) by the store and by the host's open request, then saved under another name when
// it opened. Every bad file must get one clear message naming its problem, stay
// byte-identical with its modification time unchanged, gain no side files, and no SQL
// planted in it may run (checked with a canary table the planted triggers write to; the
// test first proves each trigger is live by firing it in a scratch copy). The SQLite file
// format facts used to craft the files (header magic, page size at offset 16, the write and
// read versions at 18/19, change counter at 24, page count at 28, user_version at 60,
// application_id at 68) are from SQLite's "Database File Format" documentation, from memory;
// the files are made with better-sqlite3, an independent SQLite build.
import { describe, expect, it } from 'vitest';
import Database from 'better-sqlite3';
import { spawnSync, execFileSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import {
  chmodSync, closeSync, existsSync, ftruncateSync, mkdirSync, openSync, readdirSync, readFileSync, statSync, symlinkSync, utimesSync, writeFileSync,
} from 'node:fs';
import { join } from 'node:path';
import { ProjectStore } from '../../src-main/store/project-store.ts';
import { exportProjectValue } from '../../src-main/store/json-format.ts';
import { demoDocument } from '../../src-main/store/demo.ts';
import { prng } from '../../src-main/store/generate.ts';
import { bundleChild, ROOT, scratchDir } from './bundle.ts';
import type { ProbeCase, ProbeResult } from './open-probe.ts';

type Expect =
  /** Refused by the store with this kind and a message matching the pattern. */
  | { refuse: string; message: RegExp }
  /** Opens (a design in progress); the semantic checks name this path. */
  | { opens: true; problemAt?: RegExp; sideFiles?: string[] }
  /** Opens or is refused with a message; either way the host answers. */
  | { either: true };

interface Crafted {
  name: string;
  /** Bytes of the file, or a function making the path itself (links, folders, pipes). */
  bytes?: Buffer;
  make?: (path: string) => void;
  json?: string;
  expect: Expect;
  /** SQL run on a scratch copy to prove the planted trigger is live (canary must rise). */
  liveTrigger?: string;
}

const sha = (b: Buffer) => createHash('sha256').update(b).digest('hex');

function savedDemoBytes(): Buffer {
  const s = ProjectStore.fromDocument(demoDocument(), { clock: () => new Date('2026-03-01T12:00:00Z') });
  const b = s.serialize();
  s.close();
  return b;
}

/** Apply SQL to a copy of a database image and return the new image. */
function alter(base: Buffer, sql: string, params: unknown[] = []): Buffer {
  const db = new Database(base);
  try {
    if (params.length) db.prepare(sql).run(...params);
    else db.exec(sql);
    return db.serialize();
  } finally {
    db.close();
  }
}

function setU32(b: Buffer, offset: number, v: number): Buffer {
  const c = Buffer.from(b);
  c.writeUInt32BE(v >>> 0, offset);
  return c;
}

const CANARY = 'CREATE TABLE canary (n INTEGER); ';
function canaryCount(bytes: Buffer, sql: string): number {
  const db = new Database(bytes);
  try {
    db.exec(sql);
    return (db.prepare('SELECT count(*) AS n FROM canary').get() as { n: number }).n;
  } finally {
    db.close();
  }
}

function corpus(): Crafted[] {
  const demo = savedDemoBytes();
  const rnd = prng(7);
  const random = Buffer.from(Array.from({ length: 65536 }, () => Math.floor(rnd() * 256)));
  const schema1 = alter(demo, "DROP TABLE plan_results; DROP TABLE part_library; DELETE FROM applied_migrations WHERE number = 2; PRAGMA user_version = 1;");
  const foreign = (() => {
    const db = new Database(':memory:');
    db.exec("CREATE TABLE invoices (id INTEGER PRIMARY KEY, total REAL); INSERT INTO invoices (total) VALUES (12.5);");
    const b = db.serialize();
    db.close();
    return b;
  })();
  const L = demo.length;
  const cuts: [string, number][] = [
    ['16 bytes (inside the magic)', 16], ['99 bytes (inside the header)', 99], ['the 100-byte header only', 100],
    ['one page', 4096], ['a third', Math.floor(L / 3)], ['half', Math.floor(L / 2)], ['all but one page', L - 4096], ['all but one byte', L - 1],
  ];
  const tenMb = 'x'.repeat(10 * 1024 * 1024);
  const cases: Crafted[] = [
    { name: 'empty file', bytes: Buffer.alloc(0), expect: { refuse: 'empty', message: /is empty \(0 bytes\)/ } },
    { name: 'random bytes', bytes: random, expect: { refuse: 'not-sqlite', message: /not an SQLite database/ } },
    { name: 'our header then random pages', bytes: Buffer.concat([demo.subarray(0, 100), random.subarray(100, L)]), expect: { refuse: 'corrupt|truncated', message: /damaged|truncated/ } },
    ...cuts.map(([what, n]): Crafted => ({ name: `truncated to ${what}`, bytes: demo.subarray(0, n), expect: { refuse: 'truncated', message: /truncated/ } })),
    { name: 'foreign SQLite database', bytes: foreign, expect: { refuse: 'foreign', message: /another program/ } },
    { name: 'wrong application id', bytes: setU32(demo, 68, 0x4d594442), expect: { refuse: 'foreign', message: /another program/ } },
    { name: 'newer schema (user_version 3)', bytes: setU32(demo, 60, 3), expect: { refuse: 'newer', message: /newer Railwright \(file schema 3/ } },
    { name: 'newer schema (user_version 2^31)', bytes: setU32(demo, 60, 0x80000000), expect: { refuse: 'newer', message: /newer Railwright/ } },
    { name: 'no schema (user_version 0)', bytes: setU32(demo, 60, 0), expect: { refuse: 'incomplete', message: /no schema/ } },
    { name: 'missing table loads', bytes: alter(demo, 'DROP TABLE load_currents; DROP TABLE loads;'), expect: { refuse: 'incomplete', message: /table load_currents, loads is missing|table .*loads.* is missing/ } },
    { name: 'missing table plan_results', bytes: alter(demo, 'DROP TABLE plan_results;'), expect: { refuse: 'incomplete', message: /table plan_results is missing/ } },
    { name: 'invalid page size in the header', bytes: (() => { const c = Buffer.from(demo); c.writeUInt16BE(3000, 16); return c; })(), expect: { refuse: 'corrupt', message: /invalid page size 3000/ } },
    { name: 'write-ahead-log mode header', bytes: (() => { const c = Buffer.from(demo); c[18] = 2; c[19] = 2; return c; })(), expect: { refuse: 'corrupt', message: /write-ahead-log/ } },
    {
      name: 'schema table overwritten with garbage SQL',
      bytes: (() => {
        const c = Buffer.from(demo);
        const at = c.indexOf('CREATE TABLE loads');
        if (at < 0) throw new Error('schema text not found');
        c.write('CREATE TABLX loads', at, 'latin1');
        return c;
      })(),
      expect: { refuse: 'corrupt', message: /damaged/ },
    },
    // Planted SQL: each trigger writes the canary; the store must refuse before it can run.
    {
      name: 'trigger on meta update deleting every load',
      bytes: alter(demo, CANARY + 'CREATE TRIGGER wipe AFTER UPDATE ON meta BEGIN DELETE FROM loads; INSERT INTO canary VALUES (1); END;'),
      liveTrigger: "UPDATE meta SET value = value WHERE key = 'modified'",
      expect: { refuse: 'foreign', message: /contains a trigger "wipe"/ },
    },
    {
      name: 'trigger on load delete (every edit)',
      bytes: alter(demo, CANARY + 'CREATE TRIGGER spy BEFORE DELETE ON loads BEGIN INSERT INTO canary VALUES (2); END;'),
      liveTrigger: 'DELETE FROM loads',
      expect: { refuse: 'foreign', message: /contains a trigger "spy"/ },
    },
    {
      name: 'trigger on source insert scaling load voltages',
      bytes: alter(demo, CANARY + 'CREATE TRIGGER scale AFTER INSERT ON sources BEGIN UPDATE loads SET voltage = voltage * 10; INSERT INTO canary VALUES (3); END;'),
      liveTrigger: "INSERT INTO sources (id, pos, name, v_nom, v_min, v_max, current_limit) VALUES ('x', 9, 'x', 1, 1, 1, 1)",
      expect: { refuse: 'foreign', message: /contains a trigger "scale"/ },
    },
    {
      name: 'trigger in a schema-1 file firing during migration',
      bytes: alter(schema1, CANARY + 'CREATE TRIGGER onmigrate AFTER INSERT ON applied_migrations BEGIN INSERT INTO canary VALUES (4); END;'),
      liveTrigger: "INSERT INTO applied_migrations (number, name, applied_at) VALUES (2, 'x', 'now')",
      expect: { refuse: 'foreign', message: /contains a trigger "onmigrate"/ },
    },
    { name: 'view planted beside the tables', bytes: alter(demo, 'CREATE VIEW heavy AS SELECT * FROM loads WHERE voltage > 5;'), expect: { refuse: 'foreign', message: /contains a view "heavy"/ } },
    {
      name: 'view shadowing the loads table',
      bytes: alter(demo, "DROP TABLE load_currents; ALTER TABLE loads RENAME TO loads_real; CREATE VIEW loads AS SELECT * FROM loads_real WHERE voltage < 5; CREATE TABLE load_currents (load_id TEXT, mode_id TEXT, pos INTEGER, current REAL);"),
      expect: { refuse: 'foreign', message: /contains a view "loads"/ },
    },
    {
      name: 'schema-1 file with a view where migration 2 creates a table',
      bytes: alter(schema1, "CREATE VIEW plan_results AS SELECT 1 AS slot, 0 AS revision, '' AS computed_at, '{}' AS result;"),
      expect: { refuse: 'foreign', message: /contains a view "plan_results"/ },
    },
    // Values the program never writes.
    { name: '10 MB project name', bytes: alter(demo, "UPDATE meta SET value = ? WHERE key = 'name'", [JSON.stringify(tenMb)]), expect: { refuse: 'corrupt', message: /meta\.name: name is longer than 500/ } },
    { name: '10 MB load name', bytes: alter(demo, 'UPDATE loads SET name = ? WHERE pos = 0', [tenMb]), expect: { refuse: 'corrupt', message: /loads\[0\]\.name: name is longer than 500/ } },
    { name: 'NaN text in a voltage column', bytes: alter(demo, "UPDATE loads SET voltage = 'NaN' WHERE pos = 0"), expect: { refuse: 'corrupt', message: /loads\[0\]\.voltage/ } },
    { name: 'Infinity in a load current', bytes: alter(demo, 'UPDATE load_currents SET current = 9e999 WHERE rowid = (SELECT min(rowid) FROM load_currents)'), expect: { refuse: 'corrupt', message: /loads\[\d+\]\.current\.\w+/ } },
    { name: '-Infinity source maximum', bytes: alter(demo, 'UPDATE sources SET v_max = -9e999'), expect: { refuse: 'corrupt', message: /sources\[0\]\.vMax/ } },
    { name: 'text in a mode share', bytes: alter(demo, "UPDATE modes SET share = 'half' WHERE pos = 1"), expect: { refuse: 'corrupt', message: /modes\[1\]\.share/ } },
    { name: 'NaN in a limit (JSON value)', bytes: alter(demo, "UPDATE limits SET value = 'NaN' WHERE key = 'ambient'"), expect: { refuse: 'corrupt', message: /limits\.ambient/ } },
    { name: 'unknown isolation class', bytes: alter(demo, "UPDATE domains SET isolation = 'doubled' WHERE pos = 1"), expect: { refuse: 'corrupt', message: /domains\[1\]\.isolation: "doubled" is not one of/ } },
    { name: 'unknown noise class', bytes: alter(demo, "UPDATE loads SET noise_class = 'deafening' WHERE pos = 2"), expect: { refuse: 'corrupt', message: /loads\[2\]\.noiseClass: "deafening" is not one of/ } },
    { name: 'unknown stage kind in preferences', bytes: alter(demo, "UPDATE preferences SET value = '[\"buck\",\"resonant\"]' WHERE key = 'allowedKinds'"), expect: { refuse: 'corrupt', message: /preferences\.allowedKinds\[1\]/ } },
    { name: 'malformed plan result JSON', bytes: alter(demo, "INSERT INTO plan_results (slot, revision, computed_at, result) VALUES (1, 0, 'now', '{\"rails\": [')"), expect: { refuse: 'corrupt', message: /damaged value in plan result/ } },
    { name: 'plan result of the wrong shape', bytes: alter(demo, "INSERT INTO plan_results (slot, revision, computed_at, result) VALUES (1, 0, 'now', '{\"revision\":0,\"rails\":7,\"best\":null,\"alternatives\":[],\"infeasible\":[],\"stats\":{}}')"), expect: { refuse: 'corrupt', message: /plan\.result\.rails/ } },
    { name: 'malformed JSON in meta', bytes: alter(demo, "UPDATE meta SET value = '{oops' WHERE key = 'description'"), expect: { refuse: 'corrupt', message: /damaged value in meta\.description/ } },
    { name: 'library row with negative cost', bytes: alter(demo, "INSERT INTO part_library (id, pos, part_class, name, cost, params) VALUES ('p1', 0, 'capacitor', 'c', -3, '{}')"), expect: { refuse: 'corrupt', message: /library\[0\]\.cost/ } },
    // Files that are not regular files.
    { name: 'a folder', make: (p) => mkdirSync(p), expect: { refuse: 'not-a-file', message: /is not a file/ } },
    { name: 'a named pipe', make: (p) => execFileSync('mkfifo', [p]), expect: { refuse: 'not-a-file', message: /is not a file/ } },
    { name: 'a symlink to a character device', make: (p) => symlinkSync('/dev/zero', p), expect: { refuse: 'not-a-file', message: /is not a file/ } },
    { name: 'a symlink loop', make: (p) => symlinkSync(p, p), expect: { refuse: 'unreadable', message: /cannot be read \(ELOOP\)/ } },
    { name: 'a dangling symlink', make: (p) => symlinkSync(p + '.gone', p), expect: { refuse: 'not-found', message: /does not exist/ } },
    {
      name: 'a sparse file of 1.1 GiB',
      make: (p) => { const fd = openSync(p, 'w'); ftruncateSync(fd, 1024 ** 3 + 4096 * 25_000); closeSync(fd); },
      expect: { refuse: 'too-large', message: /larger than 1 GiB/ },
    },
    // Well-formed files holding a design in progress: they open, and the checks name the fault.
    { name: 'load pointing at a missing domain', bytes: alter(demo, "UPDATE loads SET domain_id = 'nowhere' WHERE pos = 3"), expect: { opens: true, problemAt: /^loads\[3\]\.domainId$/ } },
    { name: 'negative load current', bytes: alter(demo, 'UPDATE load_currents SET current = -2 WHERE rowid = (SELECT min(rowid) FROM load_currents)'), expect: { opens: true, problemAt: /^loads\[\d+\]\.current/ } },
    { name: 'mode shares not summing to one', bytes: alter(demo, 'UPDATE modes SET share = 5 WHERE pos = 0'), expect: { opens: true, problemAt: /^modes/ } },
    {
      name: 'zero-byte WAL and journal beside the file',
      make: (p) => { writeFileSync(p, demo); writeFileSync(p + '-wal', ''); writeFileSync(p + '-journal', ''); },
      expect: { opens: true, sideFiles: ['-wal', '-journal'] },
    },
    {
      // A non-empty journal whose first byte is not zero is hot (SQLite's pager.c rule, from
      // memory): the file may be torn, so it is not read (issue 10; it used to open).
      name: 'garbage hot journal beside the file',
      make: (p) => { writeFileSync(p, demo); writeFileSync(p + '-journal', Buffer.concat([Buffer.from([0xd9]), random.subarray(1, 8192)])); },
      expect: { refuse: 'side-file', message: /rollback journal \S+-journal \(8192 bytes\)/ },
    },
    {
      // SQLite zeroes the header of a finished (or not yet synced) journal and ignores it.
      name: 'journal with a zeroed header beside the file',
      make: (p) => { writeFileSync(p, demo); writeFileSync(p + '-journal', Buffer.concat([Buffer.alloc(512), random.subarray(512, 4096)])); },
      expect: { opens: true, sideFiles: ['-journal'] },
    },
    {
      name: 'non-empty write-ahead log beside the file',
      make: (p) => { writeFileSync(p, demo); writeFileSync(p + '-wal', random.subarray(0, 4096)); },
      expect: { refuse: 'side-file', message: /write-ahead log beside it \(\S+-wal, 4096 bytes\)/ },
    },
    { name: 'a symlink to a good project', make: (p) => { writeFileSync(p + '.target', demo); symlinkSync(p + '.target', p); }, expect: { opens: true } },
  ];
  // A stored plan whose two stages feed each other (a loop no planner makes).
  const revision = demoDocument().requirements.meta.revision;
  const cyclic = {
    revision, rails: [], best: {
      id: 'loop', labels: ['best'], internalNodes: [], reasons: [], score: { loss: 0, cost: 0, parts: 0, weighted: 0 },
      stages: [
        { id: 'a', kind: 'buck', name: 'A', inputNodeId: 'rail:auto:main:3300:standard', outputs: [{ nodeId: 'rail:auto:main:1800:standard', role: 'output' }], barriers: [], design: {} },
        { id: 'b', kind: 'buck', name: 'B', inputNodeId: 'rail:auto:main:1800:standard', outputs: [{ nodeId: 'rail:auto:main:3300:standard', role: 'output' }], barriers: [], design: {} },
      ],
    }, alternatives: [], infeasible: [], stats: { explored: 0, provedOptimal: false, elapsedMs: 0, cancelled: false },
  };
  cyclic.alternatives = [cyclic.best] as never;
  cases.push({
    name: 'stored plan whose stages feed each other',
    bytes: alter(demo, "INSERT INTO plan_results (slot, revision, computed_at, result) VALUES (1, ?, 'now', ?)", [revision, JSON.stringify(cyclic)]),
    expect: { opens: true },
  });
  // JSON imports.
  const value = exportProjectValue(demoDocument());
  const json: [string, unknown, RegExp][] = [
    ['JSON of a newer format version', { ...value, version: 2 }, /version: format version is newer .* made by a newer Railwright/],
    ['JSON of another format', { ...value, format: 'spreadsheet' }, /format: not a Railwright project document/],
    ['JSON with a 10 MB name', { ...value, meta: { ...(value.meta as object), name: tenMb } }, /meta\.name: name is longer than 500/],
    ['JSON whose load points at a missing domain', { ...value, loads: (value.loads as Record<string, unknown>[]).map((l, i) => (i === 0 ? { ...l, domainId: 'nowhere' } : l)) }, /^$/],
  ];
  for (const [name, v, msg] of json) {
    cases.push({ name, json: JSON.stringify(v), expect: msg.source === '^$' ? { opens: true } : { refuse: 'json', message: msg } });
  }
  // Deep nesting, written as text (building it as a value would itself overflow the stack).
  for (const depth of [5_000, 200_000]) {
    const text = JSON.stringify({ ...value, meta: { ...(value.meta as object), deep: 0 } }).replace('"deep":0', `"deep":${'['.repeat(depth)}${']'.repeat(depth)}`);
    cases.push({ name: `JSON nested ${depth} levels deep in an unknown field`, json: text, expect: { either: true } });
  }
  cases.push({ name: 'JSON cut in the middle', json: JSON.stringify(value).slice(0, 500), expect: { refuse: 'json', message: /not valid JSON/ } });
  return cases;
}

function listing(dir: string): string[] {
  return readdirSync(dir).sort();
}

describe('bad files: a crafted corpus', () => {
  it('each file gets one clear message, stays byte-identical and untouched, and runs no planted SQL', { timeout: 180_000 }, () => {
    const cases = corpus();
    const root = scratchDir();
    const probeCases: ProbeCase[] = [];
    const before = new Map<string, { dir: string; path: string; hash: string | null; mtimeMs: number | null; list: string[]; side: Map<string, string> }>();
    cases.forEach((c, i) => {
      const dir = join(root, `case-${String(i).padStart(2, '0')}`);
      mkdirSync(dir);
      const path = join(dir, c.json !== undefined ? 'import.json' : 'project.rwproj');
      if (c.bytes) writeFileSync(path, c.bytes);
      else if (c.make) c.make(path);
      else writeFileSync(path, c.json!);
      // An old modification time, so any write (even of identical bytes) would show.
      let hash: string | null = null;
      let mtimeMs: number | null = null;
      try {
        const st = statSync(path);
        if (st.isFile() && st.size < 64 * 1024 * 1024) {
          utimesSync(path, new Date('2020-01-01T00:00:00Z'), new Date('2020-01-01T00:00:00Z'));
          hash = sha(readFileSync(path));
          mtimeMs = statSync(path).mtimeMs;
        }
      } catch { /* links to nowhere, loops */ }
      const side = new Map<string, string>();
      for (const suffix of ['-wal', '-journal']) if (existsSync(path + suffix)) side.set(suffix, sha(readFileSync(path + suffix)));
      before.set(c.name, { dir, path, hash, mtimeMs, list: listing(dir), side });
      probeCases.push(c.json !== undefined ? { name: c.name, jsonPath: path } : { name: c.name, path, saveTo: join(root, `saved-${i}.rwproj`) });
      if (c.liveTrigger) {
        // The planted trigger is live: the same change in a scratch copy fires it.
        expect(canaryCount(c.bytes!, c.liveTrigger), `${c.name}: trigger does not fire in a scratch copy`).toBeGreaterThan(0);
      }
    });
    const casesFile = join(root, 'cases.json');
    writeFileSync(casesFile, JSON.stringify(probeCases));

    const bundle = bundleChild('open-probe.ts');
    const run = spawnSync(process.execPath, [bundle, casesFile, join(ROOT, 'db/migrations')], { cwd: ROOT, encoding: 'utf8', timeout: 150_000, maxBuffer: 64 * 1024 * 1024 });
    const results = run.stdout.split('\n').filter(Boolean).map((l) => JSON.parse(l) as ProbeResult);
    const lastDone = results.at(-1)?.name ?? '(none)';
    expect(run.signal, `probe died or hung after case "${lastDone}": ${run.stderr.slice(-2000)}`).toBeNull();
    expect(run.status, `probe failed after case "${lastDone}": ${run.stderr.slice(-2000)}`).toBe(0);
    expect(results.map((r) => r.name)).toEqual(cases.map((c) => c.name));

    const table: string[] = [];
    cases.forEach((c, i) => {
      const r = results[i]!;
      const b = before.get(c.name)!;
      const where = `case "${c.name}"`;
      if ('either' in c.expect) {
        expect(r.host.ok || r.host.message.length > 0, where).toBe(true);
        table.push(`| ${c.name} | ${r.host.ok ? 'opens' : `refused: ${r.host.message.slice(0, 110)}`} |`);
      } else if ('refuse' in c.expect) {
        if (c.expect.refuse === 'json') {
          expect(r.host.ok, where).toBe(false);
          expect(r.host.message, where).toMatch(c.expect.message);
        } else {
          const st = r.store!;
          expect(st.opened, `${where}: the store opened it`).toBe(false);
          if (!st.opened) {
            expect(st.errorName, where).toBe('OpenError');
            expect(c.expect.refuse.split('|'), `${where}: kind ${st.kind}: ${st.message}`).toContain(st.kind);
            expect(st.message, where).toMatch(c.expect.message);
            expect(st.message, where).not.toContain('\n');
          }
          // The host says the same, in one sentence, and builds nothing from the file.
          expect(r.host.ok, where).toBe(false);
          expect(r.host.message, where).toBe(st.opened ? '' : st.message);
          expect(r.save, where).toBeUndefined();
        }
        table.push(`| ${c.name} | refused: ${r.store && !r.store.opened ? `${r.store.kind}: ` : ''}${(r.store && !r.store.opened ? r.store.message : r.host.message).replace(/\/tmp\/\S+/g, '<file>').slice(0, 110)} |`);
      } else {
        expect(r.host.ok, `${where}: ${r.host.message}`).toBe(true);
        if (r.store) {
          expect(r.store.opened, where).toBe(true);
          const at = 'problemAt' in c.expect ? c.expect.problemAt : undefined;
          if (at && r.store.opened) {
            expect(r.store.problems.map((p) => p.path).some((p) => at.test(p)), `${where}: ${JSON.stringify(r.store.problems)}`).toBe(true);
          }
        }
        if (r.save) expect(r.save.ok, `${where}: ${r.save.message}`).toBe(true);
        const probs = r.store?.opened ? r.store.problems.map((p) => `${p.path}: ${p.message}`) : [];
        table.push(`| ${c.name} | opens${probs.length ? `; flagged ${probs[0]!.slice(0, 90)}` : ''}${r.host.notes?.length ? `; note: ${r.host.notes[0]!.slice(0, 80)}` : ''} |`);
      }
      // Untouched: same bytes, same modification time, no new or changed side files.
      if (b.hash !== null) {
        expect(sha(readFileSync(b.path)), `${where}: file changed`).toBe(b.hash);
        expect(statSync(b.path).mtimeMs, `${where}: modification time changed`).toBe(b.mtimeMs);
      }
      expect(listing(b.dir), `${where}: files appeared or vanished beside it`).toEqual(b.list);
      for (const [suffix, h] of b.side) expect(sha(readFileSync(b.path + suffix)), `${where}: ${suffix} changed`).toBe(h);
      // Planted SQL never ran: nothing was saved from a refused file, and a saved copy carries no canary.
      if (c.liveTrigger) expect(existsSync(join(root, `saved-${i}.rwproj`)), where).toBe(false);
      if (existsSync(join(root, `saved-${i}.rwproj`))) {
        const db = new Database(readFileSync(join(root, `saved-${i}.rwproj`)));
        const extra = db.prepare("SELECT name FROM sqlite_master WHERE type IN ('trigger', 'view') OR name = 'canary'").all();
        db.close();
        expect(extra, where).toEqual([]);
      }
    });
    console.log(`bad files: ${cases.length} cases\n${table.join('\n')}`);
    expect(cases.length).toBeGreaterThanOrEqual(20);
  });

  it.skipIf(process.getuid?.() === 0)('refuses a file without read permission, leaving it as it was', () => {
    const dir = scratchDir();
    const p = join(dir, 'locked.rwproj');
    writeFileSync(p, savedDemoBytes());
    chmodSync(p, 0o000);
    expect(() => ProjectStore.open(p)).toThrow(expect.objectContaining({ kind: 'unreadable', message: expect.stringMatching(/cannot be read \(EACCES\)/) }));
    chmodSync(p, 0o644);
  });
});
