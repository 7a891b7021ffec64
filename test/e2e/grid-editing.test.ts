// The requirement grids edit like a spreadsheet and never write into a cell the user did not
// type into. Real window in Chromium through the local web host; the requirements are read
// back through the contract before and after each gesture sequence.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import type { Requirements } from '../../src-main/engine/model.ts';
import { chromiumCheck, startWindow, type WindowHarness } from '../helpers/e2e-window.ts';

const tool = chromiumCheck();

/** mulberry32: a small seeded generator so a failing sequence can be replayed by its seed. */
function rng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

describe.skipIf(tool.skip)('grid editing in the window', () => {
  let w: WindowHarness;
  let page: Page;

  beforeAll(async () => {
    w = await startWindow({ firstRunPlan: false });
    page = w.page;
    await page.goto(w.entryUrl);
    await page.waitForSelector('[data-grid=loads] [data-row]');
  }, 60_000);
  afterAll(async () => { await w?.close(); });

  /** The requirements without the edit counter (an accepted same-value commit still counts). */
  const requirements = async (): Promise<Requirements> => {
    const r = (await w.api('project.snapshot', {})).requirements;
    return { ...r, meta: { ...r.meta, revision: 0 } };
  };
  const loads = () => page.locator('[data-grid=loads]');
  const cell = (row: number, key: string) => loads().locator(`[data-row]`).nth(row).locator(`[data-key="${key}"]`);
  const selected = async () => {
    const el = loads().locator('[aria-selected=true]');
    return { r: Number(await el.getAttribute('data-r')), key: await el.getAttribute('data-key') };
  };
  const editors = () => page.locator('[data-grid] [role=gridcell] input');
  const settled = () => page.waitForFunction(() => !document.querySelector('[data-grid][data-pending]'));
  const focusInGrid = (grid: string) => page.evaluate((g) => !!document.activeElement?.closest(`[data-grid="${g}"]`), grid);

  it('Enter on an unchanged cell opens no editor below, Escape leaves nothing open, and a click elsewhere changes nothing', async () => {
    const before = await requirements();
    // The gesture sequence of the report: double-click, Enter without a change, Escape, click another cell.
    await cell(0, 'rippleLimit').dblclick();
    expect(await editors().count()).toBe(1);
    await page.keyboard.press('Enter');
    expect(await editors().count()).toBe(0);
    expect(await selected()).toEqual({ r: 1, key: 'rippleLimit' });
    await page.keyboard.press('Escape');
    expect(await editors().count()).toBe(0);
    await cell(3, 'name').click();
    await settled();
    expect(await editors().count()).toBe(0);
    expect(await requirements()).toEqual(before);
    expect((await w.api('project.snapshot', {})).state.canUndo).toBe(false);
  });

  it('Enter commits a typed value into the cell it was typed in and moves down without opening an editor', async () => {
    const before = await requirements();
    const id0 = before.loads[0]!.id;
    const id1 = before.loads[1]!.id;
    await cell(0, 'rippleLimit').dblclick();
    await page.keyboard.press('Control+A');
    await page.keyboard.type('77m');
    await page.keyboard.press('Enter');
    // The edit is committed through the handlers; the editor stays on its own cell (read-only)
    // until they accept it, so it is gone once the grid has settled, and none opened below.
    await settled();
    expect(await editors().count()).toBe(0);
    const after = await requirements();
    expect(after.loads.find((l) => l.id === id0)!.rippleLimit).toBeCloseTo(0.077, 9);
    expect(after.loads.find((l) => l.id === id1)).toEqual(before.loads.find((l) => l.id === id1));
    expect(await selected()).toEqual({ r: 1, key: 'rippleLimit' });
    // Typing straight away after Enter edits the row below, not the one just committed.
    await page.keyboard.type('66m');
    await page.keyboard.press('Escape');
    expect(await editors().count()).toBe(0);
    await settled();
    expect(await requirements()).toEqual(after);
    await w.api('requirements.undo', {});
    expect(await requirements()).toEqual(before);
  });

  it('Tab moves one cell from an unchanged editor, and Tab / Shift+Tab leave the grid at its ends', async () => {
    const before = await requirements();
    const keys = await loads().locator('[data-row]').first().locator('[data-key]').evaluateAll((els) => els.map((e) => e.getAttribute('data-key')!));
    const at = keys.indexOf('voltage');
    await cell(0, 'voltage').dblclick();
    await page.keyboard.press('Tab');
    expect(await editors().count()).toBe(0);
    expect(await selected()).toEqual({ r: 0, key: keys[at + 1] });
    await page.keyboard.press('Tab');
    expect(await selected()).toEqual({ r: 0, key: keys[at + 2] });
    await page.keyboard.press('Shift+Tab');
    expect(await selected()).toEqual({ r: 0, key: keys[at + 1] });
    // Shift+Tab from the first cell hands the focus to what comes before the grid.
    await cell(0, 'name').click();
    await page.keyboard.press('Shift+Tab');
    expect(await focusInGrid('loads')).toBe(false);
    // Tab from the last cell (with an editor open and unchanged) leaves it forwards.
    const n = await loads().locator('[data-row]').count();
    const last = loads().locator('[data-row]').nth(n - 1).locator('[data-key]').last();
    await last.dblclick();
    await page.keyboard.press('Tab');
    expect(await focusInGrid('loads')).toBe(false);
    expect(await editors().count()).toBe(0);
    expect(await page.evaluate(() => document.activeElement?.textContent)).toMatch(/Add load/);
    expect(await requirements()).toEqual(before);
  });

  it('Insert adds a row and selects it; Ctrl+Delete removes the selected row', async () => {
    const before = await requirements();
    await cell(0, 'name').click();
    await page.keyboard.press('Insert');
    await expect.poll(async () => (await requirements()).loads.length).toBe(before.loads.length + 1);
    const added = (await requirements()).loads.at(-1)!;
    await expect.poll(() => loads().locator('[aria-selected=true]').evaluate((el) => el.closest('[data-row]')?.getAttribute('data-row'))).toBe(added.id);
    expect(await focusInGrid('loads')).toBe(true);
    await w.shot('grid-row-added');
    await page.keyboard.press('Control+Delete');
    await expect.poll(async () => (await requirements()).loads.length).toBe(before.loads.length);
    expect(await requirements()).toEqual(before);
  });

  it('random gesture sequences over the loads grid never change a cell the user did not type into', { timeout: 300_000 }, async () => {
    const before = await requirements();
    const rowCount = await loads().locator('[data-row]').count();
    const keys = await loads().locator('[data-row]').first().locator('[data-key]').evaluateAll((els) => els.map((e) => e.getAttribute('data-key')!));
    // Columns whose text can be retyped in another spelling of the same value (no space).
    const retypable = (k: string) => k === 'voltage' || k === 'tolerance' || k === 'rippleLimit' || k.startsWith('current:');
    const log: string[] = [];
    for (let seq = 0; seq < 30; seq++) {
      const rand = rng(1000 + seq);
      const pick = <T,>(xs: T[]): T => xs[Math.floor(rand() * xs.length)]!;
      log.length = 0;
      for (let g = 0; g < 15; g++) {
        const gesture = pick(['dblclick', 'dblclick', 'click', 'Enter', 'Enter', 'Escape', 'Tab', 'Shift+Tab', 'retype']);
        if (gesture === 'click' || gesture === 'dblclick') {
          const row = Math.floor(rand() * rowCount);
          const key = pick(keys);
          log.push(`${gesture} ${row}/${key}`);
          const target = cell(row, key);
          if (gesture === 'click') await target.click();
          else await target.dblclick();
        } else if (gesture === 'retype') {
          // Retype the open editor's own value without its space ("200 mV" → "200mV"): a commit
          // that must land on the editor's cell and leave every value as it was.
          const ed = page.locator('[data-grid=loads] [role=gridcell] input');
          if ((await ed.count()) !== 1) { log.push('retype (no editor)'); continue; }
          const key = await ed.evaluate((el) => el.closest('[data-key]')!.getAttribute('data-key')!);
          const value = await ed.inputValue();
          if (!retypable(key) || !/\s/.test(value)) { log.push(`retype skipped ${key}`); continue; }
          log.push(`retype ${key} ${value}`);
          await page.keyboard.press('Control+A');
          await page.keyboard.type(value.replace(/\s+/g, ''));
        } else {
          log.push(gesture);
          await page.keyboard.press(gesture);
        }
      }
      // Close whatever is open without committing, then compare every value.
      await settled();
      if (await editors().count()) {
        await editors().first().focus();
        await page.keyboard.press('Escape');
      }
      await settled();
      const now = await requirements();
      expect(now, `seed ${1000 + seq}: ${log.join(', ')}`).toEqual(before);
      expect(await page.locator('[data-grid=loads] [data-testid=cell-error], [data-table=loads] [data-testid=cell-error]').count(), `seed ${1000 + seq}: ${log.join(', ')}`).toBe(0);
    }
    await w.shot('grid-after-random-gestures');
  });
});
