// End-to-end: the way bin/start.mjs hands the window to a browser, in Debian's Chromium.
// The browser is given only a local file readable by the user; the file forwards to a
// one-time launch address, which sets the HttpOnly, SameSite=Strict cookie; the window then
// loads and talks to the host with the cookie alone (no token in any address or command line).
import { afterAll, describe, expect, it } from 'vitest';
import { spawn, type ChildProcess } from 'node:child_process';
import { chmodSync, existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { chromium as chromiumTool } from '../helpers/tools.ts';

const ROOT = resolve(import.meta.dirname, '../..');
const tool = chromiumTool();

describe.skipIf(tool.skip)('start-up hand-over to a browser', () => {
  const data = mkdtempSync(join(tmpdir(), 'rw-e2e-launch-'));
  let child: ChildProcess | null = null;
  afterAll(async () => {
    if (child && child.exitCode === null) {
      child.kill('SIGTERM');
      await new Promise((r) => child!.once('exit', r));
    }
    rmSync(data, { recursive: true, force: true });
  });

  it('the launch file opens the window once, with the cookie only', { timeout: 180_000 }, async () => {
    if (!existsSync(join(ROOT, 'out', 'renderer', 'index.html'))) {
      const { build } = await import('vite');
      await build({ configFile: join(ROOT, 'vite.config.ts'), logLevel: 'warn' });
    }
    // A stand-in for the browser command records the address it is given.
    const fake = join(data, 'fake-browser.sh');
    const seen = join(data, 'browser-arg.txt');
    writeFileSync(fake, `#!/bin/sh\nprintf '%s' "$1" > '${seen}'\n`);
    chmodSync(fake, 0o755);
    child = spawn(process.execPath, [join(ROOT, 'bin', 'start.mjs')], {
      cwd: ROOT,
      env: { ...process.env, RAILWRIGHT_WEB: '1', RAILWRIGHT_DATA: join(data, 'user'), BROWSER: fake },
      stdio: ['ignore', 'ignore', 'inherit'],
    });
    for (let i = 0; i < 600 && !existsSync(seen); i++) await new Promise((r) => setTimeout(r, 100));
    const fileUrl = readFileSync(seen, 'utf8');
    expect(fileUrl).toMatch(/^file:\/\//);
    const { chromium } = await import('playwright-core');
    const browser = await chromium.launch({
      executablePath: tool.path!, headless: true,
      args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
    });
    try {
      const page = await browser.newPage();
      await page.goto(fileUrl);
      await expect.poll(() => page.locator('[data-testid=file-state]').textContent(), { timeout: 60_000 }).toContain('Field transmitter');
      expect(page.url()).toMatch(/^http:\/\/127\.0\.0\.1:\d+\/$/);
      const cookies = await page.context().cookies();
      expect(cookies.find((c) => c.name === 'railwright_token')).toMatchObject({ httpOnly: true, sameSite: 'Strict' });
      // The same file a second time: the code is used up.
      const again = await browser.newPage();
      const res = await again.goto(fileUrl);
      await again.waitForURL(/127\.0\.0\.1/);
      expect(await again.textContent('body')).toMatch(/wrong or was already used/);
      void res;
    } finally {
      await browser.close();
    }
  });
});
