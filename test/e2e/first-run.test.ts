// First run opens on the demo already planned, and every plan is fitted whole in the drawing.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { chromiumCheck, startWindow, type WindowHarness } from '../helpers/e2e-window.ts';

const tool = chromiumCheck();

describe.skipIf(tool.skip)('first run and fitting', () => {
  let w: WindowHarness;
  let page: Page;

  beforeAll(async () => {
    w = await startWindow();
    page = w.page;
  }, 60_000);
  afterAll(async () => { await w?.close(); });

  /** Node boxes of the drawing that are not wholly inside the visible canvas. */
  const outside = () => page.evaluate(() => {
    const c = document.querySelector('.canvas')!.getBoundingClientRect();
    return [...document.querySelectorAll('[data-node] rect')].map((r) => r.getBoundingClientRect())
      .filter((b) => b.left < c.left - 0.5 || b.right > c.right + 0.5 || b.top < c.top - 0.5 || b.bottom > c.bottom + 0.5).length;
  });

  it('opens on the demo, plans it without being asked and shows the whole tree', { timeout: 150_000 }, async () => {
    await page.goto(w.entryUrl);
    await expect.poll(() => page.locator('[data-testid=file-state]').textContent()).toContain('Field transmitter');
    // The run is followed by the window: progress first, then the tree, with no click on Plan.
    await page.waitForSelector('[data-testid=tree-svg]', { timeout: 140_000 });
    expect(await page.locator('[data-viewtab=tree][aria-current=page]').count()).toBe(1);
    expect(await page.locator('[data-kind=stage]').count()).toBeGreaterThan(0);
    await page.waitForTimeout(200);
    expect(await outside()).toBe(0);
    expect(await page.locator('[data-testid=plan-state]').textContent()).toMatch(/plan up to date/);
    await w.shot('first-run-planned');
  });

  it('the inspector takes room only while something is inspected', async () => {
    expect(await page.locator('[data-testid=inspector]').count()).toBe(0);
    const wide = await page.locator('.canvas').evaluate((e) => e.clientWidth);
    await page.locator('[data-kind=stage]').first().click();
    await expect.poll(() => page.locator('[data-testid=inspector]').count()).toBe(1);
    const narrow = await page.locator('.canvas').evaluate((e) => e.clientWidth);
    expect(wide - narrow).toBeGreaterThan(300);
    await w.shot('inspector-open');
    await page.click('[data-testid=inspector-close]');
    expect(await page.locator('[data-testid=inspector]').count()).toBe(0);
    await page.locator('[data-kind=stage]').first().click();
    await page.locator('.canvas').focus();
    await page.keyboard.press('Escape');
    await expect.poll(() => page.locator('[data-testid=inspector]').count()).toBe(0);
  });

  it('fits the tree again after planning again, even when zoomed in and panned away', { timeout: 150_000 }, async () => {
    for (let i = 0; i < 6; i++) await page.click('text=Zoom in');
    await page.locator('.canvas').focus();
    for (let i = 0; i < 8; i++) await page.keyboard.press('ArrowRight');
    expect(await outside()).toBeGreaterThan(0);
    await page.click('[data-testid=plan]');
    await page.waitForSelector('[data-testid=plan-progress]');
    // A window reloaded mid-plan follows the run it did not start.
    await page.reload();
    await page.waitForSelector('[data-testid=plan-progress]', { timeout: 10_000 });
    await page.waitForSelector('[data-testid=plan]', { timeout: 140_000 });
    await page.click('[data-viewtab=tree]');
    await page.waitForSelector('[data-testid=tree-svg]');
    await page.waitForTimeout(200);
    expect(await outside()).toBe(0);
    await w.shot('replanned-fitted');
  });
});
