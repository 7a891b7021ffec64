// Security of the desktop shell and the local web host (issue 7, item 5). Electron is
// mocked; the policy functions the shell attaches are tested directly.
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { mkdirSync, mkdtempSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { request } from 'node:http';
import { networkInterfaces, tmpdir } from 'node:os';
import { join } from 'node:path';

vi.mock('electron', () => ({}));

import { CONTENT_SECURITY_POLICY, WINDOW_WEB_PREFERENCES } from '../../electron.config.ts';
import { checkDialogArgs, checkIpc, denyPermission, denyWebview, denyWindowOpen, navigationGuard, windowOptions, withCsp } from '../../src-main/host/shell-policy.ts';
import { makePathPolicy } from '../../src-main/host/paths.ts';
import { createApi } from '../../src-main/api/index.ts';
import { startWebHost, type WebHost } from '../../src-main/host/web-host.ts';
import { newProject } from '../../src-main/api/files.ts';

const APP = 'file:///opt/railwright/out/renderer/index.html';

describe('window settings and content security policy', () => {
  it('isolates the page: context isolation, sandbox, no node integration, no webview', () => {
    const o = windowOptions('/x/preload.cjs');
    expect(o.webPreferences).toMatchObject({ contextIsolation: true, sandbox: true, nodeIntegration: false, nodeIntegrationInWorker: false, webSecurity: true, allowRunningInsecureContent: false, webviewTag: false });
    expect(o.webPreferences.preload).toBe('/x/preload.cjs');
    expect(WINDOW_WEB_PREFERENCES.nodeIntegration).toBe(false);
  });

  it('sends a strict CSP on every response, replacing any the response carried', () => {
    const h = withCsp({ 'content-security-policy': ["default-src *"], 'X-Other': ['1'] });
    expect(Object.keys(h).filter((k) => k.toLowerCase() === 'content-security-policy')).toEqual(['Content-Security-Policy']);
    const csp = String(h['Content-Security-Policy']);
    expect(csp).toContain("default-src 'self'");
    expect(csp).toContain("script-src 'self'");
    expect(csp).toContain("object-src 'none'");
    expect(csp).not.toMatch(/unsafe-eval|unsafe-inline|\*/);
    expect(CONTENT_SECURITY_POLICY).toContain("frame-ancestors 'none'");
  });

  it('blocks navigation away from the app page and every new window', () => {
    const guard = navigationGuard(APP);
    for (const url of ['https://example.com/', 'file:///etc/passwd', 'file:///opt/railwright/out/renderer/other.html', 'javascript:alert(1)', 'not a url']) {
      const ev = { preventDefault: vi.fn() };
      guard(ev, url);
      expect(ev.preventDefault, url).toHaveBeenCalled();
    }
    const same = { preventDefault: vi.fn() };
    guard(same, APP + '#tree');
    expect(same.preventDefault).not.toHaveBeenCalled();
    expect(denyWindowOpen()).toEqual({ action: 'deny' });
    const wv = { preventDefault: vi.fn() };
    denyWebview(wv);
    expect(wv.preventDefault).toHaveBeenCalled();
    const cb = vi.fn();
    denyPermission(null, 'media', cb);
    expect(cb).toHaveBeenCalledWith(false);
  });

  it('IPC: refuses foreign senders, odd names and non-object arguments', () => {
    expect(checkIpc(APP, APP, 'project.save', {})).toEqual({ name: 'project.save', args: {} });
    expect(checkIpc('https://evil.example/', APP, 'project.save', {})).toHaveProperty('error');
    expect(checkIpc(undefined, APP, 'project.save', {})).toHaveProperty('error');
    for (const name of [42, null, '__proto__', 'constructor', 'project.save; rm', 'x'.repeat(100)]) expect(checkIpc(APP, APP, name, {}), String(name)).toHaveProperty('error');
    for (const args of [null, 'text', 3, [1, 2], new Date()]) expect(checkIpc(APP, APP, 'project.save', args), String(args)).toHaveProperty('error');
    expect(checkDialogArgs('open-project', '')).not.toBeNull();
    expect(checkDialogArgs('delete-all', '')).toBeNull();
    expect(checkDialogArgs('save-project', '../../etc/x')).toBeNull();
  });
});

describe('handlers validate every argument before use', () => {
  const api = createApi({ host: 'test', userDataDir: null });
  beforeAll(() => newProject(api.session));

  it('rejects unknown requests and malformed arguments with a named field, changing nothing', async () => {
    const before = JSON.stringify(api.session.requirements);
    const cases: [unknown, unknown, RegExp][] = [
      ['project.delete', {}, /unknown request/],
      [{}, {}, /unknown request/],
      ['toString', {}, /unknown request/],
      ['requirements.editCell', { table: 'loads' }, /rowId|field|text/],
      ['requirements.editCell', { table: 'nope', rowId: 'a', field: 'b', text: 'c' }, /table/],
      ['requirements.editCell', { table: 'sources', rowId: 'src-1', field: 'vMin', text: 5 }, /text/],
      ['requirements.editCell', { table: 'sources', rowId: 'src-1', field: 'vMin', text: '1', extra: 1 }, /extra|Unrecognized/i],
      ['requirements.editCell', { table: 'sources', rowId: 'src-1', field: 'vMin', text: '12 parsecs' }, /sources › Input › V min/],
      ['requirements.editCell', { table: 'sources', rowId: 'src-1', field: 'vMin', text: '1e400' }, /vMin/],
      ['requirements.editCell', { table: 'sources', rowId: 'src-1', field: '__proto__', text: '1' }, /no column/],
      ['project.open', { path: 42 }, /path/],
      ['project.save', { path: '/tmp/x.rwproj' }, /path/],
      ['export.file', { kind: 'exe' }, /kind/],
      ['plan.cancel', {}, /jobId/],
    ];
    for (const [name, args, re] of cases) {
      const r = await api.request(name, args);
      expect(r.ok, JSON.stringify([name, args])).toBe(false);
      if (!r.ok) expect(r.error.message + ' ' + (r.error.field ?? ''), JSON.stringify([name, args])).toMatch(re);
    }
    expect(JSON.stringify(api.session.requirements)).toBe(before);
  });
});

describe('paths from the window are not trusted', () => {
  let dir: string;
  beforeAll(() => {
    dir = mkdtempSync(join(tmpdir(), 'rw-paths-'));
    mkdirSync(join(dir, 'ok'));
    writeFileSync(join(dir, 'ok', 'a.rwproj'), 'x');
    symlinkSync('/etc', join(dir, 'ok', 'link'));
    symlinkSync('/etc/hostname', join(dir, 'ok', 'host.rwproj'));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('normalises, requires the extension, stays inside the allowed folders, refuses links and devices', () => {
    const policy = makePathPolicy({ allowedRoots: [join(dir, 'ok')], baseDir: join(dir, 'ok') });
    expect(policy('a.rwproj', 'open-project', '.rwproj')).toBe(join(dir, 'ok', 'a.rwproj'));
    expect(policy(join(dir, 'ok', 'sub', '..', 'new.rwproj'), 'save-project', '.rwproj')).toBe(join(dir, 'ok', 'new.rwproj'));
    const refuse: [string, 'open-project' | 'save-project' | 'export', string][] = [
      ['../outside.rwproj', 'save-project', '.rwproj'],
      ['/etc/passwd', 'open-project', '.rwproj'],
      ['a.txt', 'save-project', '.rwproj'],
      ['link/passwd.rwproj', 'save-project', '.rwproj'],
      ['host.rwproj', 'open-project', '.rwproj'],
      ['missing.rwproj', 'open-project', '.rwproj'],
      ['a\0.rwproj', 'save-project', '.rwproj'],
      ['', 'save-project', '.rwproj'],
      ['.hidden.rwproj', 'save-project', '.rwproj'],
      ['/dev/null', 'export', '.csv'],
    ];
    for (const [p, purpose, ext] of refuse) expect(() => policy(p, purpose, ext), p).toThrow(/path:/);
  });
});

describe('local web host', () => {
  let host: WebHost;
  const api = createApi({ host: 'web', userDataDir: null });
  beforeAll(async () => {
    newProject(api.session);
    const r = mkdtempSync(join(tmpdir(), 'rw-web-'));
    writeFileSync(join(r, 'index.html'), '<!doctype html><p>window</p>');
    host = await startWebHost({ api, rendererDir: r });
  });
  afterAll(() => host.close());

  const call = (path: string, opts: { method?: string; headers?: Record<string, string>; body?: string; host?: string } = {}) =>
    new Promise<{ status: number; body: string; headers: Record<string, unknown> }>((ok, fail) => {
      const req = request({ host: '127.0.0.1', port: host.port, path, method: opts.method ?? 'GET', headers: { host: opts.host ?? `127.0.0.1:${host.port}`, ...opts.headers } }, (res) => {
        let body = '';
        res.on('data', (c) => (body += c));
        res.on('end', () => ok({ status: res.statusCode!, body, headers: res.headers }));
      });
      req.on('error', fail);
      req.end(opts.body);
    });

  it('listens on the loopback address only', async () => {
    expect(host.url).toMatch(/^http:\/\/127\.0\.0\.1:\d+\/$/);
    const external = Object.values(networkInterfaces()).flat().find((a) => a && a.family === 'IPv4' && !a.internal);
    if (external) {
      const r = await new Promise<string>((ok) => {
        const q = request({ host: external.address, port: host.port, path: '/', timeout: 1500 }, () => ok('connected'));
        q.on('error', () => ok('refused'));
        q.on('timeout', () => { q.destroy(); ok('refused'); });
        q.end();
      });
      expect(r).toBe('refused');
    }
  });

  it('refuses every request without the token, or with a wrong one', async () => {
    const body = JSON.stringify({ name: 'project.snapshot', args: {} });
    expect((await call('/')).status).toBe(401);
    expect((await call('/index.html?token=wrong')).status).toBe(401);
    expect((await call('/api/request', { method: 'POST', headers: { 'content-type': 'application/json' }, body })).status).toBe(401);
    expect((await call('/api/request', { method: 'POST', headers: { 'content-type': 'application/json', 'x-railwright-token': host.token + 'x' }, body })).status).toBe(401);
    expect((await call('/api/events')).status).toBe(401);
    const ok = await call('/api/request', { method: 'POST', headers: { 'content-type': 'application/json', 'x-railwright-token': host.token }, body });
    expect(ok.status).toBe(200);
    expect(JSON.parse(ok.body).ok).toBe(true);
    const page = await call(`/?token=${host.token}`);
    expect(page.status).toBe(200);
    expect(String(page.headers['content-security-policy'])).toContain("default-src 'self'");
    expect(String(page.headers['set-cookie'])).toMatch(/HttpOnly; SameSite=Strict/);
  });

  it('refuses a foreign Host header (DNS rebinding) and paths outside the window folder', async () => {
    expect((await call(`/?token=${host.token}`, { host: 'evil.example:80' })).status).toBe(421);
    expect((await call(`/..%2f..%2fetc%2fpasswd?token=${host.token}`)).status).toBeGreaterThanOrEqual(403);
  });

  it('answers malformed bodies with a message, not a crash', async () => {
    const h = { 'content-type': 'application/json', 'x-railwright-token': host.token };
    const r = await call('/api/request', { method: 'POST', headers: h, body: '{not json' });
    expect(r.status).toBe(400);
    const r2 = await call('/api/request', { method: 'POST', headers: h, body: JSON.stringify({ name: 'requirements.undo', args: [] }) });
    expect(JSON.parse(r2.body).ok).toBe(false);
  });
});
