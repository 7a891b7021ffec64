/**
 * The handler table: every request of the contract, one module per feature. The hosts
 * (Electron backend process, local web host, tests) call `createApi`.
 */
import type { ApiResult } from './contract.ts';
import { dispatch, type HandlerTable } from './registry.ts';
import { Session, type SessionOptions } from './session.ts';
import { projectHandlers } from './project.ts';
import { requirementHandlers } from './requirements.ts';
import { libraryHandlers } from './library.ts';
import { planHandlers } from './plan.ts';
import { exportHandlers } from './export.ts';
import { fileHandlers } from './files.ts';
import { isolationHandlers } from './isolation.ts';
import { plotHandlers } from './plots.ts';

export const HANDLERS = {
  ...projectHandlers,
  ...fileHandlers,
  ...requirementHandlers,
  ...planHandlers,
  ...libraryHandlers,
  ...exportHandlers,
  ...isolationHandlers,
  ...plotHandlers,
} satisfies HandlerTable;

export interface Api {
  session: Session;
  /** Run one request; `name` and `args` may come from anywhere and are checked. */
  request(name: unknown, args: unknown): Promise<ApiResult<unknown>>;
}

export function createApi(opts: SessionOptions, init?: (s: Session) => void): Api {
  const session = new Session(opts);
  init?.(session);
  return { session, request: (name, args) => dispatch(HANDLERS, session, name, args) };
}
