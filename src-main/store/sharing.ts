/**
 * The project file is shared with other programs (a second window, the CLI, an SQLite
 * browser, a sync client). Three guards keep their work and ours:
 *
 * - Side files. When an SQLite program stops in the middle of a change (a crash, a kill),
 *   its rollback journal `<file>-journal` stays beside the file and holds the pages the
 *   change had not finished replacing: the file itself is torn until SQLite rolls the
 *   journal back on its next open. A write-ahead log `<file>-wal` holds committed changes
 *   not yet copied into the file. Either way the file alone is not the project, so it is
 *   neither read nor replaced (a rename would leave the journal or log to be replayed onto
 *   our new file, damaging it).
 * - Content identity. Open records the size and SHA-256 of the bytes it read; Save to the
 *   same path compares them with what is on disk now and refuses when they differ, so a
 *   newer version saved by someone else is never silently replaced by an older one.
 * - SQLite's write lock. During the save the old file is opened with SQLite and held in a
 *   write transaction (BEGIN IMMEDIATE, short busy wait), so a program writing it is
 *   detected (we refuse) and a program that starts writing waits until the rename is done.
 *
 * The SQLite rules used here (a journal is "hot" when it is non-empty, its first byte is
 * not zero and no process holds a RESERVED lock; a read-only connection that meets a hot
 * journal fails with SQLITE_READONLY_ROLLBACK instead of rolling it back; bytes 18/19 of
 * the header are 2 in write-ahead-log mode) are from SQLite's "File Locking And
 * Concurrency" and "Database File Format" documents and pager.c, from memory; the tests
 * check them against better-sqlite3's SQLite build with real crashed writers.
 */
import Database from 'better-sqlite3';
import { createHash } from 'node:crypto';
import { closeSync, openSync, readFileSync, readSync, statSync } from 'node:fs';
import { StoreError } from './store-error.ts';

/** What a project file held: enough to tell whether it changed since. */
export interface FileIdentity {
  size: number;
  sha256: string;
}

export function identityOf(bytes: Uint8Array): FileIdentity {
  return { size: bytes.length, sha256: createHash('sha256').update(bytes).digest('hex') };
}

export type SaveRefusedKind =
  /** Save As met an existing file and the user did not agree to replace it. */
  | 'exists'
  /** The file changed on disk since it was read or last saved. */
  | 'changed'
  /** Another program is writing the file (it holds SQLite's lock or is mid-change). */
  | 'locked'
  /** Another program's unfinished change sits beside the file (hot journal, write-ahead log). */
  | 'side-file';

/** A save that was refused to protect someone's data; nothing was written. */
export class SaveRefused extends StoreError {
  constructor(readonly kind: SaveRefusedKind, message: string, readonly path: string) {
    super(message);
    this.name = 'SaveRefused';
  }
}

export interface SideFileProblem {
  /** hot-journal: a program stopped mid-change; in-use: a program is writing now; wal: a write-ahead log. */
  kind: 'hot-journal' | 'in-use' | 'wal';
  sideFile: string;
  /** One sentence naming the file, the side file and what to do (no final full stop). */
  message: string;
}

/** How long a save waits for another program's SQLite write lock before refusing. */
export const LOCK_WAIT_MS = 500;

const SQLITE_MAGIC = Buffer.from('SQLite format 3\0', 'latin1');

function head(path: string, n: number): Buffer {
  const fd = openSync(path, 'r');
  try {
    const b = Buffer.alloc(n);
    const got = readSync(fd, b, 0, n, 0);
    return b.subarray(0, got);
  } finally {
    closeSync(fd);
  }
}

/** Size and first byte of a side file; null when there is none (or it is not a file). */
function sideFile(path: string): { size: number; first: number } | null {
  try {
    const st = statSync(path);
    if (!st.isFile() || st.size === 0) return null;
    return { size: st.size, first: head(path, 1)[0] ?? 0 };
  } catch {
    return null;
  }
}

/**
 * Ask SQLite itself, read-only, whether the journal beside `path` is hot (its writer is
 * gone) or a live writer holds the file. A read-only connection never rolls back, writes
 * or creates anything.
 */
function probeJournal(path: string): 'hot' | 'in-use' | 'unknown' {
  let db: Database.Database | null = null;
  try {
    db = new Database(path, { readonly: true, fileMustExist: true, timeout: 0 });
    db.prepare('SELECT 1 FROM sqlite_master LIMIT 1').get();
    // It read: the journal is not hot, so its writer still holds the file.
    return 'in-use';
  } catch (e) {
    const code = String((e as { code?: unknown }).code ?? '');
    if (code === 'SQLITE_READONLY_ROLLBACK') return 'hot';
    if (code.startsWith('SQLITE_BUSY') || code.startsWith('SQLITE_LOCKED')) return 'in-use';
    return 'unknown';
  } finally {
    try { db?.close(); } catch { /* already failing */ }
  }
}

/**
 * Another program's unfinished change beside `path`, or null. A zero-byte side file, or a
 * journal whose first byte is zero (SQLite zeroes the header of a finished or not yet
 * synced journal), is not one: SQLite itself ignores those.
 */
