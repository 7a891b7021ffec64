// Engineering wording where a user reads: design values in words with units, loss terms and
// BOM groups in words, undo titles in words, costs that never read 0.00, full column
// headers, derating, no "0 V" working voltage on a non-isolated domain, winding polarity as
// a mark, and a load the sources cannot feed flagged before planning.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { chromiumCheck, startWindow, type WindowHarness } from '../helpers/e2e-window.ts';
import { bomGroupName, isNamedLoss, lossName } from '../../src-renderer/lib/words.ts';

const tool = chromiumCheck();

describe.skipIf(tool.skip)('engineering wording in the window', () => {
  let w: WindowHarness;
  let page: Page;

  beforeAll(async () => {
    w = await startWindow();
    page = w.page;
    await page.goto(w.entryUrl);
    // First run plans the demo; wait for its tree.
    await page.waitForSelector('[data-testid=tree-svg]', { timeout: 140_000 });
  }, 150_000);
  afterAll(async () => { await w?.close(); });

  it('the inspector names design values and loss terms in words, with units', async () => {
    const stages = page.locator('[data-kind=stage]');
    const n = await stages.count();
    let lossRows = 0;
    for (let i = 0; i < n; i++) {
      await stages.nth(i).click({ force: true });
      await page.waitForSelector('[data-testid=inspector-title]');
      const design = await page.locator('[data-testid=inspector] table.kv td:first-child').allTextContents();
      expect(design.length).toBeGreaterThan(3);
      for (const label of design) expect(label, label).not.toMatch(/[[\]]|[a-z][A-Z]|\w\.\w/);
      const values = await page.locator('[data-testid=inspector] table.kv td.n').allTextContents();
      // No bare SI numbers of five digits or more (a frequency in hertz, a resistance in ohms).
      const labelsOf = await page.locator("[data-testid=inspector] table.kv tr").allTextContents();
      for (const v of values) expect(v, `${v} in ${labelsOf.filter((t) => t.includes(v)).join(" | ")}`).not.toMatch(/^\d{5,}$/);
      const keys = await page.locator('[data-testid=inspector] [data-loss]').evaluateAll((els) => els.map((e) => [e.getAttribute('data-loss')!, e.querySelector('td')!.textContent!]));
      for (const [key, shown] of keys) {
        // Every term the engine reports is in the dictionary (not the split-words fallback).
        expect(isNamedLoss(key!), key).toBe(true);
        expect(shown).toContain(lossName(key!));
        lossRows++;
      }
      const turns = await page.locator('[data-testid=inspector] dd').allTextContents();
      for (const t of turns) expect(t).not.toMatch(/[−-]\d+ turns/);
    }
    expect(lossRows).toBeGreaterThan(0);
    await page.locator('[data-testid=inspector] h3', { hasText: 'Design values' }).scrollIntoViewIfNeeded();
    await w.shot('wording-design-values');
    // Edge labels mark a reversed winding in words, not with a minus sign.
    for (const t of await page.locator('.edge-label').allTextContents()) expect(t).not.toMatch(/[−-]\d+ T/);
  });

  it('the BOM names groups in words and never shows a non-zero cost as 0.00', async () => {
    await page.click('[data-viewtab=parts]');
    await page.waitForSelector('[data-testid=bom]');
    const groups = await page.locator('[data-testid=bom] tr.grp').evaluateAll((els) => els.map((e) => [e.getAttribute('data-group')!, e.textContent!]));
    expect(groups.length).toBeGreaterThan(2);
    for (const [key, shown] of groups) {
      expect(shown).toBe(bomGroupName(key!));
      expect(shown).not.toMatch(/^[a-z]+-[a-z]+$/);
    }
    const bom = (await w.api('project.snapshot', {})).plan!.bom!;
    const cells = await page.locator('[data-testid=bom] tbody tr:not(.grp):not(.total)').evaluateAll((rows) => rows.map((r) => [...r.querySelectorAll('td')].map((td) => td.textContent!.trim())));
    expect(cells.length).toBe(bom.lines.length);
    bom.lines.forEach((l, i) => {
      if (l.unitCost > 0) expect(cells[i]![4], `${l.role} ${l.unitCost}`).not.toBe('0.00');
    });
    await w.shot('wording-bom');
  });

  it('the part library shows engineering notation with units and takes it back as typed', async () => {
    await page.selectOption('[data-testid=library-class]', 'controller');
    const texts = await page.locator('[data-grid=library] [role=gridcell]').allTextContents();
    expect(texts.length).toBeGreaterThan(10);
    for (const t of texts) expect(t, t).not.toMatch(/\de-\d/);
    expect(texts.some((t) => / ns$/.test(t))).toBe(true);
    const headers = (await page.locator('[data-grid=library] [role=columnheader]').allTextContents()).join(' | ');
    expect(headers).not.toMatch(/tonMin|rdsHs/);
    const cell = page.locator('[data-grid=library] [data-row]').first().locator('[data-key="params.tonMin"]');
    await cell.click();
    await page.keyboard.press('Enter');
    await page.keyboard.press('Control+A');
    await page.keyboard.type('95 ns');
    await page.keyboard.press('Enter');
    await expect.poll(() => cell.textContent()).toBe('95 ns');
    await page.locator('[data-grid=library]').scrollIntoViewIfNeeded();
    await w.shot('wording-library');
    await page.click('[data-testid=undo]');
  });

  it('requirement grids show full headers, derating, the time unit and no working voltage on a non-isolated domain', async () => {
    await page.click('[data-viewtab=requirements]');
    await page.waitForSelector('[data-grid=loads]');
    const clipped = await page.locator('[data-grid] [role=columnheader]').evaluateAll((els) => els.filter((e) => e.scrollWidth > e.clientWidth + 1 || e.scrollHeight > e.clientHeight + 1).map((e) => e.textContent));
    expect(clipped).toEqual([]);
    const limits = (await page.locator('[data-grid=limits] [role=columnheader]').allTextContents()).join(' | ');
    expect(limits).toMatch(/Ceramic capacitor voltage derating/);
    expect(limits).toMatch(/Power derating/);
    expect(limits).not.toMatch(/V use|Power use/);
    expect((await page.locator('[data-grid=preferences] [role=columnheader]').allTextContents()).join(' | ')).toMatch(/Time budget \(ms\)/);
    const req = (await w.api('project.snapshot', {})).requirements;
    const plain = req.domains.find((d) => d.isolation === 'none')!;
    expect(await page.locator(`[data-grid=domains] [data-row="${plain.id}"] [data-key=workingVoltage]`).textContent()).not.toMatch(/^0 V$/);
    // The sticky summary no longer covers the grids below it when scrolled.
    expect(await page.locator('[data-testid=summary]').evaluate((e) => getComputedStyle(e).position)).not.toBe('sticky');
    await w.shot('wording-requirements');
  });

  it('undo titles speak words, and a load the source cannot feed is a problem before planning', async () => {
    const req = (await w.api('project.snapshot', {})).requirements;
    const mode = req.modes[0]!;
    const relay = req.loads.find((l) => Math.abs(l.voltage - 12) < 1e-9)!;
    const src = req.sources[0]!;
    const cell = (grid: string, row: string, key: string) => page.locator(`[data-grid=${grid}] [data-row="${row}"] [data-key="${key}"]`);
    for (const [grid, row, key, text] of [['sources', src.id, 'currentLimit', '3'], ['loads', relay.id, `current:${mode.id}`, '5']] as const) {
      await cell(grid, row, key).click();
      await page.keyboard.press('Enter');
      await page.keyboard.press('Control+A');
      await page.keyboard.type(text);
      await page.keyboard.press('Enter');
      await page.waitForFunction(() => !document.querySelector('[data-grid][data-pending]'));
    }
    const title = await page.locator('[data-testid=undo]').getAttribute('title');
    expect(title).toBe(`Undo: Edit loads › ${relay.name} › current in ${mode.name}`);
    await expect.poll(() => page.locator('[data-testid=problems]').textContent()).toMatch(new RegExp(`mode "${mode.name}": the loads take .* more than the sources can give`));
    await page.locator('[data-testid=problems]').scrollIntoViewIfNeeded();
    await w.shot('wording-capacity-problem');
    await page.click('[data-testid=plan]');
    await expect.poll(() => page.locator('[data-testid=status]').textContent()).toMatch(/cannot plan yet: modes\[0\]/);
  });
});
