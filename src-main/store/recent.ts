/**
 * The recent-files list. It lives outside projects, in a small JSON file in a settings
 * folder the host passes in. A missing or damaged list reads as empty; writes are atomic.
 */
import { mkdirSync, readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { writeFileAtomic } from './project-store.ts';

export const RECENT_FILE = 'recent-files.json';
export const RECENT_MAX = 10;

export interface RecentEntry {
  path: string;
  /** ISO 8601 time the file was last opened or saved. */
  openedAt: string;
  /**
   * Set when the file failed to open at start-up: it is then not opened automatically
   * again (the user can still choose it). Cleared by the next successful open or save.
   */
  failed?: { at: string; message: string };
}

function failedField(x: unknown): RecentEntry['failed'] | undefined {
  const f = x as { at?: unknown; message?: unknown } | null;
  if (typeof f !== 'object' || f === null || typeof f.at !== 'string' || typeof f.message !== 'string') return undefined;
  return { at: f.at, message: f.message.slice(0, 2000) };
}

/** Read the list, newest first. Never throws: a damaged list reads as empty. */
export function readRecent(configDir: string): RecentEntry[] {
  try {
    const data = JSON.parse(readFileSync(join(configDir, RECENT_FILE), 'utf8')) as unknown;
    const list = (data as { files?: unknown })?.files;
    if (!Array.isArray(list)) return [];
    return list.filter((e): e is RecentEntry =>
      typeof e === 'object' && e !== null && typeof (e as RecentEntry).path === 'string' && typeof (e as RecentEntry).openedAt === 'string',
    ).slice(0, RECENT_MAX).map((e) => {
      const failed = failedField(e.failed);
      return failed ? { path: e.path, openedAt: e.openedAt, failed } : { path: e.path, openedAt: e.openedAt };
    });
  } catch {
    return [];
  }
}

function write(configDir: string, list: RecentEntry[]): void {
  mkdirSync(configDir, { recursive: true });
  writeFileAtomic(join(configDir, RECENT_FILE), Buffer.from(JSON.stringify({ files: list }, null, 2) + '\n'));
}

/** Put `path` at the top of the list (absolute path, no duplicates, at most RECENT_MAX). */
export function addRecent(configDir: string, path: string, now: Date = new Date()): RecentEntry[] {
  const abs = resolve(path);
  const list = [{ path: abs, openedAt: now.toISOString() }, ...readRecent(configDir).filter((e) => e.path !== abs)].slice(0, RECENT_MAX);
  write(configDir, list);
  return list;
}

/** Mark `path` as failed to open at start-up (kept in the list, never auto-opened again). */
export function markRecentFailed(configDir: string, path: string, message: string, now: Date = new Date()): RecentEntry[] {
  const abs = resolve(path);
  const list = readRecent(configDir).map((e) => (e.path === abs ? { ...e, failed: { at: now.toISOString(), message: message.slice(0, 2000) } } : e));
  write(configDir, list);
  return list;
}

/** The newest entry that may be opened automatically at start-up (none failed there before). */
export function lastProjectToReopen(configDir: string): RecentEntry | null {
  return readRecent(configDir).find((e) => !e.failed) ?? null;
}

export function removeRecent(configDir: string, path: string): RecentEntry[] {
  const abs = resolve(path);
  const list = readRecent(configDir).filter((e) => e.path !== abs);
  write(configDir, list);
  return list;
}

export function clearRecent(configDir: string): void {
  write(configDir, []);
}
