/**
 * The project store. A project file (extension PROJECT_EXTENSION) is one SQLite database.
 * The open document lives in an in-memory database; Save writes a complete, self-contained
 * copy to a temporary file in the target's folder, flushes it to disk and renames it over
 * the target in one step, so a crash during a save leaves the previous saved state intact
 * and no side files are ever needed. Open reads the file's bytes and checks them without
 * writing: the file on disk changes only on Save.
 *
 * The file is shared with other programs (a second window, the CLI, an SQLite browser, a
 * sync client), so open and save also guard it (see sharing.ts): a file with another
 * program's unfinished change beside it (a hot rollback journal or a write-ahead log) is
 * neither read nor replaced; the content identity read at open is compared at save, so a
 * newer version written by someone else is never silently replaced; and the save holds
 * SQLite's write lock on the old file while it renames, so a concurrent SQLite writer is
 * detected instead of losing its commit.
 */
import Database from 'better-sqlite3';
import {
  closeSync, existsSync, fsyncSync, linkSync, openSync, readdirSync, readFileSync, renameSync, statSync, unlinkSync, writeSync,
} from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import { PROJECT_EXTENSION } from '../../electron.config.ts';
import {
  DEFAULT_LIMITS, DEFAULT_PREFERENCES, type PartLibraryRow, type Requirements,
} from '../engine/model.ts';
import type { PlanResult } from '../engine/plan-types.ts';
import {
  checkLibraryShape, checkPlanShape, checkRequirementsShape, jsonTextProblem, type ProjectDocument, type StoredPlan,
} from './json-format.ts';
import { APPLICATION_ID, expectedTables, migrate, schemaVersion, userVersion } from './migrations.ts';
import {
  identityOf, lockForSave, sideFileProblem, SaveRefused, type FileIdentity,
} from './sharing.ts';
import { StoreError } from './store-error.ts';

export { PROJECT_EXTENSION, APPLICATION_ID, SaveRefused, StoreError, type FileIdentity };

export type OpenErrorKind =
  | 'not-found' | 'not-a-file' | 'unreadable' | 'too-large' | 'empty' | 'not-sqlite'
  | 'truncated' | 'corrupt' | 'foreign' | 'newer' | 'incomplete'
  /** Another program's unfinished change sits beside the file (hot journal, write-ahead log). */
  | 'side-file'
  /** Another program is writing the file right now. */
  | 'in-use';

/** Why a file cannot be opened: one kind and one clear sentence. The file is untouched. */
export class OpenError extends Error {
  constructor(readonly kind: OpenErrorKind, message: string, readonly path: string) {
    super(message.replace(/\s*\n\s*/g, ' '));
    this.name = 'OpenError';
  }
}


export interface StoreOptions {
  /** Clock for created/modified/computed times (tests pass a fixed one). */
  clock?: () => Date;
  /**
   * Content identity of the file at `path` this document was read from (a recovery copy
   * carries the one its original was opened with). Save to that path refuses when the
   * file no longer matches it.
   */
  baseline?: FileIdentity | null;
}

export interface SaveOptions {
  /**
   * The user explicitly agreed to replace whatever file is at the target (CLI `--force`,
   * a confirmed "replace?" in the window). Without it, Save As refuses an existing file
   * and Save refuses a file changed since it was read. Never overrides the side-file and
   * lock checks.
   */
  overwrite?: boolean;
}

/** A saved plan result as the store returns it. */
export interface SavedPlan extends StoredPlan {
  /** True when the requirements have changed since the plan was computed. */
  stale: boolean;
}

/** Largest project file we read (far above any real project). */
const MAX_FILE_BYTES = 1024 * 1024 * 1024;
const SQLITE_MAGIC = Buffer.from('SQLite format 3\0', 'latin1');

