// Load-list import in the window (real Chromium over the web host): a CSV chosen with the
// browser's file picker, columns mapped, a preview with a bad-cell report, the bad cell fixed
// in place, applied in one undoable step, the loads grid showing the new rows; an XLSX
// workbook; a JSON project and a .rwproj file through the picker.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import ExcelJS from 'exceljs';
import type { Page } from 'playwright-core';
import { chromiumCheck, startWindow, type WindowHarness } from '../helpers/e2e-window.ts';

const tool = chromiumCheck();

describe.skipIf(tool.skip)('load-list import in the window', () => {
  let w: WindowHarness;
  let page: Page;

  beforeAll(async () => {
    w = await startWindow({ firstRunPlan: false });
    page = w.page;
    await page.goto(w.entryUrl);
    await page.waitForSelector('[data-grid=loads] [data-row]');
  }, 60_000);
  afterAll(async () => { await w?.close(); });

  async function pick(trigger: string, file: string) {
    const chooser = page.waitForEvent('filechooser');
    await page.click(trigger);
    await (await chooser).setFiles(file);
  }

  it('imports a CSV through the picker: mapping, preview, bad-cell report, fix, apply', async () => {
    const snap = await w.api('project.snapshot', {});
    const before = snap.requirements.loads.length;
    const dom = snap.requirements.domains[0]!.name;
    const mode = snap.requirements.modes[0]!;
    // Invented load list; "Notes" is left out; row 3 has a voltage typed as a current.
    const csv = join(w.tmp, 'loads.csv');
    writeFileSync(csv, [
      `Load,Domain,Voltage (V),${mode.name} current (mA),Notes`,
      `Display backlight,${dom},5,180,"dimmable, PWM"`,
      `Level sensor,${dom},3.3 A,12,`,
      `Relay coil,${dom},12,"45"," ""K3"" "`,
    ].join('\r\n'));
    await page.click('[data-testid=import-loads-open]');
    await pick('[data-testid=import-choose]', csv);
    await page.waitForSelector('[data-testid=import-preview]');
    // The guessed mapping: header units detected, the notes column left out.
    expect(await page.locator('[data-testid=map-A]').inputValue()).toBe('name');
    expect(await page.locator('[data-testid=map-C]').inputValue()).toBe('voltage');
    expect(await page.locator('[data-testid=map-D]').inputValue()).toBe(`current:${mode.id}`);
    expect(await page.locator('[data-testid=map-E]').inputValue()).toBe('');
    expect(await page.locator('[data-testid=import-mapping]').textContent()).toContain('unit mA');
    // Map the notes column as the rail key and back: the preview follows the mapping.
    await page.selectOption('[data-testid=map-E]', 'railKey');
    await expect.poll(() => page.locator('[data-testid=import-preview] thead').textContent()).toContain('Rail key');
    await page.selectOption('[data-testid=map-E]', '');
    await expect.poll(() => page.locator('[data-testid=import-preview] thead').textContent()).not.toContain('Rail key');
    // The bad cell is reported by row and column, and Import is refused until it is fixed.
    const bad = page.locator('[data-testid=import-bad]');
    await expect.poll(() => bad.textContent()).toMatch(/1 bad cell/);
    expect(await bad.locator('li').first().textContent()).toMatch(/^row 3, column C \("Voltage \(V\)"\): .*3\.3 A.*not a voltage/);
    expect(await page.locator('[data-testid=import-apply]').isDisabled()).toBe(true);
    expect(await page.locator('[data-testid=import-good-only]').textContent()).toContain('2 good rows');
    expect((await w.api('project.snapshot', {})).requirements.loads.length).toBe(before);
    await w.shot('import-loads-bad-cell');
    // Fix the cell in place.
    await page.locator('[data-fix="3C"]').fill('3V3');
    await page.locator('[data-fix="3C"]').press('Enter');
    await expect.poll(() => page.locator('[data-testid=import-bad]').count()).toBe(0);
    expect(await page.locator('[data-import-row="3"]').textContent()).toContain('3.3 V');
    expect(await page.locator('[data-import-row="2"]').textContent()).toContain('180 mA');
    await w.shot('import-loads-fixed');
    await page.click('[data-testid=import-apply]');
    await expect.poll(() => page.locator('[data-testid=import-loads]').count()).toBe(0);
    const after = await w.api('project.snapshot', {});
    expect(after.requirements.loads.length).toBe(before + 3);
    expect(after.state.undoLabel).toBe('Import 3 loads');
    const rows = page.locator('[data-grid=loads] [data-row]');
    await expect.poll(() => rows.count()).toBe(before + 3);
    const last = rows.nth(before + 2);
    expect(await last.locator('[data-key=name]').textContent()).toBe('Relay coil');
    expect(await last.locator('[data-key=voltage]').textContent()).toBe('12 V');
    expect(await last.locator(`[data-key="current:${mode.id}"]`).textContent()).toBe('45 mA');
    expect(await page.locator('[data-testid=status]').textContent()).toContain('Imported 3 loads');
    await rows.nth(before).scrollIntoViewIfNeeded();
    await w.shot('import-loads-grid');
    // One undo step takes the whole import back.
    await page.click('[data-testid=undo]');
    await expect.poll(() => rows.count()).toBe(before);
  });

  it('imports an XLSX workbook from its second sheet', async () => {
    const wb = new ExcelJS.Workbook();
    wb.addWorksheet('Cover').addRow(['Invented load list for the test']);
    const ws = wb.addWorksheet('Loads');
    ws.addRow(['Name', 'Voltage', 'Current (mA)', 'Tolerance (%)']);
    ws.addRow(['Motor driver logic', 5, 40, 5]);
    ws.addRow(['Encoder', '3V3', 15, 3]);
    const file = join(w.tmp, 'loads.xlsx');
    await wb.xlsx.writeFile(file);
    const before = (await w.api('project.snapshot', {})).requirements.loads.length;
    await page.click('[data-testid=import-loads-open]');
    await pick('[data-testid=import-choose]', file);
    await page.waitForSelector('[data-testid=import-sheet]');
    await page.selectOption('[data-testid=import-sheet]', 'Loads');
    await expect.poll(() => page.locator('[data-testid=import-preview] tbody tr').count()).toBe(2);
    expect(await page.locator('[data-testid=import-bad]').count()).toBe(0);
    await w.shot('import-loads-xlsx');
    await page.click('[data-testid=import-apply]');
    await expect.poll(async () => (await w.api('project.snapshot', {})).requirements.loads.length).toBe(before + 2);
    const enc = (await w.api('project.snapshot', {})).requirements.loads.find((l) => l.name === 'Encoder')!;
    expect(enc.voltage).toBe(3.3);
    expect(enc.tolerance).toBeCloseTo(0.03, 12);
  });

  it('opens a project JSON file and a .rwproj file through the picker', async () => {
    const { demoDocument } = await import('../../src-main/store/demo.ts');
    const { exportProjectJson } = await import('../../src-main/store/json-format.ts');
    const { ProjectStore } = await import('../../src-main/store/project-store.ts');
    const doc = demoDocument();
    doc.requirements.meta.name = 'Picked from JSON';
    const json = join(w.tmp, 'picked.json');
    writeFileSync(json, exportProjectJson(doc));
    const chooser = page.waitForEvent('filechooser');
    await page.click('text=Import JSON…');
    if (await page.locator('[data-testid=prompt] >> text=Discard changes').count()) await page.click('[data-testid=prompt-ok]');
    await (await chooser).setFiles(json);
    await expect.poll(() => page.locator('[data-testid=file-state]').textContent()).toContain('Picked from JSON');

    const doc2 = demoDocument();
    doc2.requirements.meta.name = 'Picked project file';
    const store = ProjectStore.fromDocument(doc2);
    const file = join(w.tmp, 'picked.rwproj');
    store.save(file);
    store.close();
    await page.click('text=Open…');
    if (await page.locator('[data-testid=prompt] >> text=Discard changes').count()) await page.click('[data-testid=prompt-ok]');
    const chooser2 = page.waitForEvent('filechooser');
    await page.click('[data-testid=prompt-alt]');
    await (await chooser2).setFiles(file);
    await expect.poll(() => page.locator('[data-testid=file-state]').textContent()).toContain('Picked project file');
    expect((await w.api('project.snapshot', {})).state.path).toBeNull();
  });
});
