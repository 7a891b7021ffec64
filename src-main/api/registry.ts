/**
 * The one typed helper every feature registers its handlers through, and the dispatcher
 * the hosts call. Arguments are validated with zod before a handler sees them; failures
 * come back as `{ ok: false, error: { field?, message } }`, never as a thrown error.
 */
import { z } from 'zod';
import type { ApiError, ApiErrorCode, ApiResult, RequestArgs, RequestName, RequestValue } from './contract.ts';
import type { Session } from './session.ts';

/** A failure the user can act on; `field` names the argument or cell. */
export class ApiFailure extends Error {
  constructor(message: string, readonly field?: string, readonly code?: ApiErrorCode) {
    super(message);
  }
}

export interface Handler<K extends RequestName> {
  name: K;
  schema: z.ZodType<RequestArgs<K>>;
  run(session: Session, args: RequestArgs<K>): RequestValue<K> | Promise<RequestValue<K>>;
}

/** Declare one handler: the request name ties the schema and the function to the contract. */
export function handler<K extends RequestName>(
  name: K,
  schema: z.ZodType<RequestArgs<K>>,
  run: (session: Session, args: RequestArgs<K>) => RequestValue<K> | Promise<RequestValue<K>>,
): Handler<K> {
  return { name, schema, run };
}

export type HandlerTable = { [K in RequestName]: Handler<K> };

/** An empty argument object (requests that take nothing). */
export const noArgs = z.object({}).strict() as unknown as z.ZodType<Record<string, never>>;

function describeIssue(issue: z.core.$ZodIssue): ApiError {
  const field = issue.path.length ? issue.path.map(String).join('.') : undefined;
  return field ? { field, message: `${field}: ${issue.message}` } : { message: issue.message };
}

export function toApiError(e: unknown): ApiError {
  if (e instanceof ApiFailure) {
    return { ...(e.field ? { field: e.field } : {}), message: e.message, ...(e.code ? { code: e.code } : {}) };
  }
  if (e instanceof z.ZodError) return describeIssue(e.issues[0]!);
  const msg = e instanceof Error ? e.message : String(e);
  return { message: msg || 'unexpected failure' };
}

/**
 * Run one request by name. `name` and `args` come from outside (IPC, HTTP, a child pipe),
 * so both are checked here: an unknown name or malformed arguments change nothing.
 */
export async function dispatch(
  table: HandlerTable,
  session: Session,
  name: unknown,
  args: unknown,
): Promise<ApiResult<unknown>> {
  if (typeof name !== 'string' || !Object.prototype.hasOwnProperty.call(table, name)) {
    return { ok: false, error: { field: 'request', message: `unknown request "${String(name).slice(0, 80)}"` } };
  }
  const h = table[name as RequestName] as unknown as Handler<RequestName>;
  const parsed = h.schema.safeParse(args ?? {});
  if (!parsed.success) return { ok: false, error: describeIssue(parsed.error.issues[0]!) };
  try {
    const value = await session.serialise(() => h.run(session, parsed.data as never));
    return { ok: true, value };
  } catch (e) {
    return { ok: false, error: toApiError(e) };
  }
}