/** The starting content of a new project: one source, one domain, one mode, no loads. */
export function newRequirements(): Requirements {
  return {
    meta: { name: 'Untitled project', description: '', revision: 0 },
    sources: [{ id: 'src-1', name: 'Input', vNom: 12, vMin: 10.8, vMax: 13.2, currentLimit: 1 } as Requirements['sources'][number]],
    domains: [{ id: 'dom-1', name: 'Main', isolation: 'none', workingVoltage: 0 } as Requirements['domains'][number]],
    modes: [{ id: 'mode-1', name: 'Run', share: 1 } as Requirements['modes'][number]],
    loads: [],
    limits: { ...DEFAULT_LIMITS },
    preferences: { ...DEFAULT_PREFERENCES, weights: { ...DEFAULT_PREFERENCES.weights }, allowedKinds: [...DEFAULT_PREFERENCES.allowedKinds] },
  };
}

type Row = Record<string, unknown>;

/**
 * Parse one stored JSON value. `where` names the table, row and column. The same depth and
 * size limits as the JSON importer apply, checked on the text before parsing (no
 * recursion), so a hostile cell is refused here instead of overflowing the stack later.
 */
function parseJson(text: unknown, where: string): unknown {
  const t = String(text);
  const problem = jsonTextProblem(t);
  if (problem) throw new Error(`damaged value in ${where}: ${problem}`);
  try {
    return JSON.parse(t);
  } catch {
    throw new Error(`damaged value in ${where}`);
  }
}

/** Known fields first (in model order), then the extras kept from newer model versions. */
function withExtra(known: Row, extraText: unknown, where: string): Row {
  const extra = parseJson(extraText, where) as Row;
  return { ...known, ...extra, ...known };
}

function splitExtra(obj: Row, known: readonly string[]): string {
  const extra: Row = {};
  for (const [k, v] of Object.entries(obj)) if (!known.includes(k) && v !== undefined) extra[k] = v;
  return storableJson(extra, `extra fields of ${String(obj.id)}`);
}

/** JSON text of a value to store, refused (StoreError) when the reader would refuse it. */
function storableJson(value: unknown, what: string): string {
  let text: string;
  try {
    text = JSON.stringify(value);
  } catch (e) {
    throw new StoreError(`${what} refused: ${(e as Error).message}`);
  }
  const problem = jsonTextProblem(text);
  if (problem) throw new StoreError(`${what} refused: ${problem}`);
  return text;
}

let saveCounter = 0;

/** JSON with object keys sorted, so equal content compares equal whatever the key order. */
export function canonicalJson(x: unknown): string {
  return JSON.stringify(x, (_k, v: unknown) => {
    if (v && typeof v === 'object' && !Array.isArray(v)) {
      const o = v as Record<string, unknown>;
      return Object.fromEntries(Object.keys(o).sort().map((k) => [k, o[k]]));
    }
    return v;
  });
}

export class ProjectStore {
  private db: Database.Database;
  private filePath: string | null;
  private isDirty = false;
  private readonly clock: () => Date;
  /** What the file at `filePath` held when it was read or last saved (null: not known). */
  private diskIdentity: FileIdentity | null;

  private constructor(db: Database.Database, path: string | null, opts: StoreOptions) {
    this.db = db;
    this.filePath = path;
    this.clock = opts.clock ?? (() => new Date());
    this.diskIdentity = opts.baseline ?? null;
  }

  /** A new, unsaved project in memory. */
  static create(opts: StoreOptions = {}): ProjectStore {
    const db = new Database(':memory:');
    const store = new ProjectStore(db, null, opts);
    const at = store.clock();
    migrate(db, { now: () => at });
    const now = at.toISOString();
    store.writeRequirements(newRequirements(), 0);
    store.setMetaValue('created', now);
    store.setMetaValue('modified', now);
    return store;
  }

  /** A new, unsaved project holding a whole document (JSON import, demo). */
  static fromDocument(doc: ProjectDocument, opts: StoreOptions = {}): ProjectStore {
    const store = ProjectStore.create(opts);
    try {
      store.setRequirements(doc.requirements, { keepRevision: true });
      if (doc.created !== undefined) store.setMetaValue('created', doc.created);
      if (doc.modified !== undefined) store.setMetaValue('modified', doc.modified);
      if (doc.plan) store.setPlanResult(doc.plan.result, doc.plan.computedAt);
      store.setLibrary(doc.library ?? []);
    } catch (e) {
      store.close();
      throw e;
    }
    store.isDirty = true;
    return store;
  }

