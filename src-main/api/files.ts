/**
 * Project file handlers: new, open, open the demo, save, import, and the autosave/recovery
 * cycle. The session keeps the working copy; the project store (SQLite, atomic save) holds
 * the file. Paths from the window pass the host's path policy first.
 */
import { join, resolve } from 'node:path';
import { z } from 'zod';
import { PROJECT_EXTENSION } from '../../electron.config.ts';
import type { PartLibraryRow, Requirements } from '../engine/model.ts';
import { ProjectStore, OpenError, SaveRefused, StoreError } from '../store/project-store.ts';
import { demoDocument } from '../store/demo.ts';
import { checkLibraryShape, checkRequirementsShape, importProjectJson, type ProjectDocument } from '../store/json-format.ts';
import { existsSync } from 'node:fs';
import { addRecent, lastProjectToReopen, markRecentFailed, readRecent, removeRecent } from '../store/recent.ts';
import { discardRecovery, listRecovery, restoreRecovery, writeRecovery } from '../store/recovery.ts';
import { ApiFailure, handler } from './registry.ts';
import type { Session } from './session.ts';
import { defaultLibrary } from './default-library.ts';
import { buildSnapshot } from './snapshot.ts';
import { guardDiscard } from './project.ts';

const discard = z.boolean().optional();

function storeOf(s: Session): ProjectStore | null {
  return s.store instanceof ProjectStore ? s.store : null;
}

/**
 * Libraries that passed the shape check. A library is never changed in place (an edit of it
 * returns a copy, see Session.edit), so one that passed stays good and an edit of a load
 * does not check the whole part list again.
 */
const goodLibraries = new WeakSet<object>();

/** Refuse requirements or a library the store would refuse (checked on every edit). */
export function checkShapes(req: Requirements, library: unknown): void {
  let p = checkRequirementsShape(req)[0];
  if (!p && Array.isArray(library) && !goodLibraries.has(library)) {
    p = checkLibraryShape(library)[0];
    if (!p) goodLibraries.add(library);
  }
  if (p) throw new ApiFailure(`${p.path}: ${p.message}`, p.path);
}

function adoptStore(s: Session, store: ProjectStore, path: string | null, opts: { dirty?: boolean; recovered?: boolean } = {}): void {
  const old = storeOf(s);
  const saved = store.getPlanResult();
  s.replace({
    requirements: store.getRequirements(),
    library: store.getLibrary(),
    planResult: saved ? saved.result : null,
    path,
    store,
    dirty: opts.dirty ?? store.dirty,
    recovered: opts.recovered ?? false,
  });
  // A plan saved before later edits stays visible but marked stale (its own revision).
  if (saved?.stale && s.planResult) s.planResult.revision = Math.min(saved.revision, s.requirements.meta.revision - 1);
  if (old && old !== store) old.close();
}

/** Copy the working state into the store (before save and autosave). */
export function syncStore(s: Session): ProjectStore {
  let store = storeOf(s);
  if (!store) {
    store = ProjectStore.create();
    s.store = store;
  }
  try {
    store.setRequirements(s.requirements, { keepRevision: true });
    store.setLibrary((Array.isArray(s.library) ? s.library : []) as PartLibraryRow[]);
    if (s.planResult) store.setPlanResult({ ...s.planResult, revision: s.planResult.revision });
    else store.clearPlanResult();
  } catch (e) {
    if (e instanceof StoreError) throw new ApiFailure(e.message);
    throw e;
  }
  return store;
}

function settingsDir(s: Session): string | null {
  return s.userDataDir;
}

function remember(s: Session, path: string): void {
  const dir = settingsDir(s);
  if (!dir) return;
  try {
    s.recent = addRecent(dir, path).map((e) => e.path);
  } catch {
    // A read-only settings folder must not block opening or saving.
  }
}

export function loadRecent(s: Session): void {
  const dir = settingsDir(s);
  if (dir) s.recent = readRecent(dir).map((e) => e.path);
}

function recoveryDir(s: Session): string | null {
  return s.userDataDir ? join(s.userDataDir, 'recovery') : null;
}

/** Write the autosave copy when there is unsaved work. Returns true when written. */
export function autosave(s: Session, key = 'session'): boolean {
  const dir = recoveryDir(s);
  if (!dir || !s.dirty) return false;
  const store = syncStore(s);
  writeRecovery(store, dir, key);
  return true;
}

/** After an unclean exit: reopen the newest usable autosave copy, if any. */
export function recoverIfAny(s: Session): boolean {
  const dir = recoveryDir(s);
  if (!dir) return false;
  for (const entry of listRecovery(dir)) {
    try {
      const store = restoreRecovery(entry);
      adoptStore(s, store, entry.originalPath, { dirty: true, recovered: true });
      return true;
    } catch {
      // An unusable copy is skipped; the next one may do.
    }
  }
  return false;
}

/** A clean save or a deliberate discard removes the autosave copy. */
export function clearRecovery(s: Session, key = 'session'): void {
  const dir = recoveryDir(s);
  if (dir) {
    try { discardRecovery(dir, key); } catch { /* nothing to remove */ }
  }
}

export function openDemo(s: Session): void {
  const doc = demoDocument();
  if (!doc.library?.length) doc.library = defaultLibrary();
  adoptStore(s, ProjectStore.fromDocument(doc), null, { dirty: false });
}

export function newProject(s: Session): void {
  const store = ProjectStore.create();
  store.setLibrary(defaultLibrary());
  adoptStore(s, store, null, { dirty: false });
}

