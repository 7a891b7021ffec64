// The desktop shell's bundles: a sandboxed preload may load nothing but 'electron', and it
// must expose exactly one object; the main bundle loads no native module (the store lives
// in the Node child). Also: the window's own CSP meta matches the shell's policy.
import { describe, expect, it, vi } from 'vitest';
import { execFileSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { builtinModules } from 'node:module';
import { join, resolve } from 'node:path';
import { CONTENT_SECURITY_POLICY } from '../../electron.config.ts';

const ROOT = resolve(import.meta.dirname, '../..');

describe('desktop shell bundles', () => {
  it('builds main and preload; the preload requires only electron and exposes one object', { timeout: 120_000 }, async () => {
    execFileSync(process.execPath, [join(ROOT, 'node_modules', 'tsx', 'dist', 'cli.mjs'), join(ROOT, 'src-main', 'host', 'build-shell.ts')], { cwd: ROOT, stdio: 'pipe' });
    const preload = readFileSync(join(ROOT, 'out', 'host', 'preload.cjs'), 'utf8');
    const requires = [...preload.matchAll(/require\(["']([^"']+)["']\)/g)].map((m) => m[1]);
    expect(requires).toEqual(['electron']);
    // Run the preload against a fake electron and see what it exposes.
    const exposed: Record<string, unknown> = {};
    const invoke = vi.fn(async () => ({ ok: true, value: 1 }));
    const fakeElectron = {
      contextBridge: { exposeInMainWorld: (k: string, v: unknown) => { exposed[k] = v; } },
      ipcRenderer: { invoke, on: vi.fn() },
    };
    new Function('require', preload)((m: string) => (m === 'electron' ? fakeElectron : undefined));
    expect(Object.keys(exposed)).toEqual(['railwright']);
    const bridge = exposed.railwright as { host: string; request: (n: string, a: unknown) => Promise<unknown> };
    expect(bridge.host).toBe('electron');
    await bridge.request('project.snapshot', {});
    expect(invoke).toHaveBeenCalledWith('railwright:request', 'project.snapshot', {});
    const main = readFileSync(join(ROOT, 'out', 'host', 'electron-main.cjs'), 'utf8');
    const mainRequires = [...main.matchAll(/require\(["']([^"']+)["']\)/g)].map((m) => m[1]!);
    for (const m of mainRequires) expect(m === 'electron' || builtinModules.includes(m.replace(/^node:/, '')), m).toBe(true);
  });

  it('the page CSP meta carries the same directives as the shell (frame-ancestors only works as a header)', () => {
    const html = readFileSync(join(ROOT, 'src-renderer', 'index.html'), 'utf8');
    const meta = /http-equiv="Content-Security-Policy" content="([^"]+)"/.exec(html)?.[1];
    expect(meta).toBeTruthy();
    const set = (csp: string) => new Set(csp.split(';').map((d) => d.trim()).filter((d) => d && !d.startsWith('frame-ancestors')));
    expect(set(meta!)).toEqual(set(CONTENT_SECURITY_POLICY));
  });
});