  /**
   * Open a project file. Checks it without writing (exists, readable, SQLite header, ours,
   * not newer, intact, required tables); an older schema is migrated in memory only.
   * Throws OpenError with one clear message.
   */
  static open(path: string, opts: StoreOptions = {}): ProjectStore {
    const bytes = readProjectBytes(path);
    return ProjectStore.fromBytes(bytes, path, { ...opts, baseline: identityOf(bytes) });
  }

  /** Open a project from the bytes of a project file (recovery copies use this). */
  static fromBytes(bytes: Buffer, path: string | null, opts: StoreOptions = {}, shownAs = path ?? 'the data'): ProjectStore {
    checkHeader(bytes, shownAs);
    let db: Database.Database;
    try {
      db = new Database(bytes);
    } catch (e) {
      throw new OpenError('corrupt', `${shownAs} is damaged and cannot be read (${(e as Error).message})`, shownAs);
    }
    try {
      let check: unknown;
      try {
        check = db.pragma('quick_check', { simple: true });
      } catch (e) {
        throw new OpenError('corrupt', `${shownAs} is damaged and cannot be read (${(e as Error).message})`, shownAs);
      }
      if (check !== 'ok') {
        const first = String(check).split('\n')[0]!.slice(0, 200);
        throw new OpenError('corrupt', `${shownAs} is damaged: the database integrity check failed (${first})`, shownAs);
      }
      // Our migrations create no triggers or views: one found here was planted, and it would
      // run (or shadow data) on the next edit, migration or save. Refuse before any write.
      const planted = db.prepare("SELECT type, name FROM sqlite_master WHERE type IN ('trigger', 'view') ORDER BY type, name LIMIT 1")
        .get() as { type: string; name: string } | undefined;
      if (planted) {
        throw new OpenError('foreign', `${shownAs} contains a ${planted.type} "${planted.name.slice(0, 80)}" that Railwright never writes: refused so that no SQL stored in the file can run`, shownAs);
      }
      const version = userVersion(db);
      const tables = new Set((db.prepare("SELECT name FROM sqlite_master WHERE type = 'table'").all() as { name: string }[]).map((r) => r.name));
      const missing = expectedTables(version).filter((t) => !tables.has(t));
      if (missing.length) {
        throw new OpenError('incomplete', `${shownAs} is not a complete Railwright project: table ${missing.join(', ')} is missing`, shownAs);
      }
      const store = new ProjectStore(db, path, opts);
      if (version < schemaVersion()) migrate(db, { now: store.clock });
      try {
        // Everything must read back in the shape the program expects, or the file is damaged.
        const shape = checkRequirementsShape(store.getRequirements());
        if (shape.length) throw new Error(`${shape[0]!.path}: ${shape[0]!.message}`);
        const plan = store.getPlanResult();
        if (plan) {
          const p = checkPlanShape({ revision: plan.revision, computedAt: plan.computedAt, result: plan.result });
          if (p.length) throw new Error(`${p[0]!.path}: ${p[0]!.message}`);
        }
        const lib = checkLibraryShape(store.getLibrary());
        if (lib.length) throw new Error(`${lib[0]!.path}: ${lib[0]!.message}`);
      } catch (e) {
        throw new OpenError('corrupt', `${shownAs} is damaged: ${(e as Error).message}`, shownAs);
      }
      return store;
    } catch (e) {
      db.close();
      throw e;
    }
  }

  get path(): string | null {
    return this.filePath;
  }

  /** Content identity of the file at `path` when it was read or last saved (null: unknown). */
  get baseline(): FileIdentity | null {
    return this.diskIdentity;
  }

  /** True when the document has changes not yet saved. */
  get dirty(): boolean {
    return this.isDirty;
  }

  get revision(): number {
    return Number(this.getMetaValue('revision') ?? 0);
  }

