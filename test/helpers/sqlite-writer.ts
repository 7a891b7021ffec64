/**
 * Another SQLite program on a project file, as a child process (sqlite-writer-child.mjs):
 * one killed with SIGKILL in the middle of a transaction, one killed with its changes still
 * in the write-ahead log, and one holding SQLite's write lock until told to commit.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { join } from 'node:path';

const CHILD = join(import.meta.dirname, 'sqlite-writer-child.mjs');

function start(mode: 'crash' | 'wal' | 'hold', file: string): Promise<ChildProcess> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, [CHILD, mode, file], { stdio: ['pipe', 'pipe', 'pipe'] });
    let err = '';
    const timer = setTimeout(() => { child.kill('SIGKILL'); reject(new Error(`writer (${mode}) not ready in 30 s: ${err}`)); }, 30_000);
    child.stderr!.on('data', (d: Buffer) => { err += d.toString(); });
    child.stdout!.on('data', (d: Buffer) => {
      if (d.toString().includes('ready')) { clearTimeout(timer); resolve(child); }
    });
    child.on('exit', (code) => { clearTimeout(timer); reject(new Error(`writer (${mode}) ended (${code}) before it was ready: ${err}`)); });
  });
}

function killed(child: ChildProcess): Promise<void> {
  return new Promise((resolve) => {
    child.removeAllListeners('exit');
    child.on('exit', () => resolve());
    child.kill('SIGKILL');
  });
}

/** Crash an SQLite writer in the middle of a transaction that has already changed `file`. */
export async function crashMidTransaction(file: string): Promise<void> {
  await killed(await start('crash', file));
}

/** The same writer, still running (its transaction open, the file already changed). */
export async function writerMidTransaction(file: string): Promise<{ kill(): Promise<void> }> {
  const child = await start('crash', file);
  return { kill: () => killed(child) };
}

/** Crash an SQLite writer in write-ahead-log mode after a commit still held in `file-wal`. */
export async function crashWithWal(file: string): Promise<void> {
  await killed(await start('wal', file));
}

/** A writer holding SQLite's write lock on `file` with an uncommitted change. */
export async function holdWriteLock(file: string): Promise<{ commit(): Promise<void>; kill(): Promise<void> }> {
  const child = await start('hold', file);
  child.removeAllListeners('exit');
  return {
    commit: () => new Promise((resolve, reject) => {
      child.stdout!.on('data', (d: Buffer) => { if (d.toString().includes('committed')) resolve(); });
      child.on('exit', (code) => (code === 0 ? resolve() : reject(new Error(`writer ended with ${code}`))));
      child.stdin!.write('commit\n');
    }),
    kill: () => (child.exitCode === null ? killed(child) : Promise.resolve()),
  };
}
