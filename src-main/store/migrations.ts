/**
 * Schema migrations of the project file: numbered SQL files in db/migrations
 * (`NNNN-name.sql`), applied in order, each in its own transaction, recorded in the
 * `applied_migrations` table; `PRAGMA user_version` holds the number of the last one and
 * `PRAGMA application_id` marks the file as ours.
 */
import Database from 'better-sqlite3';
import { existsSync, readFileSync, readdirSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

/** `PRAGMA application_id` of a project file: the ASCII bytes "RWPJ". */
export const APPLICATION_ID = 0x5257504a;

export interface Migration {
  number: number;
  name: string;
  sql: string;
}

let migrationsDirOverride: string | null = null;
let cache: { dir: string; list: Migration[] } | null = null;

/** Hosts that move the db folder (a packaged app) say where the migrations are. */
export function setMigrationsDir(dir: string | null): void {
  migrationsDirOverride = dir;
  cache = null;
}

function findMigrationsDir(): string {
  if (migrationsDirOverride) return migrationsDirOverride;
  const here = dirname(fileURLToPath(import.meta.url));
  const candidates = [
    resolve(here, '../../db/migrations'),
    resolve(here, '../db/migrations'),
    resolve(process.cwd(), 'db/migrations'),
  ];
  const found = candidates.find((d) => existsSync(d));
  if (!found) throw new Error(`the schema migrations (db/migrations) were not found near ${here}`);
  return found;
}

/** Read and order the migration files; numbers must run 1, 2, 3… without gaps. */
export function loadMigrations(dir = findMigrationsDir()): Migration[] {
  if (cache && cache.dir === dir) return cache.list;
  const list: Migration[] = [];
  for (const f of readdirSync(dir).sort()) {
    const m = /^(\d{4})-([a-z0-9-]+)\.sql$/.exec(f);
    if (!m) continue;
    list.push({ number: Number(m[1]), name: m[2]!, sql: readFileSync(join(dir, f), 'utf8') });
  }
  list.sort((a, b) => a.number - b.number);
  list.forEach((mg, i) => {
    if (mg.number !== i + 1) throw new Error(`migration numbers must run 1, 2, 3… without gaps: found ${mg.number} at position ${i + 1}`);
  });
  cache = { dir, list };
  return list;
}

/** The schema version this program writes: the number of the last migration. */
export function schemaVersion(): number {
  return loadMigrations().length;
}

export function userVersion(db: Database.Database): number {
  return db.pragma('user_version', { simple: true }) as number;
}

/**
 * Bring `db` up to `upTo` (default: all migrations). Each migration runs in one transaction
 * with its record and the user_version bump, so a failure leaves the previous version.
 * Returns the numbers applied.
 */
export function migrate(
  db: Database.Database,
  opts: { upTo?: number; now?: () => Date; migrations?: Migration[] } = {},
): number[] {
  const migrations = opts.migrations ?? loadMigrations();
  const now = opts.now ?? (() => new Date());
  const target = opts.upTo ?? migrations.length;
  const current = userVersion(db);
  if (current > migrations.length) {
    throw new Error(`schema version ${current} is newer than this program (${migrations.length})`);
  }
  db.pragma(`application_id = ${APPLICATION_ID}`);
  const applied: number[] = [];
  for (const m of migrations) {
    if (m.number <= current || m.number > target) continue;
    db.transaction(() => {
      db.exec(`CREATE TABLE IF NOT EXISTS applied_migrations (
        number INTEGER PRIMARY KEY, name TEXT NOT NULL, applied_at TEXT NOT NULL)`);
      db.exec(m.sql);
      db.prepare('INSERT INTO applied_migrations (number, name, applied_at) VALUES (?, ?, ?)')
        .run(m.number, m.name, now().toISOString());
      db.pragma(`user_version = ${m.number}`);
    })();
    applied.push(m.number);
  }
  return applied;
}

/** Tables a project at the current schema must have (checked by tests against expectedTables). */
export const REQUIRED_TABLES = [
  'applied_migrations', 'meta', 'sources', 'domains', 'modes', 'loads', 'load_currents',
  'limits', 'preferences', 'plan_results', 'part_library',
] as const;

const tablesCache = new Map<number, string[]>();

/**
 * The tables a file of schema `version` must have: found by running the migrations up to
 * that version on an empty in-memory database (so a new migration needs no list to update).
 */
export function expectedTables(version: number): string[] {
  const hit = tablesCache.get(version);
  if (hit) return hit;
  const db = new Database(':memory:');
  try {
    migrate(db, { upTo: version, now: () => new Date(0) });
    const names = (db.prepare("SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name").all() as { name: string }[]).map((r) => r.name);
    tablesCache.set(version, names);
    return names;
  } finally {
    db.close();
  }
}