  get created(): string {
    return String(this.getMetaValue('created') ?? '');
  }

  get modified(): string {
    return String(this.getMetaValue('modified') ?? '');
  }

  /** Schema version of the open document (after any in-memory migration). */
  get schemaVersion(): number {
    return userVersion(this.db);
  }

  private getMetaValue(key: string): unknown {
    const row = this.db.prepare('SELECT value FROM meta WHERE key = ?').get(key) as { value: string } | undefined;
    return row ? parseJson(row.value, `meta.${key} (table meta, row "${key}", column value)`) : undefined;
  }

  private setMetaValue(key: string, value: unknown): void {
    this.db.prepare('INSERT INTO meta (key, value) VALUES (?, ?) ON CONFLICT(key) DO UPDATE SET value = excluded.value')
      .run(key, JSON.stringify(value));
  }

  getRequirements(): Requirements {
    const db = this.db;
    const metaRows = db.prepare('SELECT key, value FROM meta ORDER BY rowid').all() as { key: string; value: string }[];
    const meta: Row = { name: '', description: '', revision: 0 };
    for (const r of metaRows) {
      if (r.key === 'created' || r.key === 'modified') continue;
      meta[r.key] = parseJson(r.value, `meta.${r.key} (table meta, row "${r.key}", column value)`);
    }
    const sources = (db.prepare('SELECT * FROM sources ORDER BY pos').all() as Row[]).map((r) => withExtra({
      id: r.id, name: r.name, vNom: r.v_nom, vMin: r.v_min, vMax: r.v_max, currentLimit: r.current_limit,
    }, r.extra, `source ${String(r.id)} (table sources, row "${String(r.id)}", column extra)`));
    const domains = (db.prepare('SELECT * FROM domains ORDER BY pos').all() as Row[]).map((r) => withExtra({
      id: r.id, name: r.name, isolation: r.isolation, workingVoltage: r.working_voltage,
    }, r.extra, `domain ${String(r.id)} (table domains, row "${String(r.id)}", column extra)`));
    const modes = (db.prepare('SELECT * FROM modes ORDER BY pos').all() as Row[]).map((r) => withExtra({
      id: r.id, name: r.name, share: r.share,
    }, r.extra, `mode ${String(r.id)} (table modes, row "${String(r.id)}", column extra)`));
    const currents = new Map<string, Row>();
    for (const c of db.prepare('SELECT load_id, mode_id, current FROM load_currents ORDER BY load_id, pos').all() as Row[]) {
      const id = String(c.load_id);
      let m = currents.get(id);
      if (!m) currents.set(id, (m = {}));
      m[String(c.mode_id)] = c.current;
    }
    const loads = (db.prepare('SELECT * FROM loads ORDER BY pos').all() as Row[]).map((r) => {
      const known: Row = {
        id: r.id, name: r.name, domainId: r.domain_id, voltage: r.voltage, tolerance: r.tolerance,
        current: currents.get(String(r.id)) ?? {}, rippleLimit: r.ripple_limit, noiseClass: r.noise_class,
      };
      if (r.rail_key !== null) known.railKey = r.rail_key;
      return withExtra(known, r.extra, `load ${String(r.id)} (table loads, row "${String(r.id)}", column extra)`);
    });
    const kv = (table: 'limits' | 'preferences') => {
      const o: Row = {};
      for (const r of db.prepare(`SELECT key, value FROM ${table} ORDER BY rowid`).all() as { key: string; value: string }[]) {
        o[r.key] = parseJson(r.value, `${table}.${r.key} (table ${table}, row "${r.key}", column value)`);
      }
      return o;
    };
    return {
      meta, sources, domains, modes, loads, limits: kv('limits'), preferences: kv('preferences'),
    } as unknown as Requirements;
  }

