// End-to-end: the real window (built Svelte bundle) in Debian's Chromium, driven through
// the local web host on a random port with a temporary user folder. Screenshots go to
// test-output/e2e/ for a person to look at.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { parse } from 'csv-parse/sync';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { chromium as chromiumTool } from '../helpers/tools.ts';

const ROOT = resolve(import.meta.dirname, '../..');
const RENDERER = join(ROOT, 'out', 'renderer');
const SHOTS = join(ROOT, 'test-output', 'e2e');
const tool = chromiumTool();

describe.skipIf(tool.skip)('window end to end (local web host + Chromium)', () => {
  let tmp: string;
  let stop: () => Promise<void>;
  let entryUrl: string;
  let context: BrowserContext;
  let page: Page;

  beforeAll(async () => {
    if (!existsSync(join(RENDERER, 'index.html'))) {
      const { build } = await import('vite');
      await build({ configFile: join(ROOT, 'vite.config.ts'), logLevel: 'warn' });
    }
    mkdirSync(SHOTS, { recursive: true });
    tmp = mkdtempSync(join(tmpdir(), 'rw-e2e-'));
    const { startWebMain } = await import('../../src-main/host/web-main.ts');
    const h = await startWebMain({ userDataDir: join(tmp, 'data'), rendererDir: RENDERER, autosaveMs: 0, allowedRoots: [tmp] });
    stop = h.stop;
    entryUrl = h.host.entryUrl;
    const { chromium } = await import('playwright-core');
    context = await chromium.launchPersistentContext(join(tmp, 'browser'), {
      executablePath: tool.path!,
      headless: true,
      acceptDownloads: true,
      viewport: { width: 1440, height: 900 },
      args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
    });
    page = context.pages()[0] ?? (await context.newPage());
    page.on('pageerror', (e) => { throw e; });
  });

  afterAll(async () => {
    await context?.close();
    await stop?.();
    if (tmp) rmSync(tmp, { recursive: true, force: true });
  });

  const shot = (name: string) => page.screenshot({ path: join(SHOTS, `${name}.png`) });
  const status = () => page.locator('[data-testid=status]');

  /** Select a grid cell and type into it as a user would (type, then Enter). */
  async function typeInCell(grid: string, row: string, key: string, text: string) {
    const cell = page.locator(`[data-grid=${grid}] [data-row="${row}"] [data-key="${key}"]`);
    await cell.click();
    await page.keyboard.press('Enter');
    await page.keyboard.press('Control+A');
    await page.keyboard.type(text);
    await page.keyboard.press('Enter');
    return cell;
  }

  it('opens the demo on first run, already planned', { timeout: 150_000 }, async () => {
    await page.goto(entryUrl);
    await expect.poll(() => page.locator('[data-testid=file-state]').textContent()).toContain('Field transmitter');
    // The host plans the demo at first run; the window follows and then shows the tree.
    await page.waitForSelector('[data-testid=tree-svg]', { timeout: 140_000 });
    await page.click('[data-viewtab=requirements]');
    // The token left the address bar once the page took it.
    expect(page.url()).not.toContain('token=');
    await expect.poll(() => page.locator('[data-testid=caution]').count()).toBe(1);
    await shot('01-demo-requirements');
  });

  it('refuses a bad value with a message naming the cell, and changes nothing', async () => {
    const src = await page.locator('[data-grid=sources] [data-row]').first().getAttribute('data-row');
    const before = await page.locator(`[data-grid=sources] [data-row="${src}"] [data-key=vMin]`).textContent();
    await typeInCell('sources', src!, 'vMin', '9 furlongs');
    const msg = page.locator('[data-grid=sources] ~ [data-testid=cell-error], [data-table=sources] [data-testid=cell-error]');
    await expect.poll(() => msg.textContent()).toMatch(/sources › .* › V min/);
    await shot('02-bad-value');
    await page.keyboard.press('Escape');
    expect(await page.locator(`[data-grid=sources] [data-row="${src}"] [data-key=vMin]`).textContent()).toBe(before);
    // Spreadsheet keys: Tab moves right, Shift+Tab back, arrows move without editing.
    await page.keyboard.press('Tab');
    expect(await page.locator('[data-grid=sources] [aria-selected=true]').getAttribute('data-key')).toBe('vMax');
    await page.keyboard.press('Shift+Tab');
    await page.keyboard.press('ArrowLeft');
    expect(await page.locator('[data-grid=sources] [aria-selected=true]').getAttribute('data-key')).toBe('vNom');
    // A user raises the minimum input so every rail can be made (the demo's 12 V rail needs headroom).
    await typeInCell('sources', src!, 'vMin', '16V');
    await expect.poll(() => page.locator(`[data-grid=sources] [data-row="${src}"] [data-key=vMin]`).textContent()).toBe('16 V');
    await expect.poll(() => page.locator('[data-testid=dirty]').count()).toBe(1);
    // The reference load's ±1 % cannot be met by any feed the planner knows; widen it as a
    // user following the planner's explanation would, and give the planner a budget short for a
    // user yet long enough for a tree when the suite loads both cores (8 s, as the cancel test).
    const ref = await page.locator('[data-grid=loads] [data-row]').filter({ has: page.locator('[data-key=voltage]', { hasText: /^4\.1 V$|^4\.096 V$|^4\.1$/ }) }).first().getAttribute('data-row');
    if (ref) await typeInCell('loads', ref, 'tolerance', '±2%');
    await typeInCell('preferences', 'project', 'budgetMs', '8000');
  });

  it('plans in the background and shows the tree', { timeout: 120_000 }, async () => {
    await page.click('[data-testid=plan]');
    await page.waitForSelector('[data-testid=plan-progress]');
    await page.waitForTimeout(700);
    await shot('03a-planning');
    // The window keeps answering while the worker plans.
    await page.click('[data-viewtab=help]');
    await page.click('[data-viewtab=tree]');
    // The first-run tree is already drawn: wait for this run to finish before looking.
    await page.waitForSelector('[data-testid=plan]', { timeout: 110_000 });
    await page.waitForSelector('[data-testid=tree-svg]', { timeout: 10_000 });
    expect(await page.locator('[data-kind=stage]').count()).toBeGreaterThan(0);
    expect(await page.locator('[data-kind=rail]').count()).toBeGreaterThan(3);
    await page.waitForTimeout(300);
    await shot('03-tree');
    // The figures on the drawing follow the chosen operating mode; the blocks stay put.
    const source = page.locator('[data-kind=source]').first();
    const modes = page.locator('[data-drawmode]');
    expect(await modes.count()).toBeGreaterThan(1);
    await modes.nth(0).click();
    const first = await source.textContent();
    const box = await source.locator('rect').getAttribute('x');
    await modes.nth(2).click();
    await expect.poll(() => source.textContent()).not.toBe(first);
    expect(await source.locator('rect').getAttribute('x')).toBe(box);
  });

  it('inspects a stage: numbers, window and reasons', async () => {
    await page.locator('[data-kind=stage]').first().click();
    await expect.poll(() => page.locator('[data-testid=inspector-title]').count()).toBe(1);
    const text = await page.locator('[data-testid=inspector]').textContent();
    expect(text).toMatch(/Loss/);
    expect(text).toMatch(/η/);
    await shot('04-inspector');
    // A stage that carries a barrier offers the leakage check; find one and use it.
    const stages = page.locator('[data-kind=stage]');
    for (let i = 0; i < (await stages.count()) && !(await page.locator('[data-testid=barrier-check]').count()); i++) {
      await stages.nth(i).click({ force: true });
    }
    expect(await page.locator('[data-testid=barrier-check]').count()).toBe(1);
    {
      const form = page.locator('[data-testid=barrier-check]');
      // Nothing is pre-filled until the user says what the working voltage (250 V) is.
      expect(await form.locator('[data-testid=barrier-vrms]').inputValue()).toBe('');
      await form.locator('[data-testid=working-voltage-form]').selectOption('peak');
      expect(await form.locator('[data-testid=barrier-vrms]').inputValue()).toBe('176.8 V');
      await form.locator('input').first().fill('2n2');
      await form.locator('button[type=submit]').click();
      // I = 2π·f·C·V rms: 2π · 50 Hz · 2.2 nF · 176.8 V = 122.2 µA (common practice).
      await expect.poll(() => form.textContent()).toMatch(/122 µA|122.2 µA/);
      await form.locator('[data-testid=working-voltage-form]').selectOption('rms');
      await form.locator('button[type=submit]').click();
      await expect.poll(() => form.textContent()).toMatch(/173 µA|172.8 µA/);
      await form.scrollIntoViewIfNeeded();
      await shot('04a-barrier-check');
      // The stage's own netlist downloads from the inspector (a SPICE deck ends with .end).
      const [dl] = await Promise.all([page.waitForEvent('download'), page.click('[data-testid=stage-netlist]')]);
      const deck = join(tmp, 'stage.cir');
      await dl.saveAs(deck);
      expect(readFileSync(deck, 'utf8')).toMatch(/^\.end\s*$/im);
      await page.locator('[data-testid=inspector] h3', { hasText: 'Design values' }).scrollIntoViewIfNeeded();
      await shot('04c-design-values');
    }
    await page.locator('[data-kind=rail]').first().click();
    await expect.poll(() => page.locator('[data-testid=window] svg').count()).toBeGreaterThan(0);
    expect(await page.locator('[data-testid=window]').first().textContent()).toMatch(/inside|OUTSIDE/);
    await shot('04b-rail-window');
  });

  it('edits a load current in engineering notation and the roll-up changes', async () => {
    await page.click('[data-viewtab=requirements]');
    const firstMode = await page.locator('[data-testid=summary] tbody tr').first().getAttribute('data-mode');
    const pin = page.locator(`[data-testid=summary] tr[data-mode="${firstMode}"] [data-testid=input-power]`);
    const before = await pin.textContent();
    expect(before).toMatch(/W$/);
    const load = await page.locator('[data-grid=loads] [data-row]').first().getAttribute('data-row');
    await typeInCell('loads', load!, `current:${firstMode}`, '450m');
    await expect.poll(() => page.locator(`[data-grid=loads] [data-row="${load}"] [data-key="current:${firstMode}"]`).textContent()).toBe('450 mA');
    await expect.poll(() => pin.textContent()).not.toBe(before);
    await shot('05-rollup-after-edit');
    // Undo brings the number back; redo applies it again.
    await page.click('[data-testid=undo]');
    await expect.poll(() => pin.textContent()).toBe(before);
    await page.click('[data-testid=redo]');
    await expect.poll(() => pin.textContent()).not.toBe(before);
  });

  it('switches to an alternative', async () => {
    await page.click('[data-viewtab=alternatives]');
    await page.waitForSelector('[data-testid=scatter]');
    const buttons = page.locator('[data-testid=choose-alt]');
    if ((await buttons.count()) > 0) {
      const shownBefore = await page.locator('.cmp th.sel').textContent();
      await buttons.first().click();
      await expect.poll(() => page.locator('.cmp th.sel').textContent()).not.toBe(shownBefore);
    } else {
      // One Pareto point only: the table says it is the one shown.
      expect(await page.locator('[data-testid=alternatives]').textContent()).toContain('shown');
    }
    await shot('06-alternatives');
    await page.click('[data-viewtab=budget]');
    await page.waitForSelector('[data-testid=thermal]');
    await shot('07-budget');
  });

  it('exports the BOM as CSV that an independent parser reads', async () => {
    await page.click('[data-viewtab=parts]');
    await page.waitForSelector('[data-testid=bom]');
    await shot('08-parts');
    const [download] = await Promise.all([page.waitForEvent('download'), page.click('[data-export=bom-csv]')]);
    const file = join(tmp, 'bom.csv');
    await download.saveAs(file);
    // csv-parse (npm) is the independent reader; RFC 4180 quoting.
    const rows = parse(readFileSync(file, 'utf8'), { relax_column_count: true }) as string[][];
    expect(rows.length).toBeGreaterThan(3);
    const shownTotal = Number((await page.locator('[data-testid=bom-total]').textContent())!.split(' ')[0]);
    // The file's extended costs add up to the total the window shows (to the cent).
    const header = rows[0]!.map((h) => h.toLowerCase());
    const ext = header.findIndex((h) => h.includes('extended'));
    expect(ext).toBeGreaterThanOrEqual(0);
    const lines = rows.slice(1).filter((r) => /^\d+$/.test(r[0] ?? ''));
    expect(lines.length).toBe(await page.locator('[data-testid=bom] tbody tr:not(.grp):not(.total)').count());
    const sum = lines.reduce((a, r) => a + Number(r[ext]), 0);
    expect(Math.abs(sum - shownTotal)).toBeLessThan(0.011);
    const total = rows.find((r) => r[0] === 'Total');
    expect(Math.abs(Number(total?.[ext]) - shownTotal)).toBeLessThan(0.011);
  });

  it('saves, reopens and finds the same project', async () => {
    const path = join(tmp, 'e2e-project.rwproj');
    await page.click('text=Save as…');
    await page.locator('[data-testid=prompt] input').fill(path);
    await page.click('[data-testid=prompt-ok]');
    await expect.poll(() => page.locator('[data-testid=file-state]').textContent()).toContain('e2e-project.rwproj');
    expect(await page.locator('[data-testid=dirty]').count()).toBe(0);
    await page.click('text=New');
    await expect.poll(() => page.locator('[data-testid=file-state]').textContent()).toContain('Untitled');
    await page.click('text=Open…');
    await page.locator('[data-testid=prompt] input').fill(path);
    await page.click('[data-testid=prompt-ok]');
    await expect.poll(() => page.locator('[data-testid=file-state]').textContent()).toContain('Field transmitter');
    await page.click('[data-viewtab=requirements]');
    const firstMode = await page.locator('[data-testid=summary] tbody tr').first().getAttribute('data-mode');
    const load = await page.locator('[data-grid=loads] [data-row]').first().getAttribute('data-row');
    expect(await page.locator(`[data-grid=loads] [data-row="${load}"] [data-key="current:${firstMode}"]`).textContent()).toBe('450 mA');
    await shot('09-reopened');
    // A path outside the allowed folders is refused with a message, nothing opens.
    await page.click('text=Open…');
    await page.locator('[data-testid=prompt] input').fill('/etc/passwd.rwproj');
    await page.click('[data-testid=prompt-ok]');
    // The dialog stays open with the reason and the typed path.
    await expect.poll(() => page.locator('[data-testid=prompt-error]').textContent()).toMatch(/path:/);
    expect(await page.locator('[data-testid=prompt] input').inputValue()).toBe('/etc/passwd.rwproj');
    await page.click('[data-testid=prompt] >> text=Cancel');
    expect(await page.locator('[data-testid=prompt]').count()).toBe(0);
  });
});
