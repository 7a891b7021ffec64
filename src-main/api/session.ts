/**
 * The session: everything the handlers share for one open window. The current project
 * (requirements, part library, plan result), its file, the undo/redo stacks of snapshots,
 * the planning job, and the event sink the host provides. Requests are serialised through
 * `serialise` so two edits never interleave.
 */
import type { Id, Requirements } from '../engine/model.ts';
import type { PlanResult } from '../engine/plan-types.ts';
import type { EventName, Events, ProjectState } from './contract.ts';

export type EventSink = <E extends EventName>(event: E, payload: Events[E]) => void;

/** What an undo step restores: the whole editable state, so every edit is undoable. */
export interface EditSnapshot {
  label: string;
  requirements: Requirements;
  library: unknown;
  selectedId: Id | null;
}

/**
 * Decides whether a path that came from the window may be used, and returns it normalised.
 * Throws an ApiFailure naming the reason when it may not. Each host installs its own.
 */
export type PathPolicy = (path: string, purpose: 'open-project' | 'save-project' | 'export', ext: string) => string;

export interface SessionOptions {
  host: ProjectState['host'];
  /** Folder for settings (recent files) and autosaves; null keeps nothing on disk. */
  userDataDir: string | null;
  emit?: EventSink;
  /** Autosave period in ms (0 = off). */
  autosaveMs?: number;
  pathPolicy?: PathPolicy;
}

const UNDO_DEPTH = 200;

export function clone<T>(x: T): T {
  return structuredClone(x);
}

export class Session {
  readonly host: ProjectState['host'];
  readonly userDataDir: string | null;
  emit: EventSink;
  autosaveMs: number;
  pathPolicy: PathPolicy;

  requirements!: Requirements;
  library: unknown = null;
  planResult: PlanResult | null = null;
  selectedId: Id | null = null;
  /** Mode whose figures the drawing shows (null = heaviest). */
  drawingModeId: Id | null = null;
  /** Requirements revision the plan result was computed at. */
  path: string | null = null;
  dirty = false;
  recovered = false;
  /** Shown to the user until the next project is opened (see ProjectState.notice). */
  notice: string | null = null;
  recent: string[] = [];
  undoStack: EditSnapshot[] = [];
  redoStack: EditSnapshot[] = [];
  /** The open project file store (typed by project.ts; opaque here). */
  store: unknown = null;
  planJob: { jobId: string; abort: AbortController } | null = null;

  private queue: Promise<unknown> = Promise.resolve();

  constructor(opts: SessionOptions) {
    this.host = opts.host;
    this.userDataDir = opts.userDataDir;
    this.emit = opts.emit ?? (() => {});
    this.autosaveMs = opts.autosaveMs ?? 0;
    this.pathPolicy = opts.pathPolicy ?? (() => {
      throw new Error('this host accepts no file paths from the window');
    });
  }

  /** Run `fn` after every earlier request has finished (one request at a time). */
  serialise<T>(fn: () => T | Promise<T>): Promise<T> {
    const run = this.queue.then(fn, fn);
    this.queue = run.catch(() => undefined);
    return run;
  }

  state(): ProjectState {
    return {
      path: this.path,
      name: this.requirements?.meta.name ?? '',
      dirty: this.dirty,
      revision: this.requirements?.meta.revision ?? 0,
      canUndo: this.undoStack.length > 0,
      canRedo: this.redoStack.length > 0,
      undoLabel: this.undoStack.at(-1)?.label ?? null,
      redoLabel: this.redoStack.at(-1)?.label ?? null,
      recovered: this.recovered,
      notice: this.notice,
      recent: [...this.recent],
      host: this.host,
      planning: this.planJob?.jobId ?? null,
      planOnOpen: this.planOnOpen,
    };
  }

  private capture(label: string): EditSnapshot {
    return { label, requirements: clone(this.requirements), library: clone(this.library), selectedId: this.selectedId };
  }

