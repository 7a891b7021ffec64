/**
 * Shared start-up for the browser tests: the built window (out/renderer) served by the local
 * web host on a random port with a temporary user folder, driven in Debian's Chromium through
 * playwright-core. `api` calls the same contract the window uses (through the page, with the
 * page's token), so a test can read back what the window changed.
 */
import { existsSync, mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import type { BrowserContext, Page } from 'playwright-core';
import type { RequestArgs, RequestName, RequestValue } from '../../src-main/api/contract.ts';
import type { WebMainOptions } from '../../src-main/host/web-main.ts';
import { chromium as chromiumTool } from './tools.ts';

export const ROOT = resolve(import.meta.dirname, '../..');
export const RENDERER = join(ROOT, 'out', 'renderer');
export const SHOTS = join(ROOT, 'test-output', 'e2e');

export interface WindowHarness {
  tmp: string;
  page: Page;
  context: BrowserContext;
  entryUrl: string;
  /** Screenshot to test-output/e2e/<name>.png; returns the path. */
  shot(name: string): Promise<string>;
  /** One request through the page's own bridge credentials; throws on an error answer. */
  api<K extends RequestName>(name: K, args: RequestArgs<K>): Promise<RequestValue<K>>;
  close(): Promise<void>;
}

export const chromiumCheck = chromiumTool;

export async function startWindow(extra: Partial<WebMainOptions> = {}): Promise<WindowHarness> {
  const tool = chromiumTool();
  if (!existsSync(join(RENDERER, 'index.html'))) {
    const { build } = await import('vite');
    await build({ configFile: join(ROOT, 'vite.config.ts'), logLevel: 'warn' });
  }
  mkdirSync(SHOTS, { recursive: true });
  const tmp = mkdtempSync(join(tmpdir(), 'rw-e2e-'));
  const { startWebMain } = await import('../../src-main/host/web-main.ts');
  const h = await startWebMain({ userDataDir: join(tmp, 'data'), rendererDir: RENDERER, autosaveMs: 0, allowedRoots: [tmp], ...extra });
  const { chromium } = await import('playwright-core');
  const context = await chromium.launchPersistentContext(join(tmp, 'browser'), {
    executablePath: tool.path!,
    headless: true,
    acceptDownloads: true,
    viewport: { width: 1440, height: 900 },
    args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
  });
  const page = context.pages()[0] ?? (await context.newPage());
  page.on('pageerror', (e) => { throw e; });
  return {
    tmp,
    page,
    context,
    entryUrl: h.host.entryUrl,
    async shot(name) {
      const path = join(SHOTS, `${name}.png`);
      await page.screenshot({ path });
      return path;
    },
    async api(name, args) {
      const r = await page.evaluate(async ({ name, args }) => {
        const token = sessionStorage.getItem('railwright-token') ?? '';
        const res = await fetch('/api/request', { method: 'POST', headers: { 'content-type': 'application/json', 'x-railwright-token': token }, body: JSON.stringify({ name, args }) });
        return (await res.json()) as { ok: boolean; value?: unknown; error?: { message: string } };
      }, { name, args });
      if (!r.ok) throw new Error(`${name}: ${r.error?.message}`);
      return r.value as RequestValue<typeof name>;
    },
    async close() {
      await context.close();
      await h.stop();
      rmSync(tmp, { recursive: true, force: true });
    },
  };
}