  /**
   * Replace the requirements. Refuses (StoreError, nothing changed) a value of the wrong
   * shape; semantic problems are allowed (a design in progress) and reported by
   * validateRequirements. Bumps the revision when anything changed, unless `keepRevision`
   * (import) takes the revision from the value. Returns the revision.
   */
  setRequirements(req: Requirements, opts: { keepRevision?: boolean } = {}): number {
    const problems = checkRequirementsShape(req);
    if (problems.length) throw new StoreError('requirements refused', problems);
    const current = this.getRequirements();
    const strip = (r: Requirements) => canonicalJson({ ...r, meta: { ...r.meta, revision: 0 } });
    if (opts.keepRevision) {
      if (strip(current) === strip(req) && current.meta.revision === req.meta.revision) return req.meta.revision;
      this.writeRequirements(req, req.meta.revision);
    } else {
      if (strip(current) === strip(req)) return current.meta.revision;
      this.writeRequirements(req, current.meta.revision + 1);
    }
    this.isDirty = true;
    return this.revision;
  }

  private writeRequirements(req: Requirements, revision: number): void {
    const db = this.db;
    db.transaction(() => {
      for (const t of ['sources', 'domains', 'modes', 'load_currents', 'loads', 'limits', 'preferences']) db.exec(`DELETE FROM ${t}`);
      db.exec("DELETE FROM meta WHERE key NOT IN ('created', 'modified')");
      for (const [k, v] of Object.entries({ ...req.meta, revision })) {
        if (k === 'created' || k === 'modified' || v === undefined) continue;
        this.setMetaValue(k, v);
      }
      const insS = db.prepare('INSERT INTO sources (id, pos, name, v_nom, v_min, v_max, current_limit, extra) VALUES (?, ?, ?, ?, ?, ?, ?, ?)');
      req.sources.forEach((s, i) => insS.run(s.id, i, s.name, s.vNom, s.vMin, s.vMax, s.currentLimit,
        splitExtra(s as unknown as Row, ['id', 'name', 'vNom', 'vMin', 'vMax', 'currentLimit'])));
      const insD = db.prepare('INSERT INTO domains (id, pos, name, isolation, working_voltage, extra) VALUES (?, ?, ?, ?, ?, ?)');
      req.domains.forEach((d, i) => insD.run(d.id, i, d.name, d.isolation, d.workingVoltage,
        splitExtra(d as unknown as Row, ['id', 'name', 'isolation', 'workingVoltage'])));
      const insM = db.prepare('INSERT INTO modes (id, pos, name, share, extra) VALUES (?, ?, ?, ?, ?)');
      req.modes.forEach((m, i) => insM.run(m.id, i, m.name, m.share, splitExtra(m as unknown as Row, ['id', 'name', 'share'])));
      const insL = db.prepare(`INSERT INTO loads (id, pos, name, domain_id, voltage, tolerance, ripple_limit, noise_class, rail_key, extra)
        VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`);
      const insC = db.prepare('INSERT INTO load_currents (load_id, mode_id, pos, current) VALUES (?, ?, ?, ?)');
      req.loads.forEach((l, i) => {
        insL.run(l.id, i, l.name, l.domainId, l.voltage, l.tolerance, l.rippleLimit, l.noiseClass, l.railKey ?? null,
          splitExtra(l as unknown as Row, ['id', 'name', 'domainId', 'voltage', 'tolerance', 'current', 'rippleLimit', 'noiseClass', 'railKey']));
        Object.entries(l.current).forEach(([mode, a], j) => insC.run(l.id, mode, j, a));
      });
      const insLim = db.prepare('INSERT INTO limits (key, value) VALUES (?, ?)');
      for (const [k, v] of Object.entries(req.limits)) if (v !== undefined) insLim.run(k, JSON.stringify(v));
      const insP = db.prepare('INSERT INTO preferences (key, value) VALUES (?, ?)');
      for (const [k, v] of Object.entries(req.preferences)) if (v !== undefined) insP.run(k, JSON.stringify(v));
    })();
  }

