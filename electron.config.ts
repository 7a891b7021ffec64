/**
 * Settings of the Electron shell, kept in one place so tests can assert them
 * (src-main/host/electron-main.ts reads this file).
 */
export const WINDOW_WEB_PREFERENCES = {
  contextIsolation: true,
  sandbox: true,
  nodeIntegration: false,
  nodeIntegrationInWorker: false,
  webSecurity: true,
  allowRunningInsecureContent: false,
  experimentalFeatures: false,
  webviewTag: false,
  spellcheck: false,
} as const;

/** Strict content security policy for every page the window loads. */
export const CONTENT_SECURITY_POLICY = [
  "default-src 'self'",
  "script-src 'self'",
  "style-src 'self'",
  "img-src 'self' data:",
  "connect-src 'self'",
  "font-src 'self'",
  "object-src 'none'",
  "base-uri 'none'",
  "form-action 'none'",
  "frame-ancestors 'none'",
].join('; ');

export const WINDOW_SIZE = { width: 1440, height: 900, minWidth: 960, minHeight: 600 } as const;

/** File extension of a project file (a SQLite database). */
export const PROJECT_EXTENSION = '.rwproj';