  /**
   * Apply one edit as an undoable step: `mutate` works on a copy of the requirements and
   * may throw (an ApiFailure); nothing changes unless it returns normally. The library is
   * passed as it is, read only: an edit of the library returns a new one (library.ts copies
   * before it changes a row), so a requirements edit does not copy the whole part list.
   * The replaced objects become the undo step as they are: nothing changes them in place
   * once replaced, and `restore` copies them back.
   */
  edit(label: string, mutate: (req: Requirements, library: unknown) => { requirements?: Requirements; library?: unknown } | void): void {
    const req = clone(this.requirements);
    const out = mutate(req, this.library) ?? {};
    const before: EditSnapshot = { label, requirements: this.requirements, library: this.library, selectedId: this.selectedId };
    this.requirements = out.requirements ?? req;
    if (out.library !== undefined) this.library = out.library;
    this.requirements.meta.revision = before.requirements.meta.revision + 1;
    this.undoStack.push(before);
    if (this.undoStack.length > UNDO_DEPTH) this.undoStack.shift();
    this.redoStack = [];
    this.markDirty();
  }

  undo(): boolean {
    const snap = this.undoStack.pop();
    if (!snap) return false;
    this.redoStack.push(this.capture(snap.label));
    this.restore(snap);
    return true;
  }

  redo(): boolean {
    const snap = this.redoStack.pop();
    if (!snap) return false;
    this.undoStack.push(this.capture(snap.label));
    this.restore(snap);
    return true;
  }

  private restore(snap: EditSnapshot): void {
    // The revision keeps rising so a plan made before the undo is recognised as stale
    // unless the restored requirements are the ones it was made from.
    const rev = this.requirements.meta.revision;
    this.requirements = clone(snap.requirements);
    this.library = clone(snap.library);
    this.selectedId = snap.selectedId;
    const planned = this.planResult?.revision;
    if (planned !== undefined && sameRequirements(snap.requirements, this.plannedFrom)) {
      this.requirements.meta.revision = planned;
    } else {
      this.requirements.meta.revision = Math.max(rev, snap.requirements.meta.revision) + 1;
    }
    this.markDirty();
  }

  /** Plan as soon as a window shows the project (set by a host for the first run's demo). */
  planOnOpen = false;

  /** The requirements the current plan was computed from (to tell a stale plan). */
  plannedFrom: Requirements | null = null;

  markDirty(): void {
    this.dirty = true;
    this.emit('project.state', this.state());
  }

  /** Replace the whole project (new, open, import): clears undo history and the plan job. */
  replace(p: { requirements: Requirements; library: unknown; planResult: PlanResult | null; path: string | null; store?: unknown; dirty?: boolean; recovered?: boolean }): void {
    this.planJob?.abort.abort();
    this.planJob = null;
    this.planOnOpen = false;
    this.requirements = p.requirements;
    this.library = p.library;
    this.planResult = p.planResult;
    this.plannedFrom = p.planResult ? clone(p.requirements) : null;
    if (p.planResult) p.planResult.revision = p.requirements.meta.revision;
    this.selectedId = p.planResult?.best?.id ?? null;
    this.path = p.path;
    if (p.store !== undefined) this.store = p.store;
    this.dirty = p.dirty ?? false;
    this.recovered = p.recovered ?? false;
    this.notice = null;
    this.undoStack = [];
    this.redoStack = [];
  }

  /** True when the requirements changed since the plan was computed. */
  planStale(): boolean {
    if (!this.planResult) return false;
    return this.planResult.revision !== this.requirements.meta.revision;
  }
}

/** Structural equality of two requirement sets, ignoring the revision counter. */
export function sameRequirements(a: Requirements | null, b: Requirements | null): boolean {
  if (!a || !b) return false;
  const strip = (r: Requirements) => JSON.stringify({ ...r, meta: { ...r.meta, revision: 0 } });
  return strip(a) === strip(b);
}