  /** The saved plan result, marked stale when the requirements moved on; null if none. */
  getPlanResult(): SavedPlan | null {
    const row = this.db.prepare('SELECT revision, computed_at, result FROM plan_results WHERE slot = 1').get() as
      { revision: number; computed_at: string; result: string } | undefined;
    if (!row) return null;
    const result = parseJson(row.result, 'plan result (table plan_results, column result)') as PlanResult;
    return { revision: row.revision, computedAt: row.computed_at, result, stale: row.revision !== this.revision };
  }

  /** Save a plan result; it remembers `result.revision`, the requirements it was made from. */
  setPlanResult(result: PlanResult, computedAt: string = this.clock().toISOString()): void {
    const problems = checkPlanShape({ revision: result?.revision, computedAt, result });
    if (problems.length) throw new StoreError('plan result refused', problems);
    this.db.prepare(`INSERT INTO plan_results (slot, revision, computed_at, result) VALUES (1, ?, ?, ?)
      ON CONFLICT(slot) DO UPDATE SET revision = excluded.revision, computed_at = excluded.computed_at, result = excluded.result`)
      .run(result.revision, computedAt, storableJson(result, 'plan result'));
    this.isDirty = true;
  }

  clearPlanResult(): void {
    if (this.db.prepare('DELETE FROM plan_results').run().changes > 0) this.isDirty = true;
  }

  getLibrary(): PartLibraryRow[] {
    return (this.db.prepare('SELECT id, part_class, name, cost, params FROM part_library ORDER BY pos').all() as Row[]).map((r) => ({
      id: String(r.id), partClass: String(r.part_class), name: String(r.name), cost: Number(r.cost),
      params: parseJson(r.params, `part library row ${String(r.id)} (table part_library, row "${String(r.id)}", column params)`) as Record<string, unknown>,
    }));
  }

  /** Replace the project's part library (ids unique; params kept verbatim). */
  setLibrary(rows: PartLibraryRow[]): void {
    const problems = checkLibraryShape(rows);
    if (problems.length) throw new StoreError('part library refused', problems);
    if (canonicalJson(this.getLibrary()) === canonicalJson(rows)) return;
    const db = this.db;
    db.transaction(() => {
      db.exec('DELETE FROM part_library');
      const ins = db.prepare('INSERT INTO part_library (id, pos, part_class, name, cost, params) VALUES (?, ?, ?, ?, ?, ?)');
      rows.forEach((r, i) => ins.run(r.id, i, r.partClass, r.name, r.cost, storableJson(r.params, `part library row ${r.id}`)));
    })();
    this.isDirty = true;
  }

  /** The whole project as plain data (for JSON export). */
  toDocument(): ProjectDocument {
    const doc: ProjectDocument = {
      requirements: this.getRequirements(),
      created: this.created,
      modified: this.modified,
      library: this.getLibrary(),
    };
    const plan = this.getPlanResult();
    if (plan) doc.plan = { revision: plan.revision, computedAt: plan.computedAt, result: plan.result };
    return doc;
  }

  /** A complete project file image of the working copy (recovery uses it). */
  serialize(): Buffer {
    return this.db.serialize();
  }

  /**
   * Write the project to `path` (Save As) or to its own path (Save). The bytes go to a
   * temporary file in the same folder, are flushed to disk, and replace the target by an
   * atomic rename; on any failure the previous file is untouched and the temp is removed.
   *
   * Refuses (SaveRefused, nothing written) when the target has another program's
   * unfinished change beside it or is locked by an SQLite writer; when Save As meets an
   * existing file, or Save finds its file changed since it was read, unless
   * `opts.overwrite`.
   */
  save(path?: string, opts: SaveOptions = {}): void {
    const target = path ?? this.filePath;
    if (!target) throw new StoreError('the project has no file name yet: choose one (Save As)');
    const own = this.filePath !== null && resolve(target) === resolve(this.filePath);
    const lock = lockForSave(target, { own, baseline: own ? this.diskIdentity : null, overwrite: opts.overwrite === true });
    const prevModified = this.getMetaValue('modified');
    this.setMetaValue('modified', this.clock().toISOString());
    let bytes: Buffer;
    try {
      bytes = this.db.serialize();
      // Windows cannot rename over a file that is open (our lock holds it open): there the
      // lock is let go just before the rename, and the system itself refuses the rename
      // while another program has the file open.
      writeFileAtomic(target, bytes, {
        replace: lock.existed,
        ...(process.platform === 'win32' ? { beforeRename: () => lock.release() } : {}),
      });
    } catch (e) {
      this.setMetaValue('modified', prevModified);
      if ((e as NodeJS.ErrnoException).code === 'EEXIST') {
        throw new SaveRefused('exists', `${target} appeared while saving (another program made it): nothing was written; save again to choose`, target);
      }
      throw new StoreError(`could not save to ${target}: ${(e as Error).message}`);
    } finally {
      lock.release();
    }
    this.filePath = target;
    this.diskIdentity = identityOf(bytes);
    this.isDirty = false;
    removeStaleTemps(target);
  }

