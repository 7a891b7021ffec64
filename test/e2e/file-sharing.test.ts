// End-to-end (issue 10 items 2-3): in the real window (built Svelte bundle, Debian's
// Chromium, local web host), Save after another program saved the file offers Save As or
// Reopen instead of overwriting, and Save As onto an existing file asks first.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import type { BrowserContext, Page } from 'playwright-core';
import { chromium as chromiumTool } from '../helpers/tools.ts';
import { ProjectStore } from '../../src-main/store/project-store.ts';

const ROOT = resolve(import.meta.dirname, '../..');
const RENDERER = join(ROOT, 'out', 'renderer');
const tool = chromiumTool();
const sha = (p: string) => createHash('sha256').update(readFileSync(p)).digest('hex');

function renameOnDisk(path: string, name: string): void {
  const s = ProjectStore.open(path);
  const req = s.getRequirements();
  req.meta.name = name;
  s.setRequirements(req);
  s.save();
  s.close();
}

describe.skipIf(tool.skip)('window: files shared with other programs', () => {
  let tmp: string;
  let stop: () => Promise<void>;
  let context: BrowserContext;
  let page: Page;

  beforeAll(async () => {
    if (!existsSync(join(RENDERER, 'index.html'))) {
      const { build } = await import('vite');
      await build({ configFile: join(ROOT, 'vite.config.ts'), logLevel: 'warn' });
    }
    tmp = mkdtempSync(join(tmpdir(), 'rw-e2e-share-'));
    const { startWebMain } = await import('../../src-main/host/web-main.ts');
    const h = await startWebMain({ userDataDir: join(tmp, 'data'), rendererDir: RENDERER, autosaveMs: 0, allowedRoots: [tmp] });
    stop = h.stop;
    const { chromium } = await import('playwright-core');
    context = await chromium.launchPersistentContext(join(tmp, 'browser'), {
      executablePath: tool.path!,
      headless: true,
      viewport: { width: 1280, height: 800 },
      args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
    });
    page = context.pages()[0] ?? (await context.newPage());
    page.on('pageerror', (e) => { throw e; });
    await page.goto(h.host.entryUrl);
    await page.waitForSelector('[data-testid=file-state]');
  }, 180_000);

  afterAll(async () => {
    await context?.close();
    await stop?.();
    if (tmp) rmSync(tmp, { recursive: true, force: true });
  });

  const fileState = () => page.locator('[data-testid=file-state]').textContent();

  async function saveAs(path: string) {
    await page.click('text=Save as…');
    await page.locator('[data-testid=prompt] input').fill(path);
    await page.click('[data-testid=prompt-ok]');
  }

  it('Save after another program saved the file offers Save As or Reopen, and Reopen shows the newer version', { timeout: 60_000 }, async () => {
    await expect.poll(fileState).toContain('Field transmitter');
    const path = join(tmp, 'shared.rwproj');
    await saveAs(path);
    await expect.poll(fileState).toContain('shared.rwproj');
    renameOnDisk(path, 'Saved by another program');
    const newer = sha(path);
    await page.click('[data-testid=save]');
    const dialog = page.locator('[data-testid=prompt]');
    await expect.poll(() => dialog.textContent()).toMatch(/changed on disk since it was opened/);
    expect(await dialog.locator('[data-testid=prompt-ok]').textContent()).toBe('Save as…');
    expect(sha(path)).toBe(newer);
    await page.click('[data-testid=prompt-alt]');
    await expect.poll(fileState).toContain('Saved by another program');
    expect(sha(path)).toBe(newer);
  });

  it('Save As onto an existing file asks first; Cancel keeps it, Replace replaces it', { timeout: 60_000 }, async () => {
    const other = join(tmp, 'other.rwproj');
    const s = ProjectStore.create();
    s.save(other);
    s.close();
    const before = sha(other);
    await saveAs(other);
    const dialog = page.locator('[data-testid=prompt]');
    await expect.poll(() => dialog.textContent()).toMatch(/other\.rwproj already exists\. Replace it with this project\?/);
    await page.click('[data-testid=prompt] >> text=Cancel');
    await expect.poll(() => dialog.count()).toBe(0);
    expect(sha(other)).toBe(before);
    await saveAs(other);
    await expect.poll(() => dialog.textContent()).toMatch(/already exists/);
    await page.click('[data-testid=prompt-ok]');
    await expect.poll(fileState).toContain('other.rwproj');
    expect(ProjectStore.open(other).getRequirements().meta.name).toBe('Saved by another program');
  });
});
