#!/usr/bin/env node
// `npm start`: build the window if needed, then open it in Electron when its binary is
// installed, otherwise serve it from the local web host (127.0.0.1, per-run token) and open
// Chromium in app mode where installed.
import { existsSync, readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join, resolve } from 'node:path';
import { spawn, spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const rendererDir = join(root, 'out', 'renderer');
const require = createRequire(import.meta.url);

function run(cmd, args) {
  const r = spawnSync(cmd, args, { cwd: root, stdio: 'inherit' });
  if (r.status !== 0) process.exit(r.status ?? 1);
}

if (!existsSync(join(rendererDir, 'index.html'))) {
  console.log('Building the window (first run)…');
  run(process.execPath, [join(root, 'node_modules', 'vite', 'bin', 'vite.js'), 'build', '--logLevel', 'warn']);
}

/** The Electron binary's path when it is installed; never triggers a download. */
function electronBinary() {
  if (process.env.RAILWRIGHT_WEB === '1') return null;
  try {
    const dir = dirname(require.resolve('electron/package.json'));
    const pathFile = join(dir, 'path.txt');
    if (!existsSync(pathFile)) return null;
    const exe = join(dir, 'dist', readFileSync(pathFile, 'utf8').trim());
    return existsSync(exe) ? exe : null;
  } catch {
    return null;
  }
}

const electron = electronBinary();
if (electron) {
  // Bundle the main process and the preload (the store runs in a plain Node child).
  run(process.execPath, [join(root, 'node_modules', 'tsx', 'dist', 'cli.mjs'), join(root, 'src-main', 'host', 'build-shell.ts')]);
  const child = spawn(electron, [join(root, 'out', 'host', 'electron-main.cjs')], {
    cwd: root,
    stdio: 'inherit',
    // The backend child must run under this Node (its better-sqlite3 build matches it).
    env: { ...process.env, RAILWRIGHT_NODE: process.execPath, RAILWRIGHT_ROOT: root },
  });
  child.on('exit', (code) => process.exit(code ?? 0));
} else {
  const { register } = await import('tsx/esm/api');
  register();
  const { startWebMain, defaultUserDataDir } = await import('../src-main/host/web-main.ts');
  const port = process.env.RAILWRIGHT_PORT ? Number(process.env.RAILWRIGHT_PORT) : 0;
  const { host, stop } = await startWebMain({ userDataDir: process.env.RAILWRIGHT_DATA || defaultUserDataDir(), rendererDir, port });
  console.log('Railwright is running in this terminal (no Electron binary installed).');
  console.log(`Open: ${host.entryUrl}`);
  console.log('The address carries a one-time token; keep it private. Ctrl+C stops.');
  const browser = ['/usr/bin/chromium', '/usr/bin/chromium-browser'].find((p) => existsSync(p));
  if (browser && process.env.CI !== 'true' && process.env.RAILWRIGHT_NO_BROWSER !== '1') {
    const b = spawn(browser, [`--app=${host.entryUrl}`, `--user-data-dir=${join(process.env.RAILWRIGHT_DATA || defaultUserDataDir(), 'browser')}`], { stdio: 'ignore', detached: true });
    b.on('error', () => {});
    b.unref();
  }
  const quit = async () => { await stop(); process.exit(0); };
  process.on('SIGINT', quit);
  process.on('SIGTERM', quit);
}
