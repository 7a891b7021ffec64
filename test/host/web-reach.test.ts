// The local web host's reach (issue 10 item 6): a request used to save a project into
// ~/.ssh/ and overwrite ~/.config/<app>/settings.json, because the whole home and temporary
// folders were open to the window. Now the window may use the projects folder, the folder
// of the project it opened, and folders picked with Open or Save as in this run; never a
// hidden (dot) folder, never elsewhere; every refusal names the path and the reason. Also:
// a malformed percent escape in the address is a 400 with a message (it was a 500).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { request } from 'node:http';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { makePathPolicy } from '../../src-main/host/paths.ts';
import { startWebMain } from '../../src-main/host/web-main.ts';

const made: string[] = [];
afterAll(() => { for (const d of made) rmSync(d, { recursive: true, force: true }); });
function temp(prefix: string): string {
  const d = mkdtempSync(join(tmpdir(), prefix));
  made.push(d);
  return d;
}

describe('the web path policy', () => {
  const home = temp('rw-reach-home-');
  const projects = temp('rw-reach-projects-');
  for (const d of ['.ssh', '.config/app', 'docs', 'work/.git', 'other']) mkdirSync(join(home, d), { recursive: true });
  writeFileSync(join(home, '.config', 'app', 'settings.json'), '{"keep":true}');
  writeFileSync(join(home, 'other', 'x.rwproj'), 'x');
  symlinkSync(join(home, '.ssh'), join(home, 'keys'));
  const policy = () => makePathPolicy({ allowedRoots: [projects], chooseRoots: [home], baseDir: projects, refuseHidden: true });

  it('refuses hidden folders anywhere below the allowed folders, naming the path and the reason', () => {
    const p = policy();
    const cases: [string, 'open-project' | 'save-project' | 'export', string][] = [
      [join(home, '.ssh', 'authorized_keys.rwproj'), 'save-project', '.ssh'],
      [join(home, '.config', 'app', 'settings.json'), 'export', '.config'],
      [join(home, 'work', '.git', 'p.rwproj'), 'save-project', '.git'],
      [join(home, 'keys', 'p.rwproj'), 'save-project', '.ssh'], // a link into a hidden folder
      [join(projects, '.hidden-sub', 'p.rwproj'), 'save-project', '.hidden-sub'],
    ];
    mkdirSync(join(projects, '.hidden-sub'));
    for (const [path, purpose, part] of cases) {
      expect(() => p(path, purpose, path.endsWith('.json') ? '.json' : '.rwproj'), path).toThrow(new RegExp(`path: .* is refused: "${part.replace('.', '\\.')}" is a hidden folder`));
    }
  });

  it('exports go only to allowed folders; Open and Save as add the folder they pick', () => {
    const p = policy();
    expect(() => p(join(home, 'docs', 'bom.csv'), 'export', '.csv')).toThrow(/path: .*bom\.csv is refused: exports go only into the project's folder or a folder chosen with Open or Save as/);
    expect(() => p('/etc/x.rwproj', 'save-project', '.rwproj')).toThrow(/path: \/etc\/x\.rwproj is outside the folders this window may use/);
    expect(p(join(projects, 'bom.csv'), 'export', '.csv')).toBe(join(projects, 'bom.csv'));
    expect(p(join(home, 'docs', 'p.rwproj'), 'save-project', '.rwproj')).toBe(join(home, 'docs', 'p.rwproj'));
    expect(p(join(home, 'docs', 'bom.csv'), 'export', '.csv')).toBe(join(home, 'docs', 'bom.csv'));
    expect(() => p(join(home, 'other', 'bom.csv'), 'export', '.csv')).toThrow(/exports go only/);
    expect(p(join(home, 'other', 'x.rwproj'), 'open-project', '.rwproj')).toBe(join(home, 'other', 'x.rwproj'));
    expect(p(join(home, 'other', 'bom.csv'), 'export', '.csv')).toBe(join(home, 'other', 'bom.csv'));
    expect(p.folders()).toEqual([projects, join(home, 'docs'), join(home, 'other')].map((d) => d));
    // A new run starts with the first folders only.
    expect(() => policy()(join(home, 'docs', 'bom.csv'), 'export', '.csv')).toThrow(/exports go only/);
  });
});

describe('the local web host', () => {
  const home = temp('rw-reach-home2-');
  const data = temp('rw-reach-data-');
  const renderer = temp('rw-reach-renderer-');
  let m: Awaited<ReturnType<typeof startWebMain>>;
  let savedHome: string | undefined;
  beforeAll(async () => {
    for (const d of ['.ssh', '.config/app', 'docs']) mkdirSync(join(home, d), { recursive: true });
    writeFileSync(join(home, '.config', 'app', 'settings.json'), '{"keep":true}');
    writeFileSync(join(renderer, 'index.html'), '<!doctype html><p>window</p>');
    savedHome = process.env.HOME;
    process.env.HOME = home; // os.homedir() reads HOME on this platform
    m = await startWebMain({ userDataDir: data, rendererDir: renderer, autosaveMs: 0 });
  });
  afterAll(async () => {
    await m?.stop();
    process.env.HOME = savedHome;
  });

  it('never writes into ~/.ssh or ~/.config, and says why', async () => {
    const save = await m.api.request('project.save', { path: join(home, '.ssh', 'authorized_keys.rwproj') });
    expect(save.ok).toBe(false);
    if (!save.ok) expect(save.error.message).toMatch(/authorized_keys\.rwproj is refused: "\.ssh" is a hidden folder/);
    const exp = await m.api.request('export.file', { kind: 'json', path: join(home, '.config', 'app', 'settings.json') });
    expect(exp.ok).toBe(false);
    if (!exp.ok) expect(exp.error.message).toMatch(/settings\.json is refused: "\.config" is a hidden folder/);
    expect(readFileSync(join(home, '.config', 'app', 'settings.json'), 'utf8')).toBe('{"keep":true}');
    expect(existsSync(join(home, '.ssh', 'authorized_keys.rwproj'))).toBe(false);
  });

  it('exports beside a project saved in a folder the user picked, not elsewhere', async () => {
    const out = join(home, 'docs', 'p.json');
    const before = await m.api.request('export.file', { kind: 'json', path: out });
    expect(before.ok).toBe(false);
    if (!before.ok) expect(before.error.message).toMatch(/exports go only into the project's folder/);
    expect((await m.api.request('project.save', { path: join(home, 'docs', 'p.rwproj') })).ok).toBe(true);
    expect((await m.api.request('export.file', { kind: 'json', path: out })).ok).toBe(true);
    expect(existsSync(out)).toBe(true);
  });

  it('answers a malformed percent escape with 400 and a message, then keeps serving', async () => {
    const get = (path: string) => new Promise<{ status: number; body: string }>((ok, fail) => {
      const req = request({ host: '127.0.0.1', port: m.host.port, path, headers: { host: `127.0.0.1:${m.host.port}`, cookie: `railwright_token=${m.host.token}` } }, (res) => {
        let body = '';
        res.on('data', (c) => (body += c));
        res.on('end', () => ok({ status: res.statusCode!, body }));
      });
      req.on('error', fail);
      req.end();
    });
    for (const bad of ['/%E0%A4%A', '/%', '/index.html%zz', '/api/%E0%A4%A']) {
      const r = await get(bad);
      expect(r.status, bad).toBe(400);
      expect(r.body).toMatch(/malformed address: .* is not a valid path \(bad percent escape\)/);
    }
    expect((await get('/')).status).toBe(200);
  });
});
