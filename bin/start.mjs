#!/usr/bin/env node
// `npm start`: build the window if needed, then open it in Electron when its binary is
// installed, otherwise serve it from the local web host (127.0.0.1, per-run token) and open
// a browser (BROWSER, else Chromium in app mode where installed; BROWSER=none opens none).
// Every environment switch is listed in README.md.
import { chmodSync, existsSync, mkdirSync, readFileSync, unlinkSync, writeFileSync } from 'node:fs';
import { randomBytes } from 'node:crypto';
import { createRequire } from 'node:module';
import { dirname, join, resolve } from 'node:path';
import { spawn, spawnSync } from 'node:child_process';
import { fileURLToPath, pathToFileURL } from 'node:url';

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
  const dataDir = process.env.RAILWRIGHT_DATA || defaultUserDataDir();
  const port = process.env.RAILWRIGHT_PORT ? Number(process.env.RAILWRIGHT_PORT) : 0;
  const { host, stop } = await startWebMain({ userDataDir: dataDir, rendererDir, port });
  console.log('Railwright is running in this terminal (no Electron binary installed).');
  // Each launch address works once: it sets a cookie in the browser that opens it.
  console.log(`Open: ${host.launchUrl()}`);
  console.log('The address works once (in one browser); keep it private. Ctrl+C stops.');
  const launchFiles = [];
  const browser = chooseBrowser();
  if (browser) {
    // The browser gets a local file only this user can read, which forwards to a second
    // one-time address: no secret on its command line (other users can read command lines).
    const file = writeLaunchFile(dataDir, host.launchUrl());
    launchFiles.push(file);
    const url = pathToFileURL(file).href;
    const args = browser.app ? [`--app=${url}`, `--user-data-dir=${join(dataDir, 'browser')}`] : browser.args.map((a) => a.replaceAll('%s', url));
    if (!browser.app && !browser.args.some((a) => a.includes('%s'))) args.push(url);
    const b = spawn(browser.cmd, args, { stdio: 'ignore', detached: true });
    b.on('error', (e) => console.log(`Could not start the browser (${browser.cmd}: ${e.message}); open the address above instead.`));
    b.unref();
    // The file has done its job once the browser read it.
    setTimeout(() => removeLaunchFiles(launchFiles), 60_000).unref();
  }
  const quit = async () => { removeLaunchFiles(launchFiles); await stop(); process.exit(0); };
  process.on('SIGINT', quit);
  process.on('SIGTERM', quit);
}

/**
 * Which browser to start, if any. BROWSER=none (the usual convention) or
 * RAILWRIGHT_NO_BROWSER=1 or CI=true: none. BROWSER=<command> (the first of a
 * colon-separated list, `%s` standing for the address): that command. Otherwise Chromium in
 * app mode where installed.
 */
function chooseBrowser() {
  const env = process.env.BROWSER;
  if (env !== undefined && env.trim() !== '') {
    const first = env.split(':')[0].trim();
    if (first === '' || first.toLowerCase() === 'none') return null;
    const [cmd, ...args] = first.split(/\s+/);
    return { cmd, args, app: false };
  }
  if (process.env.RAILWRIGHT_NO_BROWSER === '1' || process.env.CI === 'true') return null;
  const chromium = ['/usr/bin/chromium', '/usr/bin/chromium-browser'].find((p) => existsSync(p));
  return chromium ? { cmd: chromium, args: [], app: true } : null;
}

/** A page readable only by this user (0600 in a 0700 folder) that forwards to `target`. */
function writeLaunchFile(dataDir, target) {
  const dir = join(dataDir, 'launch');
  mkdirSync(dir, { recursive: true, mode: 0o700 });
  chmodSync(dir, 0o700);
  const file = join(dir, `open-${randomBytes(8).toString('hex')}.html`);
  const html = `<!doctype html><meta charset="utf-8"><meta http-equiv="refresh" content="0;url=${target}"><title>Railwright</title><p>Opening Railwright…</p>\n`;
  writeFileSync(file, html, { mode: 0o600, flag: 'wx' });
  return file;
}

function removeLaunchFiles(files) {
  for (const f of files.splice(0)) {
    try { unlinkSync(f); } catch { /* already gone */ }
  }
}
