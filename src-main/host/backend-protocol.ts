/**
 * Messages between the Electron main process and the backend child (a plain Node process
 * that owns the store and the handlers). JSON over Node's IPC channel.
 */
import type { ApiResult, EventName, Events } from '../api/contract.ts';

export type ToBackend =
  | { type: 'request'; id: number; name: string; args: unknown }
  /** Paths the user picked in a native dialog: the only paths the backend accepts. */
  | { type: 'approve-path'; path: string }
  | { type: 'shutdown' };

export type FromBackend =
  | { type: 'ready'; pid: number }
  | { type: 'response'; id: number; result: ApiResult<unknown> }
  | { type: 'event'; event: EventName; payload: Events[EventName] }
  | { type: 'fatal'; message: string };
