// What the window says about a plan is true: a cancelled plan never reads as "no feasible
// tree" or "plan up to date", and reasons from before an undo are marked as such.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { chromiumCheck, startWindow, type WindowHarness } from '../helpers/e2e-window.ts';

const tool = chromiumCheck();

describe.skipIf(tool.skip)('plan state in the window', () => {
  let w: WindowHarness;
  let page: Page;

  beforeAll(async () => {
    w = await startWindow({ firstRunPlan: false });
    page = w.page;
    await page.goto(w.entryUrl);
    await page.waitForSelector('[data-testid=plan]', { timeout: 120_000 });
  }, 150_000);
  afterAll(async () => { await w?.close(); });

  const status = () => page.locator('[data-testid=status]');

  async function typeInCell(grid: string, row: string, key: string, text: string) {
    await page.locator(`[data-grid=${grid}] [data-row="${row}"] [data-key="${key}"]`).click();
    await page.keyboard.press('Enter');
    await page.keyboard.press('Control+A');
    await page.keyboard.type(text);
    await page.keyboard.press('Enter');
    await page.waitForFunction(() => !document.querySelector('[data-grid][data-pending]'));
  }

  it('Cancel right after Plan says "Planning cancelled" or shows the best tree so far, never "No feasible tree" or "plan up to date"', { timeout: 120_000 }, async () => {
    await page.click('[data-viewtab=requirements]');
    await typeInCell('preferences', 'project', 'budgetMs', '60000');
    await page.click('[data-testid=plan]');
    await page.waitForSelector('[data-testid=plan-progress]');
    // Far enough into the search for a best-so-far to exist (or not: both must read true).
    await page.waitForTimeout(2500);
    await page.click('[data-testid=plan-cancel]');
    await page.waitForSelector('[data-testid=plan]', { timeout: 30_000 });
    await expect.poll(() => status().textContent()).toMatch(/Planning cancelled/);
    const line = (await status().textContent()) ?? '';
    expect(line).not.toMatch(/plan up to date/);
    expect(line).not.toMatch(/No feasible tree/i);
    await page.click('[data-viewtab=tree]');
    const tree = (await page.locator('[data-view=tree]').textContent()) ?? '';
    expect(tree).not.toMatch(/No feasible tree/i);
    // Either the best tree so far, marked cancelled, or no tree and the plain "no tree yet".
    if (await page.locator('[data-testid=tree-svg]').count()) {
      expect(await page.locator('[data-testid=plan-cancelled]').count()).toBe(1);
      expect(line).toMatch(/best tree found so far/);
    }
    await w.shot('plan-cancelled');
  });

  it('progress speaks in the planner counts: candidate designs first, then branches and the best score', { timeout: 120_000 }, async () => {
    await page.click('[data-viewtab=requirements]');
    await typeInCell('preferences', 'project', 'budgetMs', '8000');
    await page.click('[data-testid=plan]');
    await page.waitForSelector('[data-testid=plan-progress]');
    const seen: string[] = [];
    while (await page.locator('[data-testid=plan-progress-text]').count()) {
      const t = (await page.locator('[data-testid=plan-progress-text]').textContent().catch(() => null)) ?? '';
      if (t && seen.at(-1) !== t) seen.push(t);
      if (seen.length === 3) await w.shot('plan-progress');
      await page.waitForTimeout(150);
    }
    const counts = seen.map((t) => /(\d+) designed/.exec(t)?.[1]).filter(Boolean).map(Number);
    // The count grows while the planner designs candidates (the old bar said "0 explored" here).
    expect(counts.length, seen.join(' | ')).toBeGreaterThan(1);
    expect(Math.max(...counts)).toBeGreaterThan(0);
    expect(seen.some((t) => /branches explored/.test(t)), seen.join(' | ')).toBe(true);
    expect(seen.every((t) => !/^.*· 0 explored$/.test(t))).toBe(true);
  });

  it('after undoing the edit that made planning infeasible, the old reasons are marked as from before', { timeout: 120_000 }, async () => {
    await page.click('[data-viewtab=requirements]');
    await typeInCell('preferences', 'project', 'budgetMs', '2000');
    const load = await page.locator('[data-grid=loads] [data-row]').first().getAttribute('data-row');
    await typeInCell('loads', load!, 'tolerance', '±0.01%');
    await page.click('[data-testid=plan]');
    await page.waitForSelector('[data-testid=plan]', { timeout: 60_000 });
    await page.click('[data-viewtab=tree]');
    await expect.poll(() => page.locator('[data-testid=tree-empty]').textContent()).toMatch(/No feasible tree/);
    expect(await page.locator('[data-testid=stale-reasons]').count()).toBe(0);
    expect(await status().locator('[data-testid=plan-state]').textContent()).toMatch(/no feasible tree/);
    await w.shot('plan-infeasible');
    await page.click('[data-testid=undo]');
    await expect.poll(() => page.locator('[data-testid=stale-reasons]').count()).toBe(1);
    expect(await page.locator('[data-testid=tree-stale]').count()).toBe(1);
    expect(await status().locator('[data-testid=plan-state]').textContent()).toMatch(/before the latest edits/);
    await w.shot('plan-infeasible-after-undo');
  });
});
