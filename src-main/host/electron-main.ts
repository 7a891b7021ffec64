/**
 * Electron main process: one window, native menus and dialogs, the title with file name
 * and unsaved mark, a question before discarding changes. It holds no project data: the
 * store and the handlers run in a plain Node child (backend.ts) and this process relays.
 */
import { app, BrowserWindow, Menu, dialog, ipcMain, session, type MenuItemConstructorOptions } from 'electron';
import { readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { PROJECT_EXTENSION } from '../../electron.config.ts';
import type { ProjectState, Snapshot } from '../api/contract.ts';
import { BackendClient } from './backend-client.ts';
import {
  DIALOG_CHANNEL, EVENT_CHANNEL, REQUEST_CHANNEL, checkDialogArgs, checkIpc, denyPermission, denyWebview, denyWindowOpen,
  navigationGuard, windowOptions, windowTitle, withCsp,
} from './shell-policy.ts';

const root = process.env.RAILWRIGHT_ROOT ?? join(__dirname, '..', '..');
const appUrl = pathToFileURL(join(root, 'out', 'renderer', 'index.html')).href;
let win: BrowserWindow | null = null;
let state: ProjectState | null = null;
let quitting = false;

const backend = new BackendClient({
  nodePath: process.env.RAILWRIGHT_NODE || process.env.npm_node_execpath || 'node',
  root,
  userDataDir: app.getPath('userData'),
  onEvent: (event, payload) => {
    if (event === 'project.state') setState(payload as ProjectState);
    if (event === 'project.changed') setState((payload as Snapshot).state);
    win?.webContents.send(EVENT_CHANNEL, event, payload);
  },
  onExit: (code) => {
    if (!quitting) dialog.showErrorBox('Railwright', `The project backend stopped (code ${code}). Unsaved work is in the autosave copy and comes back on the next start.`);
    app.quit();
  },
});

function setState(s: ProjectState): void {
  state = s;
  if (!win) return;
  win.setTitle(windowTitle(s));
  win.setDocumentEdited(s.dirty);
  buildMenu();
}

async function call(name: string, args: unknown = {}) {
  const r = await backend.request(name, args);
  if (r.ok && r.value && typeof r.value === 'object' && 'state' in (r.value as object)) {
    setState((r.value as Snapshot).state);
    win?.webContents.send(EVENT_CHANNEL, 'project.changed', r.value);
  } else if (!r.ok) {
    dialog.showErrorBox('Railwright', r.error.message);
  }
  return r;
}

async function choosePath(purpose: 'open-project' | 'save-project' | 'export', suggested: string): Promise<string | null> {
  const w = win ?? undefined;
  const filters = purpose === 'export' ? [] : [{ name: 'Railwright project', extensions: [PROJECT_EXTENSION.slice(1)] }];
  let p: string | undefined;
  if (purpose === 'open-project') {
    const r = w ? await dialog.showOpenDialog(w, { properties: ['openFile'], filters }) : await dialog.showOpenDialog({ properties: ['openFile'], filters });
    p = r.canceled ? undefined : r.filePaths[0];
  } else {
    // The system dialog asks before replacing an existing file (on every platform), so a
    // path chosen here carries the user's confirmation (`overwrite: true` in the request).
    const opts = { defaultPath: suggested || undefined, filters, properties: ['showOverwriteConfirmation' as const, 'createDirectory' as const] };
    const r = w ? await dialog.showSaveDialog(w, opts) : await dialog.showSaveDialog(opts);
    p = r.canceled ? undefined : r.filePath;
  }
  if (!p) return null;
  backend.approvePath(p);
  return p;
}

/** Ask before dropping unsaved changes; "Save" saves first. True = go ahead. */
async function mayDiscard(): Promise<boolean> {
  if (!state?.dirty || !win) return true;
  const r = await dialog.showMessageBox(win, {
    type: 'question', buttons: ['Save', 'Discard changes', 'Cancel'], defaultId: 0, cancelId: 2,
    message: `"${state.name}" has unsaved changes.`, detail: 'Save them before going on?',
  });
  if (r.response === 2) return false;
  if (r.response === 0) return saveProject(false);
  return true;
}

/** Save (or Save As); true when the project is saved. */
async function saveProject(as: boolean): Promise<boolean> {
  let path = state?.path ?? null;
  if (as || !path) {
    path = await choosePath('save-project', `${(state?.name ?? 'project').replace(/[^\w.-]+/g, '-')}${PROJECT_EXTENSION}`);
    if (!path) return false;
  }
  const r = await backend.request('project.save', as || !state?.path ? { path, overwrite: true } : {});
  if (r.ok) setState(r.value as ProjectState);
  else if (r.error.code === 'changed' && win) {
    // Someone else saved the file since it was opened: never replace it silently.
    const a = await dialog.showMessageBox(win, {
      type: 'warning', buttons: ['Save As…', 'Reopen (drop my changes)', 'Cancel'], defaultId: 0, cancelId: 2,
      message: 'The file changed on disk since it was opened.', detail: r.error.message,
    });
    if (a.response === 0) return saveProject(true);
    if (a.response === 1 && path) { backend.approvePath(path); await call('project.open', { path, discard: true }); }
    return false;
  } else dialog.showErrorBox('Railwright', r.error.message);
  return r.ok;
}

async function importJson(): Promise<void> {
  if (!(await mayDiscard())) return;
  const r = win ? await dialog.showOpenDialog(win, { properties: ['openFile'], filters: [{ name: 'JSON', extensions: ['json'] }] }) : null;
  const p = r && !r.canceled ? r.filePaths[0] : undefined;
  if (!p) return;
  const st = statSync(p);
  if (st.size > 16_000_000) return dialog.showErrorBox('Railwright', `${p} is larger than 16 MB`);
  await call('project.importJson', { text: readFileSync(p, 'utf8'), discard: true });
}

async function exportAs(kind: 'json' | 'bom-csv' | 'tree-svg', ext: string): Promise<void> {
  const p = await choosePath('export', `${(state?.name ?? 'project').replace(/[^\w.-]+/g, '-')}${ext}`);
  if (!p) return;
  const r = await backend.request('export.file', { kind, path: p, overwrite: true });
  if (!r.ok) dialog.showErrorBox('Railwright', r.error.message);
}

function buildMenu(): void {
  const recent: MenuItemConstructorOptions[] = (state?.recent ?? []).map((p) => ({
    label: p,
    click: async () => { if (await mayDiscard()) { backend.approvePath(p); await call('project.open', { path: p, discard: true }); } },
  }));
  const template: MenuItemConstructorOptions[] = [
    {
      label: 'File',
      submenu: [
        { label: 'New', accelerator: 'CmdOrCtrl+N', click: async () => { if (await mayDiscard()) await call('project.new', { discard: true }); } },
        { label: 'Open…', accelerator: 'CmdOrCtrl+O', click: async () => { if (!(await mayDiscard())) return; const p = await choosePath('open-project', ''); if (p) await call('project.open', { path: p, discard: true }); } },
        { label: 'Open Recent', submenu: recent.length ? recent : [{ label: 'No recent files', enabled: false }] },
        { label: 'Open the Demo', click: async () => { if (await mayDiscard()) await call('project.openDemo', { discard: true }); } },
        { type: 'separator' },
        { label: 'Save', accelerator: 'CmdOrCtrl+S', click: () => void saveProject(false) },
        { label: 'Save As…', accelerator: 'CmdOrCtrl+Shift+S', click: () => void saveProject(true) },
        { type: 'separator' },
        { label: 'Import JSON…', click: () => void importJson() },
        { label: 'Export Project as JSON…', click: () => void exportAs('json', '.json') },
        { label: 'Export BOM as CSV…', click: () => void exportAs('bom-csv', '.csv') },
        { label: 'Export Tree as SVG…', click: () => void exportAs('tree-svg', '.svg') },
        { type: 'separator' },
        { role: 'quit' },
      ],
    },
    {
      label: 'Edit',
      submenu: [
        { label: state?.undoLabel ? `Undo ${state.undoLabel}` : 'Undo', accelerator: 'CmdOrCtrl+Z', enabled: !!state?.canUndo, click: () => void call('requirements.undo') },
        { label: state?.redoLabel ? `Redo ${state.redoLabel}` : 'Redo', accelerator: 'CmdOrCtrl+Shift+Z', enabled: !!state?.canRedo, click: () => void call('requirements.redo') },
        { type: 'separator' },
        { role: 'cut' }, { role: 'copy' }, { role: 'paste' }, { role: 'selectAll' },
      ],
    },
    { label: 'View', submenu: [{ role: 'resetZoom' }, { role: 'zoomIn' }, { role: 'zoomOut' }, { type: 'separator' }, { role: 'togglefullscreen' }] },
  ];
  Menu.setApplicationMenu(Menu.buildFromTemplate(template));
}

app.on('web-contents-created', (_e, contents) => {
  contents.on('will-navigate', navigationGuard(appUrl));
  contents.on('will-redirect', navigationGuard(appUrl));
  contents.on('will-attach-webview', denyWebview);
  contents.setWindowOpenHandler(denyWindowOpen);
});

app.whenReady().then(async () => {
  session.defaultSession.setPermissionRequestHandler(denyPermission);
  session.defaultSession.webRequest.onHeadersReceived((details, cb) => cb({ responseHeaders: withCsp(details.responseHeaders) }));
  ipcMain.handle(REQUEST_CHANNEL, async (e, name: unknown, args: unknown) => {
    const c = checkIpc(e.senderFrame?.url, appUrl, name, args);
    if ('error' in c) return { ok: false, error: { message: c.error } };
    return backend.request(c.name, c.args);
  });
  ipcMain.handle(DIALOG_CHANNEL, async (e, purpose: unknown, suggested: unknown) => {
    if (!e.senderFrame || !checkIpc(e.senderFrame.url, appUrl, 'dialog.choose', {})) return null;
    const a = checkDialogArgs(purpose, suggested);
    return a ? choosePath(a.purpose, a.suggested) : null;
  });
  await backend.ready;
  const first = await backend.request('project.snapshot', {});
  if (first.ok) state = (first.value as Snapshot).state;
  win = new BrowserWindow(windowOptions(join(__dirname, 'preload.cjs')));
  let closing = false;
  win.on('close', (e) => {
    if (closing || !state?.dirty) return;
    e.preventDefault();
    void mayDiscard().then((go) => {
      if (!go) return;
      closing = true;
      win?.close();
    });
  });
  win.once('ready-to-show', () => win?.show());
  if (state) setState(state);
  buildMenu();
  await win.loadURL(appUrl);
});

app.on('before-quit', () => { quitting = true; });
app.on('window-all-closed', () => { void backend.stop().finally(() => app.quit()); });