  /** Mark the document as changed (a restored recovery copy is unsaved work). */
  markDirty(): void {
    this.isDirty = true;
  }

  close(): void {
    if (this.db.open) this.db.close();
  }
}

export interface AtomicWriteOptions {
  /**
   * Replace an existing target (the default). With `false` the new file is linked into
   * place only if nothing is there (an error with code EEXIST otherwise), so a file that
   * appears between a check and the write is never replaced.
   */
  replace?: boolean;
  /** Called after the bytes are on disk, just before the rename. */
  beforeRename?: () => void;
}

/** Errors of link() meaning "this file system has no hard links" (then: check, rename). */
const NO_LINKS = new Set(['EPERM', 'ENOTSUP', 'EOPNOTSUPP', 'ENOSYS', 'EXDEV', 'EMLINK', 'EACCES']);

/**
 * Write bytes to `target` so that readers see either the old file or the complete new one:
 * temp file in the same folder (same file system), fsync, rename, fsync the folder.
 */
export function writeFileAtomic(target: string, bytes: Uint8Array, opts: AtomicWriteOptions = {}): void {
  const dir = dirname(target);
  const tmp = join(dir, `.${basename(target)}.${process.pid}-${++saveCounter}.saving`);
  let fd: number | null = null;
  try {
    fd = openSync(tmp, 'wx', 0o644);
    let off = 0;
    while (off < bytes.length) off += writeSync(fd, bytes, off, bytes.length - off);
    fsyncSync(fd);
    closeSync(fd);
    fd = null;
    opts.beforeRename?.();
    if (opts.replace === false) placeNew(tmp, target);
    else renameSync(tmp, target);
  } catch (e) {
    if (fd !== null) try { closeSync(fd); } catch { /* already failing */ }
    try { unlinkSync(tmp); } catch { /* not created */ }
    throw e;
  }
  // Make the rename itself durable where the platform allows syncing a directory.
  try {
    const dfd = openSync(dir, 'r');
    try { fsyncSync(dfd); } finally { closeSync(dfd); }
  } catch { /* not supported here (e.g. Windows); the rename is still atomic */ }
}

/** Put `tmp` at `target` only if nothing is there; the temp name is gone afterwards. */
function placeNew(tmp: string, target: string): void {
  try {
    linkSync(tmp, target);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code ?? '';
    if (!NO_LINKS.has(code)) throw e;
    // No hard links here: check, then rename (a narrow window instead of none).
    if (existsSync(target)) throw Object.assign(new Error(`${target} already exists`), { code: 'EEXIST' });
    renameSync(tmp, target);
    return;
  }
  unlinkSync(tmp);
}

/**
 * Remove temp files a crashed save of `target` left behind (`.<name>.<pid>-<n>.saving`
 * whose process is gone). Best effort: a file that cannot be removed stays.
 */
export function removeStaleTemps(target: string): string[] {
  const dir = dirname(target);
  const prefix = `.${basename(target)}.`;
  const removed: string[] = [];
  let names: string[];
  try {
    names = readdirSync(dir);
  } catch {
    return removed;
  }
  for (const n of names) {
    if (!n.startsWith(prefix) || !n.endsWith('.saving')) continue;
    const m = /^(\d+)-\d+\.saving$/.exec(n.slice(prefix.length));
    if (!m) continue;
    const pid = Number(m[1]);
    if (pid === process.pid || processAlive(pid)) continue;
    try {
      unlinkSync(join(dir, n));
      removed.push(n);
    } catch { /* leave it */ }
  }
  return removed;
}

function processAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/**
 * Read a project file's bytes, refusing what cannot be a project. Never writes. A file
 * with another program's unfinished change beside it is refused before it is read, so its
 * torn content is never shown.
 */
export function readProjectBytes(path: string): Buffer {
  let st;
  try {
    st = statSync(path);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    if (code === 'ENOENT' || code === 'ENOTDIR') throw new OpenError('not-found', `${path} does not exist`, path);
    throw new OpenError('unreadable', `${path} cannot be read (${code ?? (e as Error).message})`, path);
  }
  if (!st.isFile()) throw new OpenError('not-a-file', `${path} is not a file`, path);
  if (st.size > MAX_FILE_BYTES) throw new OpenError('too-large', `${path} is larger than 1 GiB: not a Railwright project`, path);
  const side = sideFileProblem(path);
  if (side) throw new OpenError(side.kind === 'in-use' ? 'in-use' : 'side-file', `${side.message}. The file was not opened`, path);
  try {
    return readFileSync(path);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new OpenError('unreadable', `${path} cannot be read (${code ?? (e as Error).message})`, path);
  }
}

/** Check the 100-byte SQLite header (file format, application id, schema version). */
function checkHeader(b: Buffer, shown: string): void {
  if (b.length === 0) throw new OpenError('empty', `${shown} is empty (0 bytes): not a Railwright project`, shown);
  const magicLen = Math.min(b.length, SQLITE_MAGIC.length);
  if (!b.subarray(0, magicLen).equals(SQLITE_MAGIC.subarray(0, magicLen))) {
    throw new OpenError('not-sqlite', `${shown} is not a Railwright project (not an SQLite database file)`, shown);
  }
  if (b.length < 100) throw new OpenError('truncated', `${shown} is truncated (${b.length} bytes): the file is incomplete`, shown);
  const rawPage = b.readUInt16BE(16);
  const pageSize = rawPage === 1 ? 65536 : rawPage;
  if (pageSize < 512 || (pageSize & (pageSize - 1)) !== 0) {
    throw new OpenError('corrupt', `${shown} is damaged (invalid page size ${rawPage} in the header)`, shown);
  }
  const appId = b.readUInt32BE(68);
  if (appId !== APPLICATION_ID) {
    throw new OpenError('foreign', `${shown} is an SQLite database of another program, not a Railwright project`, shown);
  }
  const version = b.readUInt32BE(60);
  const ours = schemaVersion();
  if (version > ours) {
    throw new OpenError('newer', `${shown} was made by a newer Railwright (file schema ${version}, this program reads up to ${ours}); update Railwright to open it`, shown);
  }
  if (version < 1) throw new OpenError('incomplete', `${shown} is not a complete Railwright project (no schema)`, shown);
  if (b.length % pageSize !== 0) {
    throw new OpenError('truncated', `${shown} is truncated (${b.length} bytes is not a whole number of ${pageSize}-byte pages)`, shown);
  }
  // The in-header page count is valid when the change counter matches "version valid for".
  const pages = b.readUInt32BE(28);
  if (b.readUInt32BE(24) === b.readUInt32BE(92) && pages > 0 && pages * pageSize > b.length) {
    throw new OpenError('truncated', `${shown} is truncated (${b.length} of ${pages * pageSize} bytes)`, shown);
  }
  if (b[18] === 2 || b[19] === 2) {
    throw new OpenError('corrupt', `${shown} is in write-ahead-log mode, which Railwright never writes; it may depend on a side file`, shown);
  }
}

/** Whether a path has the project file extension. */
export function hasProjectExtension(path: string): boolean {
  return path.toLowerCase().endsWith(PROJECT_EXTENSION);
}
