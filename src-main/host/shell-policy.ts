/**
 * The security policy of the desktop window as plain functions, so tests can check each
 * one with Electron mocked: the window options, the CSP header, what navigation and new
 * windows are allowed (nothing), which IPC senders and arguments are accepted.
 */
import { CONTENT_SECURITY_POLICY, WINDOW_SIZE, WINDOW_WEB_PREFERENCES } from '../../electron.config.ts';

export const REQUEST_CHANNEL = 'railwright:request';
export const EVENT_CHANNEL = 'railwright:event';
export const DIALOG_CHANNEL = 'railwright:choose-path';

export function windowOptions(preloadPath: string) {
  return {
    ...WINDOW_SIZE,
    show: false,
    title: 'Railwright',
    backgroundColor: '#f5f7fa',
    webPreferences: { ...WINDOW_WEB_PREFERENCES, preload: preloadPath },
  };
}

/** Adds the CSP to every response the window receives (file:// pages included). */
export function withCsp(headers: Record<string, string[] | string> | undefined): Record<string, string[] | string> {
  const out: Record<string, string[] | string> = {};
  for (const [k, v] of Object.entries(headers ?? {})) if (k.toLowerCase() !== 'content-security-policy') out[k] = v;
  out['Content-Security-Policy'] = [CONTENT_SECURITY_POLICY];
  return out;
}

/** Is `url` the window's own page? Everything else is refused. */
export function isAppUrl(url: string, appUrl: string): boolean {
  try {
    const u = new URL(url);
    const a = new URL(appUrl);
    return u.protocol === a.protocol && u.host === a.host && u.pathname === a.pathname;
  } catch {
    return false;
  }
}

/** `will-navigate` / `will-redirect`: the window never leaves its page. */
export function navigationGuard(appUrl: string) {
  return (event: { preventDefault(): void }, url: string) => {
    if (!isAppUrl(url, appUrl)) event.preventDefault();
  };
}

/** `setWindowOpenHandler`: no new windows, ever. */
export function denyWindowOpen(): { action: 'deny' } {
  return { action: 'deny' };
}

/** `will-attach-webview`: no webviews. */
export function denyWebview(event: { preventDefault(): void }): void {
  event.preventDefault();
}

/** Permission requests (camera, notifications, …): all refused. */
export function denyPermission(_wc: unknown, _permission: string, callback: (granted: boolean) => void): void {
  callback(false);
}

export interface IpcCall {
  name: string;
  args: unknown;
}

/**
 * Validate one IPC request from the window: it must come from the app page's main frame,
 * the name must be a plain short string, the arguments a plain object (or absent). The
 * handlers validate each argument further (zod).
 */
export function checkIpc(senderUrl: string | undefined, appUrl: string, name: unknown, args: unknown): IpcCall | { error: string } {
  if (!senderUrl || !isAppUrl(senderUrl, appUrl)) return { error: 'request from an unknown page refused' };
  if (typeof name !== 'string' || !/^[a-z]+\.[A-Za-z]+$/.test(name) || name.length > 60) return { error: 'request name refused' };
  if (args !== undefined && (args === null || typeof args !== 'object' || Array.isArray(args))) return { error: 'request arguments must be an object' };
  if (args && Object.getPrototypeOf(args) !== Object.prototype) return { error: 'request arguments must be a plain object' };
  return { name, args: args ?? {} };
}

export function checkDialogArgs(purpose: unknown, suggested: unknown): { purpose: 'open-project' | 'save-project' | 'export'; suggested: string } | null {
  if (purpose !== 'open-project' && purpose !== 'save-project' && purpose !== 'export') return null;
  if (typeof suggested !== 'string' || suggested.length > 255 || /[\\/\0]/.test(suggested)) return null;
  return { purpose, suggested };
}

export function windowTitle(state: { name: string; path: string | null; dirty: boolean }): string {
  const file = state.path ? state.path.split(/[\\/]/).pop() : 'not saved';
  return `${state.dirty ? '• ' : ''}${state.name} — ${file} — Railwright`;
}