export function sideFileProblem(path: string): SideFileProblem | null {
  const walPath = `${path}-wal`;
  const wal = sideFile(walPath);
  if (wal) {
    return {
      kind: 'wal', sideFile: walPath,
      message: `${path} has a write-ahead log beside it (${walPath}, ${wal.size} bytes) holding changes another SQLite program has not yet written into the file, so the file alone is an older state. Open the file once in that program and close it so the log is written back, then try again; move ${walPath} away only if the changes in it must be discarded`,
    };
  }
  const journalPath = `${path}-journal`;
  const journal = sideFile(journalPath);
  if (!journal || journal.first === 0) return null;
  const state = probeJournal(path);
  if (state === 'in-use') {
    return {
      kind: 'in-use', sideFile: journalPath,
      message: `another program is writing ${path} right now (its unfinished change is in ${journalPath}): let it finish or close it, then try again`,
    };
  }
  return {
    kind: 'hot-journal', sideFile: journalPath,
    message: `${path} holds an unfinished change of another SQLite program that stopped in the middle of it: its rollback journal ${journalPath} (${journal.size} bytes) is still beside the file, so the file's content is torn. Open the file once in that program (or any SQLite tool) so the change is rolled back, then try again; do not delete or move ${journalPath}, since without it the torn content stays`,
  };
}

export interface SaveLock {
  /** The target existed when the save began (a new file is created without replacing). */
  existed: boolean;
  /** Let go of the lock (safe to call more than once). */
  release(): void;
}

/**
 * Check the target of a save and hold SQLite's write lock on it until `release`.
 * `own`: the target is the file the document was read from (or last saved to), whose
 * identity then was `baseline`. Throws SaveRefused or StoreError; nothing is written.
 */
export function lockForSave(target: string, o: { own: boolean; baseline: FileIdentity | null; overwrite: boolean }): SaveLock {
  let st;
  try {
    st = statSync(target);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    if (code === 'ENOENT') return { existed: false, release() {} };
    throw new StoreError(`could not save to ${target}: ${code ?? (e as Error).message}`);
  }
  if (!st.isFile()) throw new StoreError(`could not save to ${target}: it is a folder or a device, not a file`);
  if (!o.own && !o.overwrite) {
    throw new SaveRefused('exists', `${target} already exists: nothing was written. Confirm that it may be replaced (--force on the command line), or choose another name`, target);
  }
  const side = sideFileProblem(target);
  if (side) throw new SaveRefused(side.kind === 'in-use' ? 'locked' : 'side-file', `${side.message}. Nothing was written`, target);
  const db = takeWriteLock(target);
  let held = db !== null;
  const release = () => {
    if (!held) return;
    held = false;
    try { db!.exec('ROLLBACK'); } catch { /* nothing was begun or written */ }
    try { db!.close(); } catch { /* already closed */ }
  };
  try {
    if (o.own && !o.overwrite) {
      let now: FileIdentity;
      try {
        now = identityOf(readFileSync(target));
      } catch (e) {
        throw new StoreError(`could not save to ${target}: it cannot be read to check for changes (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`);
      }
      if (!o.baseline) {
        throw new SaveRefused('changed', `${target} exists and this copy of the project was not read from it, so a newer version there could be lost: nothing was written. Save under another name (Save As), or reopen the file (this drops the unsaved changes)`, target);
      }
      if (now.size !== o.baseline.size || now.sha256 !== o.baseline.sha256) {
        throw new SaveRefused('changed', `${target} changed on disk since it was opened (another program or window saved it): nothing was written. Save under another name (Save As) to keep both versions, or reopen the file to see the newer one (this drops the unsaved changes)`, target);
      }
    }
  } catch (e) {
    release();
    throw e;
  }
  return { existed: true, release };
}

/**
 * Open `target` with SQLite and begin a write transaction on it, waiting up to
 * LOCK_WAIT_MS for a writer to finish. Returns null for a file SQLite has no lock on for
 * us (not an SQLite database, read-only): the rename still replaces it.
 */
function takeWriteLock(target: string): Database.Database | null {
  let h: Buffer;
  try {
    h = head(target, 100);
  } catch {
    return null;
  }
  if (h.length < 100 || !h.subarray(0, 16).equals(SQLITE_MAGIC)) return null;
  if (h[18] === 2 || h[19] === 2) {
    throw new SaveRefused('side-file', `${target} is in write-ahead-log mode, which another SQLite program set and Railwright never writes: nothing was written. Save under another name (Save As)`, target);
  }
  let db: Database.Database | null = null;
  try {
    db = new Database(target, { fileMustExist: true, timeout: LOCK_WAIT_MS });
    db.exec('BEGIN IMMEDIATE');
    return db;
  } catch (e) {
    try { db?.close(); } catch { /* already failing */ }
    const code = String((e as { code?: unknown }).code ?? '');
    if (code.startsWith('SQLITE_BUSY') || code.startsWith('SQLITE_LOCKED')) {
      throw new SaveRefused('locked', `another program is writing ${target} (it holds the file's SQLite write lock): nothing was written. Let it finish or close it, then save again, or save under another name (Save As)`, target);
    }
    return null;
  }
}
