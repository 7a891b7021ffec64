// `npm start` without the Electron binary (as on this machine): bin/start.mjs must fall back
// to the local web host on the demo project, print a one-time launch address (never the
// token), honour BROWSER=none (the usual convention: start no browser) and, when it does
// start one, hand it the address through a file only the user can read, so that no secret
// is on any command line (other local users can read /proc/<pid>/cmdline).
import { afterAll, describe, expect, it } from 'vitest';
import { spawn, type ChildProcess } from 'node:child_process';
import { chmodSync, existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const ROOT = resolve(import.meta.dirname, '../..');
const children: ChildProcess[] = [];
const dirs: string[] = [];

afterAll(async () => {
  for (const child of children) {
    if (child.exitCode === null) {
      child.kill('SIGTERM');
      await new Promise((r) => child.once('exit', r));
    }
  }
  for (const d of dirs) rmSync(d, { recursive: true, force: true });
});

function temp(prefix: string): string {
  const d = mkdtempSync(join(tmpdir(), prefix));
  dirs.push(d);
  return d;
}

/** Start bin/start.mjs with `env`; resolves with the printed address and the process. */
async function start(env: Record<string, string>): Promise<{ url: string; child: ChildProcess; out: () => string }> {
  const child = spawn(process.execPath, [join(ROOT, 'bin', 'start.mjs')], {
    cwd: ROOT,
    env: { ...process.env, RAILWRIGHT_NO_BROWSER: '', CI: '', RAILWRIGHT_WEB: '1', ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  children.push(child);
  let out = '';
  const url = await new Promise<string>((ok, fail) => {
    child.stdout!.on('data', (c) => {
      out += String(c);
      const m = /Open: (http:\/\/127\.0\.0\.1:\d+\/\S*)/.exec(out);
      if (m) ok(m[1]!);
    });
    child.once('exit', (code) => fail(new Error(`start.mjs exited (${code}): ${out}`)));
  });
  return { url, child, out: () => out };
}

function cmdline(pid: number): string {
  return readFileSync(`/proc/${pid}/cmdline`, 'utf8').replaceAll('\0', ' ');
}

describe('npm start (web host fallback)', () => {
  it('prints a one-time launch address, no token; the address sets a cookie once; BROWSER=none starts no browser', { timeout: 180_000 }, async () => {
    const data = temp('rw-start-');
    const { url, child, out } = await start({ BROWSER: 'none', RAILWRIGHT_DATA: data });
    expect(url).toMatch(/^http:\/\/127\.0\.0\.1:\d+\/launch\/[\w-]{32,}$/);
    expect(out()).not.toMatch(/token=/);
    const u = new URL(url);
    expect((await fetch(new URL('/', u))).status).toBe(401);
    const first = await fetch(url, { redirect: 'manual' });
    expect(first.status).toBe(200);
    const cookie = first.headers.get('set-cookie') ?? '';
    expect(cookie).toMatch(/^railwright_token=[\w-]+; HttpOnly; SameSite=Strict; Path=\//);
    const jar = cookie.split(';')[0]!;
    // The code is consumed at first use.
    expect((await fetch(url)).status).toBe(401);
    const page = await fetch(new URL('/', u), { headers: { cookie: jar } });
    expect(page.status).toBe(200);
    expect(await page.text()).toContain('<div id="app">');
    const api = (headers: Record<string, string>) => fetch(new URL('/api/request', u), {
      method: 'POST', headers: { 'content-type': 'application/json', ...headers },
      body: JSON.stringify({ name: 'project.snapshot', args: {} }),
    });
    // The cookie alone is not enough for the API: the request header must come with it.
    expect((await api({ cookie: jar })).status).toBe(401);
    const r = await api({ cookie: jar, 'x-railwright-request': '1' });
    const body = await r.json() as { ok: boolean; value: { requirements: { meta: { name: string } }; state: { host: string } } };
    expect(body.ok).toBe(true);
    expect(body.value.state.host).toBe('web');
    expect(body.value.requirements.meta.name).toMatch(/demonstration/);
    // First run keeps the demo as a project file in the user data folder.
    expect(existsSync(join(data, 'projects', 'demo.rwproj'))).toBe(true);
    // No secret on the host's own command line, and no browser was started.
    expect(cmdline(child.pid!)).not.toMatch(/launch\/|token/);
    await new Promise((r) => setTimeout(r, 2000));
    expect(existsSync(join(data, 'browser'))).toBe(false);
    expect(existsSync(join(data, 'launch'))).toBe(false);
  });

  it('BROWSER=<command> gets a private file address, not the secret; the file opens the window once', { timeout: 180_000 }, async () => {
    const data = temp('rw-start-browser-');
    const fake = join(data, 'fake-browser.sh');
    const seen = join(data, 'browser-args.txt');
    writeFileSync(fake, `#!/bin/sh\nprintf '%s\\n' "$@" > '${seen}'\n`);
    chmodSync(fake, 0o755);
    const { url } = await start({ BROWSER: `${fake} --new-window %s`, RAILWRIGHT_DATA: data });
    for (let i = 0; i < 100 && !existsSync(seen); i++) await new Promise((r) => setTimeout(r, 100));
    const args = readFileSync(seen, 'utf8').trim().split('\n');
    expect(args[0]).toBe('--new-window');
    expect(args[1]).toMatch(/^file:\/\//);
    expect(args.join(' ')).not.toMatch(/token|http:|127\.0\.0\.1/);
    const file = fileURLToPath(args[1]!);
    expect(statSync(file).mode & 0o777).toBe(0o600);
    expect(statSync(join(data, 'launch')).mode & 0o777).toBe(0o700);
    const target = /url=(http:\/\/127\.0\.0\.1:\d+\/launch\/[\w-]+)/.exec(readFileSync(file, 'utf8'))![1]!;
    expect(target).not.toBe(url); // its own one-time code
    expect((await fetch(target)).status).toBe(200);
    expect((await fetch(target)).status).toBe(401);
    expect(readdirSync(join(data, 'launch'))).toHaveLength(1);
  });
});
