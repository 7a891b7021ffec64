// `npm start` without the Electron binary (as on this machine): bin/start.mjs must fall back
// to the local web host on the demo project, print the address with its token, and serve
// the window only to requests that carry the token.
import { afterAll, describe, expect, it } from 'vitest';
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';

const ROOT = resolve(import.meta.dirname, '../..');

describe('npm start (web host fallback)', () => {
  const data = mkdtempSync(join(tmpdir(), 'rw-start-'));
  let child: ChildProcess | null = null;
  afterAll(async () => {
    if (child && child.exitCode === null) {
      child.kill('SIGTERM');
      await new Promise((r) => child!.once('exit', r));
    }
    rmSync(data, { recursive: true, force: true });
  });

  it('prints a loopback address with a token and serves the demo', { timeout: 180_000 }, async () => {
    child = spawn(process.execPath, [join(ROOT, 'bin', 'start.mjs')], {
      cwd: ROOT,
      env: { ...process.env, RAILWRIGHT_NO_BROWSER: '1', RAILWRIGHT_DATA: data, RAILWRIGHT_WEB: '1' },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let out = '';
    const url = await new Promise<string>((ok, fail) => {
      child!.stdout!.on('data', (c) => {
        out += String(c);
        const m = /Open: (http:\/\/127\.0\.0\.1:\d+\/\?token=[\w-]+)/.exec(out);
        if (m) ok(m[1]!);
      });
      child!.once('exit', (code) => fail(new Error(`start.mjs exited (${code}): ${out}`)));
    });
    const u = new URL(url);
    const token = u.searchParams.get('token')!;
    expect(token.length).toBeGreaterThanOrEqual(32);
    expect((await fetch(new URL('/', u))).status).toBe(401);
    const page = await fetch(url);
    expect(page.status).toBe(200);
    expect(await page.text()).toContain('<div id="app">');
    const r = await fetch(new URL('/api/request', u), {
      method: 'POST', headers: { 'content-type': 'application/json', 'x-railwright-token': token },
      body: JSON.stringify({ name: 'project.snapshot', args: {} }),
    });
    const body = await r.json() as { ok: boolean; value: { requirements: { meta: { name: string } }; state: { host: string } } };
    expect(body.ok).toBe(true);
    expect(body.value.state.host).toBe('web');
    expect(body.value.requirements.meta.name).toMatch(/demonstration/);
    // First run keeps the demo as a project file in the user data folder.
    expect(existsSync(join(data, 'projects', 'demo.rwproj'))).toBe(true);
  });
});
