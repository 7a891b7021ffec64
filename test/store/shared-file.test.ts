// Issue 10 items 2 and 4: the project file is shared with other programs. A real SQLite
// writer (better-sqlite3 in a child process, an SQLite build independent of the store's
// own checks) crashes in the middle of a transaction, crashes with changes in its
// write-ahead log, or holds SQLite's write lock; a second store saves a newer version.
// The store must neither show the torn file nor save over it, must never silently replace
// a newer version, and must not lose the other program's commit. SQLite facts relied on
// (a killed rollback-mode writer leaves a hot journal that the next read-write open rolls
// back; a killed WAL-mode writer leaves its commits in <file>-wal): SQLite's "Atomic Commit
// In SQLite" and "Write-Ahead Logging" documents, from memory, and checked here.
import { describe, expect, it } from 'vitest';
import Database from 'better-sqlite3';
import { copyFileSync, existsSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { OpenError, ProjectStore, SaveRefused, StoreError } from '../../src-main/store/project-store.ts';
import { demoDocument } from '../../src-main/store/demo.ts';
import { listRecovery, restoreRecovery, writeRecovery } from '../../src-main/store/recovery.ts';
import { crashMidTransaction, crashWithWal, holdWriteLock, writerMidTransaction } from '../helpers/sqlite-writer.ts';
import { fixedClock, sha256, tempDir } from './tmp.ts';

function savedDemo(dir: string, name = 'p.rwproj'): string {
  const p = join(dir, name);
  const s = ProjectStore.fromDocument(demoDocument(), { clock: fixedClock() });
  s.save(p);
  s.close();
  return p;
}

function rename(store: ProjectStore, name: string): void {
  const req = store.getRequirements();
  req.meta.name = name;
  store.setRequirements(req);
}

function refusal(fn: () => unknown): SaveRefused {
  try {
    fn();
  } catch (e) {
    if (e instanceof SaveRefused) return e;
    throw e;
  }
  throw new Error('the save was not refused');
}

function openRefusal(path: string): OpenError {
  try {
    ProjectStore.open(path).close();
  } catch (e) {
    if (e instanceof OpenError) return e;
    throw e;
  }
  throw new Error(`${path} opened`);
}

/** Name stored in the file, read by better-sqlite3 (SQLite applies its own journal or log). */
function nameInFile(path: string): string {
  const db = new Database(path);
  try {
    return JSON.parse((db.prepare("SELECT value FROM meta WHERE key = 'name'").get() as { value: string }).value) as string;
  } finally {
    db.close();
  }
}

describe('a hot rollback journal from a crashed SQLite writer', () => {
  it('refuses to open the torn file, never saves over it, and leaves it for SQLite to roll back', { timeout: 60_000 }, async () => {
    const dir = tempDir();
    const p = savedDemo(dir);
    const committed = ProjectStore.open(p);
    const committedReq = committed.getRequirements();
    const early = ProjectStore.open(p); // a window that had the file open before the crash
    rename(early, 'edited in the window');
    const cleanHash = sha256(p);
    await crashMidTransaction(p);
    const journal = `${p}-journal`;
    expect(statSync(journal).size).toBeGreaterThan(0);
    expect(readFileSync(journal)[0]).not.toBe(0); // synced header: SQLite treats it as hot
    expect(sha256(p), 'the writer changed pages of the file itself before committing').not.toBe(cleanHash);
    const fileHash = sha256(p);
    const journalHash = sha256(journal);
    const mtime = statSync(p).mtimeMs;

    const e = openRefusal(p);
    expect(e.kind).toBe('side-file');
    expect(e.message).toContain(journal);
    expect(e.message).toMatch(/stopped in the middle/);
    expect(e.message).toMatch(/rolled back/);

    const s = refusal(() => early.save());
    expect(s.kind).toBe('side-file');
    expect(s.message).toContain(journal);
    expect(s.message).toMatch(/Nothing was written/);
    const other = ProjectStore.fromDocument(demoDocument());
    expect(refusal(() => other.save(p, { overwrite: true })).kind).toBe('side-file'); // not even when told to replace
    expect(early.dirty).toBe(true);

    expect(sha256(p)).toBe(fileHash);
    expect(sha256(journal)).toBe(journalHash);
    expect(statSync(p).mtimeMs).toBe(mtime);

    // SQLite itself rolls the journal back on its next read-write open: the committed
    // state comes back, nothing of the uncommitted transaction remains.
    expect(nameInFile(p)).toBe(committedReq.meta.name);
    expect(existsSync(journal)).toBe(false);
    const back = ProjectStore.open(p);
    expect(back.getRequirements()).toEqual(committedReq);
    expect(back.getLibrary().some((r) => r.id.startsWith('torn-'))).toBe(false);
    // Now the window's save goes through (the file is again what it opened).
    early.save();
    expect(ProjectStore.open(p).getRequirements().meta.name).toBe('edited in the window');
    for (const x of [committed, early, other, back]) x.close();
  });
});

describe('an SQLite writer still in the middle of a transaction', () => {
  it('is told apart from a crashed one: "another program is writing", then, once it is killed, the hot journal', { timeout: 60_000 }, async () => {
    const dir = tempDir();
    const p = savedDemo(dir);
    const early = ProjectStore.open(p);
    rename(early, 'edited in the window');
    const w = await writerMidTransaction(p);
    let fileHash: string;
    try {
      fileHash = sha256(p);
      const e = openRefusal(p);
      expect(e.kind).toBe('in-use');
      expect(e.message).toContain(`another program is writing ${p}`);
      const s = refusal(() => early.save());
      expect(s.kind).toBe('locked');
      expect(sha256(p)).toBe(fileHash);
    } finally {
      await w.kill();
    }
    expect(openRefusal(p).kind).toBe('side-file');
    expect(sha256(p)).toBe(fileHash);
    early.close();
  });
});

describe('a write-ahead log left by another SQLite program', () => {
  it('refuses to open or save over the file and keeps the changes in the log', { timeout: 60_000 }, async () => {
    const dir = tempDir();
    const p = savedDemo(dir);
    const early = ProjectStore.open(p);
    rename(early, 'edited in the window');
    await crashWithWal(p);
    const wal = `${p}-wal`;
    expect(statSync(wal).size).toBeGreaterThan(0);
    const fileHash = sha256(p);
    const walHash = sha256(wal);

    const e = openRefusal(p);
    expect(e.kind).toBe('side-file');
    expect(e.message).toContain(wal);
    expect(e.message).toMatch(/write-ahead log/);
    const s = refusal(() => early.save());
    expect(s.kind).toBe('side-file');
    expect(s.message).toContain(wal);
    expect(sha256(p)).toBe(fileHash);
    expect(sha256(wal)).toBe(walHash);
    // The commit that lives only in the log is still there for SQLite.
    expect(nameInFile(p)).toBe('committed in the log');
    early.close();
  });
});

describe('another program holding SQLite\'s write lock', () => {
  it('makes the save refuse, and its commit afterwards is not lost', { timeout: 60_000 }, async () => {
    const dir = tempDir();
    const p = savedDemo(dir);
    const mine = ProjectStore.open(p);
    rename(mine, 'saved by the window');
    const before = sha256(p);
    const writer = await holdWriteLock(p);
    try {
      const e = refusal(() => mine.save());
      expect(e.kind).toBe('locked');
      expect(e.message).toContain(`another program is writing ${p}`);
      expect(sha256(p)).toBe(before);
      await writer.commit();
    } finally {
      await writer.kill();
    }
    // The other program's commit is in the file; our save now sees a changed file.
    expect(nameInFile(p)).toBe('written by the other program');
    expect(refusal(() => mine.save()).kind).toBe('changed');
    expect(nameInFile(p)).toBe('written by the other program');
    mine.close();
  });
});

describe('lost updates', () => {
  it('refuses to save over a file changed since it was opened; Save As and later saves work', () => {
    const dir = tempDir();
    const p = savedDemo(dir);
    const a = ProjectStore.open(p);
    const b = ProjectStore.open(p); // another window, or the CLI
    rename(b, 'newer, from the other window');
    b.save();
    const newer = sha256(p);
    rename(a, 'older, from this window');
    const e = refusal(() => a.save());
    expect(e.kind).toBe('changed');
    expect(e.message).toContain(p);
    expect(e.message).toMatch(/changed on disk since it was opened/);
    expect(e.message).toMatch(/Save As/);
    expect(e.message).toMatch(/reopen/);
    expect(sha256(p)).toBe(newer);
    expect(a.dirty).toBe(true);
    expect(() => a.save(p)).toThrow(SaveRefused); // naming its own path is the same Save
    // Save As to a new file works, and from then on Save writes there, again and again.
    const q = join(dir, 'mine.rwproj');
    a.save(q);
    expect(a.path).toBe(q);
    rename(a, 'second save');
    a.save();
    rename(a, 'third save');
    a.save();
    expect(ProjectStore.open(q).getRequirements().meta.name).toBe('third save');
    expect(ProjectStore.open(p).getRequirements().meta.name).toBe('newer, from the other window');
    // The other store's own identity moved with its save: it saves again without a refusal.
    rename(b, 'newer still');
    b.save();
    a.close();
    b.close();
  });

  it('sees a file touched but not changed as unchanged', () => {
    const dir = tempDir();
    const p = savedDemo(dir);
    const a = ProjectStore.open(p);
    copyFileSync(p, join(dir, 'copy'));
    copyFileSync(join(dir, 'copy'), p); // same bytes, new modification time
    rename(a, 'x');
    a.save();
    expect(ProjectStore.open(p).getRequirements().meta.name).toBe('x');
    a.close();
  });

  it('Save As refuses an existing file unless told to replace it', () => {
    const dir = tempDir();
    const p = savedDemo(dir);
    const other = savedDemo(dir, 'other.rwproj');
    const h = sha256(other);
    const a = ProjectStore.open(p);
    const e = refusal(() => a.save(other));
    expect(e.kind).toBe('exists');
    expect(e.message).toContain(other);
    expect(sha256(other)).toBe(h);
    expect(a.path).toBe(p);
    a.save(other, { overwrite: true });
    expect(a.path).toBe(other);
    expect(() => a.save()).not.toThrow();
    // A new document meets the same rule.
    const n = ProjectStore.fromDocument(demoDocument());
    expect(refusal(() => n.save(p)).kind).toBe('exists');
    a.close();
    n.close();
  });

  it('a store read from bytes for a path (a recovery copy without its note) does not replace that file', () => {
    const dir = tempDir();
    const p = savedDemo(dir);
    const s = ProjectStore.fromBytes(readFileSync(p), p);
    const e = refusal(() => s.save());
    expect(e.kind).toBe('changed');
    expect(e).toBeInstanceOf(StoreError);
    s.close();
  });

  it('a restored autosave copy keeps the identity its original was opened with', () => {
    const dir = tempDir();
    const p = savedDemo(dir);
    const rec = join(dir, 'recovery');
    const a = ProjectStore.open(p);
    rename(a, 'unsaved work');
    writeRecovery(a, rec, 'k');
    a.close();
    // Unchanged original: the restored copy saves over it.
    const r1 = restoreRecovery(listRecovery(rec)[0]!);
    r1.save();
    expect(ProjectStore.open(p).getRequirements().meta.name).toBe('unsaved work');
    // Changed since (here by the restored copy's own save): a second restore of the old copy refuses.
    const r2 = restoreRecovery(listRecovery(rec)[0]!);
    expect(refusal(() => r2.save()).kind).toBe('changed');
    r1.close();
    r2.close();
  });
});
