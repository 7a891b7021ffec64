// Basic project work in the window: name and description, Save As that keeps a bad path for
// correction, and pasting a block of cells from a spreadsheet into the grids.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import type { Requirements } from '../../src-main/engine/model.ts';
import { chromiumCheck, startWindow, type WindowHarness } from '../helpers/e2e-window.ts';

const tool = chromiumCheck();

describe.skipIf(tool.skip)('project work in the window', () => {
  let w: WindowHarness;
  let page: Page;

  beforeAll(async () => {
    w = await startWindow({ firstRunPlan: false });
    page = w.page;
    await page.goto(w.entryUrl);
    await page.waitForSelector('[data-grid=loads] [data-row]');
  }, 60_000);
  afterAll(async () => { await w?.close(); });

  const requirements = async (): Promise<Requirements> => {
    const r = (await w.api('project.snapshot', {})).requirements;
    return { ...r, meta: { ...r.meta, revision: 0 } };
  };

  /** A paste as the browser delivers it from a spreadsheet's copy (text/plain, tab-separated). */
  async function pasteInto(grid: string, rowIndex: number, key: string, text: string) {
    await page.locator(`[data-grid=${grid}] [data-row]`).nth(rowIndex).locator(`[data-key="${key}"]`).click();
    await page.evaluate(({ grid, text }) => {
      const dt = new DataTransfer();
      dt.setData('text/plain', text);
      document.querySelector(`[data-grid="${grid}"]`)!.dispatchEvent(new ClipboardEvent('paste', { clipboardData: dt, bubbles: true, cancelable: true }));
    }, { grid, text });
    await page.waitForFunction(() => !document.querySelector('[data-grid][data-pending]'));
  }

  it('names and describes the project; an empty name is refused and changes nothing', async () => {
    const name = page.locator('[data-testid=project-name]');
    await name.fill('Pump controller rev B');
    await page.keyboard.press('Enter');
    await expect.poll(() => page.locator('[data-testid=file-state] .pname').textContent()).toBe('Pump controller rev B');
    expect((await requirements()).meta.name).toBe('Pump controller rev B');
    await name.fill('   ');
    await page.keyboard.press('Enter');
    await expect.poll(() => page.locator('[data-testid=project-meta-error]').textContent()).toMatch(/name/);
    expect((await requirements()).meta.name).toBe('Pump controller rev B');
    await page.keyboard.press('Escape');
    expect(await name.inputValue()).toBe('Pump controller rev B');
    const desc = page.locator('[data-testid=project-description]');
    await desc.fill('Invented test project: a pump controller.');
    await page.locator('[data-grid=loads] [data-row]').first().locator('[data-key=name]').click();
    await expect.poll(async () => (await requirements()).meta.description).toBe('Invented test project: a pump controller.');
    await page.locator('[data-testid=project-meta]').scrollIntoViewIfNeeded();
    await w.shot('project-name-description');
  });

  it('Save As keeps the dialog open with the typed path and the reason when the path is bad', async () => {
    await page.click('text=Save as…');
    const input = page.locator('[data-testid=prompt] input');
    await input.fill('/proc/nowhere/pump.rwproj');
    await page.click('[data-testid=prompt-ok]');
    await expect.poll(() => page.locator('[data-testid=prompt-error]').count()).toBe(1);
    expect(await page.locator('[data-testid=prompt]').count()).toBe(1);
    expect(await input.inputValue()).toBe('/proc/nowhere/pump.rwproj');
    expect(await page.locator('[data-testid=prompt-error]').textContent()).toMatch(/path/);
    await w.shot('save-as-bad-path');
    const good = join(w.tmp, 'pump.rwproj');
    await input.fill(good);
    await page.click('[data-testid=prompt-ok]');
    await expect.poll(() => page.locator('[data-testid=prompt]').count()).toBe(0);
    await expect.poll(() => page.locator('[data-testid=file-state]').textContent()).toContain('pump.rwproj');
    expect(existsSync(good)).toBe(true);
  });

  it('pastes a block of cells from a spreadsheet in one undoable step', async () => {
    const before = await requirements();
    await pasteInto('loads', 0, 'name', 'Pump driver\tMain\t5V\nValve coil\tMain\t24\n');
    const after = await requirements();
    expect(after.loads[0]!.name).toBe('Pump driver');
    expect(after.loads[0]!.voltage).toBe(5);
    expect(after.loads[1]!.name).toBe('Valve coil');
    expect(after.loads[1]!.voltage).toBe(24);
    expect(after.loads.slice(2)).toEqual(before.loads.slice(2));
    expect(await page.locator('[data-grid=loads] [data-row]').first().locator('[data-key=name]').textContent()).toBe('Pump driver');
    await page.click('[data-testid=undo]');
    await expect.poll(requirements).toEqual(before);
  });

  it('a block running past the last row adds the rows it needs', async () => {
    const before = await requirements();
    const n = before.loads.length;
    await pasteInto('loads', n - 1, 'name', 'Sensor A\nSensor B\nSensor C');
    const after = await requirements();
    expect(after.loads.length).toBe(n + 2);
    expect(after.loads.slice(-3).map((l) => l.name)).toEqual(['Sensor A', 'Sensor B', 'Sensor C']);
    await page.click('[data-testid=undo]');
    await expect.poll(requirements).toEqual(before);
  });

  it('a block with bad cells is refused whole, every bad cell named by row and column', async () => {
    const before = await requirements();
    await pasteInto('loads', 0, 'name', 'Ok name\tMain\t5V\nSecond\tMain\t9 furlongs\nThird\tNowhere\t3V3');
    const msg = page.locator('[data-testid=paste-error]');
    await expect.poll(() => msg.count()).toBe(1);
    const text = (await msg.textContent()) ?? '';
    expect(text).toMatch(/2 bad cells/);
    expect(text).toMatch(/row 2, column "Voltage"/);
    expect(text).toMatch(/row 3, column "Domain"/);
    expect(await requirements()).toEqual(before);
    await msg.scrollIntoViewIfNeeded();
    await w.shot('paste-refused');
    // Too wide for the columns to the right of the selection: refused, nothing changes.
    const keys = await page.locator('[data-grid=loads] [data-row]').first().locator('[data-key]').evaluateAll((els) => els.map((e) => e.getAttribute('data-key')!));
    await pasteInto('loads', 0, keys.at(-1)!, 'a\tb\tc');
    await expect.poll(() => msg.textContent()).toMatch(/3 columns wide/);
    expect(await requirements()).toEqual(before);
  });
});