export function openPath(s: Session, raw: string): void {
  const path = s.pathPolicy(raw, 'open-project', PROJECT_EXTENSION);
  let store: ProjectStore;
  try {
    store = ProjectStore.open(path);
  } catch (e) {
    if (e instanceof OpenError) {
      if (e.kind === 'not-found' && s.userDataDir) {
        try { s.recent = removeRecent(s.userDataDir, path).map((x) => x.path); } catch { /* ignore */ }
      }
      const code = e.kind === 'side-file' ? 'side-file' : e.kind === 'in-use' ? 'locked' : undefined;
      throw new ApiFailure(e.message, 'path', code);
    }
    throw e;
  }
  adoptStore(s, store, path, { dirty: false });
  remember(s, path);
}

/**
 * What a host opens at start-up: the autosave copy after an unclean exit, else the last
 * project (unless it failed to open at an earlier start), else the demo file in the user's
 * projects folder (written on first run). A project that fails to open, or whose first
 * view cannot be built, is marked in the recent list so it is never reopened
 * automatically again; the demo opens instead and the window shows why (state.notice).
 * `approve` lets a host whitelist the paths it opens here. `planFirstRun` asks the window to
 * plan the demo once it is shown, when the demo is written for the first time.
 */
export async function openAtStart(s: Session, opts: { demoFile: string; approve?: (path: string) => void; planFirstRun?: boolean }): Promise<void> {
  loadRecent(s);
  if (recoverIfAny(s)) return;
  const dir = settingsDir(s);
  const last = dir ? lastProjectToReopen(dir) : null;
  let notice: string | null = null;
  if (last && existsSync(last.path)) {
    try {
      opts.approve?.(last.path);
      openPath(s, last.path);
      await buildSnapshot(s);
      return;
    } catch (e) {
      const why = (e as Error)?.message ?? String(e);
      try { markRecentFailed(dir!, last.path, why); } catch { /* a read-only settings folder */ }
      loadRecent(s);
      notice = `The last project (${last.path}) could not be opened, so the demo is shown; it will not be reopened automatically (choose it under Open to try again). ${why}`;
    }
  }
  try {
    opts.approve?.(opts.demoFile);
    if (existsSync(opts.demoFile)) {
      openPath(s, opts.demoFile);
    } else {
      openDemo(s);
      saveTo(s, opts.demoFile);
      if (opts.planFirstRun) s.planOnOpen = true;
    }
    await buildSnapshot(s);
  } catch {
    try { openDemo(s); } catch { newProject(s); }
  }
  s.notice = notice;
}

/**
 * Save (no path) or Save As. `overwrite` is the user's confirmation that an existing file
 * at a new path may be replaced; it never lets a save replace the project's own file
 * after someone else changed it (the store refuses that; the window offers Save As or
 * Reopen).
 */
export function saveTo(s: Session, raw: string | undefined, overwrite = false): void {
  const target = raw !== undefined ? s.pathPolicy(raw, 'save-project', PROJECT_EXTENSION) : s.path;
  if (!target) throw new ApiFailure('path: the project has no file yet: choose a file name (Save as)', 'path');
  const own = s.path !== null && resolve(target) === resolve(s.path);
  const store = syncStore(s);
  try {
    store.save(target, { overwrite: overwrite && !own });
  } catch (e) {
    if (e instanceof SaveRefused) throw new ApiFailure(e.message, 'path', e.kind);
    if (e instanceof StoreError) throw new ApiFailure(e.message, 'path');
    throw e;
  }
  s.path = target;
  s.dirty = false;
  s.recovered = false;
  clearRecovery(s);
  remember(s, target);
  s.emit('project.state', s.state());
}

/** A project read from a file's bytes (the web host's picker): unsaved, no path, so Save asks for one. */
export function adoptBytes(s: Session, store: ProjectStore): void {
  adoptStore(s, store, null, { dirty: true });
  clearRecovery(s);
}

export function importDocument(s: Session, text: string): void {
  const r = importProjectJson(text);
  if (!r.ok) {
    const p = r.problems[0]!;
    const more = r.problems.length > 1 ? ` (and ${r.problems.length - 1} more problem${r.problems.length > 2 ? 's' : ''})` : '';
    throw new ApiFailure(`${p.path}: ${p.message}${more}`, p.path);
  }
  const doc: ProjectDocument = r.doc;
  adoptStore(s, ProjectStore.fromDocument(doc), null, { dirty: true });
}

export const fileHandlers = {
  'project.new': handler('project.new', z.object({ discard }).strict(), (s: Session, a) => {
    guardDiscard(s, a.discard);
    newProject(s);
    clearRecovery(s);
    return buildSnapshot(s);
  }),
  'project.open': handler('project.open', z.object({ path: z.string().min(1).max(1024), discard }).strict(), (s: Session, a) => {
    guardDiscard(s, a.discard);
    openPath(s, a.path);
    clearRecovery(s);
    return buildSnapshot(s);
  }),
  'project.openDemo': handler('project.openDemo', z.object({ discard }).strict(), (s: Session, a) => {
    guardDiscard(s, a.discard);
    openDemo(s);
    clearRecovery(s);
    return buildSnapshot(s);
  }),
  'project.save': handler('project.save', z.object({ path: z.string().min(1).max(1024).optional(), overwrite: z.boolean().optional() }).strict(), (s: Session, a) => {
    saveTo(s, a.path, a.overwrite === true);
    return s.state();
  }),
  'project.importJson': handler('project.importJson', z.object({ text: z.string().max(16_000_000), discard }).strict(), (s: Session, a) => {
    guardDiscard(s, a.discard);
    importDocument(s, a.text);
    return buildSnapshot(s);
  }),
};
