/**
 * Window state (Svelte 5 runes): the last snapshot from the handlers, the open view, the
 * selection, the planning job and the message line. Every change goes through a request;
 * the answer (a fresh snapshot) replaces the state, so the window never guesses.
 */
import type { ApiError, ApiResult, PlanProgress, RequestArgs, RequestName, RequestValue, Snapshot } from '../../src-main/api/contract.ts';
import { bridge } from './bridge.ts';

export type ViewName = 'requirements' | 'tree' | 'alternatives' | 'budget' | 'parts' | 'charts' | 'help';
export type Selection = { kind: 'stage' | 'rail' | 'source' | 'internal'; id: string } | null;

export interface Prompt {
  title: string;
  label: string;
  value: string;
  hint: string;
  confirm: string;
  /** Shown when the prompt is a yes/no question (no text field). */
  question?: boolean;
  /** Values offered with one click (recent files). */
  choices?: string[];
  /**
   * Act on the value while the dialog stays open: null closes it, a message is shown in the
   * dialog with the typed text kept (a bad path is corrected, not retyped).
   */
  submit?: (value: string) => Promise<string | null>;
  /** A second way on beside `confirm` (answers ALTERNATIVE). */
  alternative?: string;
  resolve: (v: string | null) => void;
}

/** What `ask` answers when the prompt's `alternative` button was chosen. */
export const ALTERNATIVE = '\u0000alternative';

class AppState {
  snapshot = $state<Snapshot | null>(null);
  view = $state<ViewName>('requirements');
  selection = $state<Selection>(null);
  message = $state<{ kind: 'info' | 'error'; text: string } | null>(null);
  progress = $state<PlanProgress | null>(null);
  jobId = $state<string | null>(null);
  busy = $state(false);
  prompt = $state<Prompt | null>(null);
  modeId = $state<string | null>(null);

  async call<K extends RequestName>(name: K, args: RequestArgs<K>): Promise<ApiResult<RequestValue<K>>> {
    const r = await bridge.request(name, args);
    if (!r.ok) this.fail(r.error);
    return r;
  }

  /** Call a request that answers with a snapshot and adopt it. */
  async apply<K extends RequestName>(name: K, args: RequestArgs<K>, ok?: string): Promise<boolean> {
    const r = await this.call(name, args);
    if (r.ok) {
      this.adopt(r.value as unknown as Snapshot);
      if (ok) this.info(ok);
    }
    return r.ok;
  }

  adopt(s: Snapshot): void {
    this.snapshot = s;
    this.follow(s.state.planning);
    if (!this.modeId || !s.requirements.modes.some((m) => m.id === this.modeId)) this.modeId = s.requirements.modes[0]?.id ?? null;
    const sel = this.selection;
    if (sel && s.plan?.layout && !s.plan.layout.nodes.some((n) => n.id === sel.id)) this.selection = null;
  }

  /** Time of the last planning event seen (a lost "finished" event is noticed by polling). */
  lastPlanEvent = 0;

  /** Follow a planning run started elsewhere (first run, a menu, another window's request). */
  follow(jobId: string | null | undefined): void {
    if (jobId && !this.jobId) {
      this.jobId = jobId;
      this.progress = { jobId, fraction: 0, phase: 'rails', candidates: 0, explored: 0, bestScore: null, elapsedMs: 0, message: 'planning' };
      this.lastPlanEvent = Date.now();
    }
  }

  fail(e: ApiError): void {
    this.message = { kind: 'error', text: e.message };
  }

  info(text: string): void {
    this.message = { kind: 'info', text };
  }

  /** Ask whether an existing file may be replaced; true = the user confirmed. */
  async confirmReplace(message: string): Promise<boolean> {
    const a = await this.ask({ title: 'Replace the existing file?', label: message, value: '', hint: '', confirm: 'Replace it', question: true });
    return a !== null;
  }

  ask(p: Omit<Prompt, 'resolve'>): Promise<string | null> {
    return new Promise((resolve) => {
      this.prompt = { ...p, resolve: (v) => { this.prompt = null; resolve(v); } };
    });
  }

  async refresh(): Promise<void> {
    const r = await this.call('project.snapshot', {});
    if (r.ok) this.adopt(r.value);
  }
}

export const app = new AppState();
