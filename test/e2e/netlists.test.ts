// Parts › SPICE netlists downloads one runnable file per switching stage; each runs alone in
// ngspice (an independent simulator) without "device already exists" or any error.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { execFileSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Download, Page } from 'playwright-core';
import { chromiumCheck, startWindow, type WindowHarness } from '../helpers/e2e-window.ts';
import { ngspice } from '../helpers/tools.ts';

const tool = chromiumCheck();
const spice = ngspice();

describe.skipIf(tool.skip || spice.skip)('SPICE netlists from the window', () => {
  let w: WindowHarness;
  let page: Page;

  beforeAll(async () => {
    w = await startWindow();
    page = w.page;
    await page.goto(w.entryUrl);
    await page.waitForSelector('[data-testid=tree-svg]', { timeout: 140_000 });
  }, 150_000);
  afterAll(async () => { await w?.close(); });

  it('downloads one file per switching stage and each runs in ngspice -b', { timeout: 600_000 }, async () => {
    const stages = (await w.api('project.snapshot', {})).plan!.selected!.stages.filter((s) => s.kind !== 'ldo');
    expect(stages.length).toBeGreaterThan(1);
    const downloads: Download[] = [];
    page.on('download', (d) => downloads.push(d));
    await page.click('[data-viewtab=parts]');
    await page.click('[data-export=spice]');
    await expect.poll(() => downloads.length, { timeout: 60_000 }).toBe(stages.length);
    await expect.poll(() => page.locator('[data-testid=status]').textContent()).toMatch(/one per switching stage/);
    await w.shot('netlists-downloaded');
    const names = downloads.map((d) => d.suggestedFilename());
    expect(new Set(names).size).toBe(names.length);
    for (const d of downloads) {
      const file = join(w.tmp, d.suggestedFilename());
      await d.saveAs(file);
      const text = readFileSync(file, 'utf8');
      // One circuit per file: a single .end, at the end.
      expect(text.match(/^\.end\s*$/gim)?.length, file).toBe(1);
      let out = '';
      try {
        out = execFileSync(spice.path!, ['-b', file], { encoding: 'utf8', timeout: 240_000, stdio: ['ignore', 'pipe', 'pipe'] });
      } catch (e) {
        const err = e as { stdout?: string; stderr?: string; status?: number };
        throw new Error(`ngspice failed on ${d.suggestedFilename()} (exit ${err.status}): ${(err.stderr ?? '').slice(-1500)} ${(err.stdout ?? '').slice(-1500)}`);
      }
      expect(out, d.suggestedFilename()).not.toMatch(/already exists|fatal|error:/i);
    }
  });
});
