/**
 * Autosave and recovery. The host periodically writes the working copy of a dirty project
 * to a recovery folder; after an unclean exit it lists what is there and offers to restore.
 * Each recovery slot is a complete project file (`<key>.rwrecover`) plus a small JSON note
 * (`<key>.json`) saying which file it belongs to and when it was written. Both are written
 * atomically; a slot whose note or copy is damaged is listed as unusable, never thrown.
 */
import { mkdirSync, readdirSync, readFileSync, unlinkSync } from 'node:fs';
import { join } from 'node:path';
import { OpenError, ProjectStore, writeFileAtomic, type FileIdentity, type StoreOptions } from './project-store.ts';

export const RECOVERY_EXTENSION = '.rwrecover';

export interface RecoveryEntry {
  key: string;
  /** The project file the copy belongs to; null for a project never saved. */
  originalPath: string | null;
  name: string;
  /** ISO 8601 time the copy was written. */
  writtenAt: string;
  revision: number;
  file: string;
  /**
   * What the original file held when the project was read from it (or last saved), so a
   * restored copy is never saved over a version someone else saved since; null if unknown.
   */
  baseline: FileIdentity | null;
}

/** Keys are plain file names: letters, digits, dash, underscore. */
function checkKey(key: string): void {
  if (!/^[A-Za-z0-9_-]{1,80}$/.test(key)) throw new Error(`recovery key "${key}" must be 1-80 letters, digits, dashes or underscores`);
}

/**
 * Write the working copy of `store` to the recovery folder under `key` (one key per open
 * window or session). Returns the entry written.
 */
export function writeRecovery(store: ProjectStore, dir: string, key: string, now: Date = new Date()): RecoveryEntry {
  checkKey(key);
  mkdirSync(dir, { recursive: true });
  const req = store.getRequirements();
  const file = join(dir, key + RECOVERY_EXTENSION);
  const entry: RecoveryEntry = {
    key, originalPath: store.path, name: req.meta.name, writtenAt: now.toISOString(), revision: req.meta.revision, file,
    baseline: store.baseline,
  };
  writeFileAtomic(file, store.serialize());
  writeFileAtomic(join(dir, key + '.json'), Buffer.from(JSON.stringify(entry, null, 2) + '\n'));
  return entry;
}

/** The recovery copies in `dir`, newest first. A missing folder lists nothing. */
export function listRecovery(dir: string): RecoveryEntry[] {
  let names: string[];
  try {
    names = readdirSync(dir);
  } catch {
    return [];
  }
  const out: RecoveryEntry[] = [];
  for (const n of names) {
    if (!n.endsWith(RECOVERY_EXTENSION)) continue;
    const key = n.slice(0, -RECOVERY_EXTENSION.length);
    let note: Partial<RecoveryEntry> = {};
    try {
      note = JSON.parse(readFileSync(join(dir, key + '.json'), 'utf8')) as Partial<RecoveryEntry>;
    } catch { /* a copy without its note still lists, with what we know */ }
    out.push({
      key,
      originalPath: typeof note.originalPath === 'string' ? note.originalPath : null,
      name: typeof note.name === 'string' ? note.name : key,
      writtenAt: typeof note.writtenAt === 'string' ? note.writtenAt : '',
      revision: typeof note.revision === 'number' ? note.revision : 0,
      file: join(dir, n),
      baseline: isIdentity(note.baseline) ? note.baseline : null,
    });
  }
  return out.sort((a, b) => b.writtenAt.localeCompare(a.writtenAt) || a.key.localeCompare(b.key));
}

/**
 * Open a recovery copy as an unsaved document belonging to its original path (Save then
 * writes the original). Throws OpenError when the copy is damaged.
 */
export function restoreRecovery(entry: RecoveryEntry, opts: StoreOptions = {}): ProjectStore {
  const bytes = readFileSync(entry.file);
  const store = ProjectStore.fromBytes(bytes, entry.originalPath, { ...opts, baseline: entry.baseline }, entry.file);
  store.markDirty();
  return store;
}

function isIdentity(x: unknown): x is FileIdentity {
  const o = x as Partial<FileIdentity> | null;
  return !!o && typeof o === 'object' && typeof o.size === 'number' && typeof o.sha256 === 'string' && /^[0-9a-f]{64}$/.test(o.sha256);
}

/** Remove a recovery slot (after a clean save or when the user discards it). */
export function discardRecovery(dir: string, key: string): void {
  checkKey(key);
  for (const f of [key + RECOVERY_EXTENSION, key + '.json']) {
    try { unlinkSync(join(dir, f)); } catch { /* already gone */ }
  }
}

export { OpenError };
