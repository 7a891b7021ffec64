// End-to-end (issue 15, plots): the demo (invented scenario) opened with its hand plan, the
// Charts view shows the rail windows per mode against each band, the alternatives' loss
// versus cost, and the system's efficiency and source current versus the source voltage, each
// with its series and a legend; Save SVG downloads a file that fast-xml-parser reads back.
// Screenshots: test-output/e2e/charts-*.png.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { XMLParser, XMLValidator } from 'fast-xml-parser';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { chromiumCheck, startWindow, type WindowHarness } from '../helpers/e2e-window.ts';
import { ProjectStore } from '../../src-main/store/project-store.ts';
import { demoDocument } from '../../src-main/store/demo.ts';
import { demoHandPlan } from '../export/demo-plan.ts';

const tool = chromiumCheck();

describe.skipIf(tool.skip)('window: charts', () => {
  let w: WindowHarness;
  let page: Page;

  beforeAll(async () => {
    w = await startWindow({ firstRunPlan: false });
    page = w.page;
  }, 120_000);
  afterAll(async () => { await w?.close(); });

  it('draws every chart with its series and saves a well-formed SVG', { timeout: 170_000 }, async () => {
    const req = demoDocument().requirements;
    const path = join(w.tmp, 'demo-planned.rwproj');
    const st = ProjectStore.create();
    st.setRequirements(req);
    st.setPlanResult(demoHandPlan(req));
    st.save(path);
    st.close();
    await page.goto(w.entryUrl);
    await page.waitForSelector('[data-testid=file-state]');
    await page.click('text=Open…');
    if (await page.locator('[data-testid=prompt] >> text=Discard changes').count()) await page.click('[data-testid=prompt-ok]');
    await page.locator('[data-testid=prompt] input').fill(path);
    await page.click('[data-testid=prompt-ok]');
    await page.click('[data-viewtab=charts]');
    await page.waitForSelector('[data-view=charts]');

    // (1) Rail windows: one row per rail, one bar per mode plus the all-modes bar, a legend.
    const win = page.locator('[data-plot=rail-windows] svg');
    await win.waitFor({ timeout: 30_000 });
    const rails = await win.locator('g.rail').count();
    expect(rails).toBeGreaterThan(3);
    expect(await win.locator('rect.window').count()).toBe(rails * (req.modes.length + 1));
    expect(await win.locator('rect.band').count()).toBe(rails);
    expect(await win.locator('g.legend').count()).toBe(req.modes.length + 3);
    const wt = (await win.textContent()) ?? '';
    for (const m of req.modes) expect(wt).toContain(m.name);
    expect(wt).toMatch(/[+−-]?\d+(\.\d+)? %/);

    // (2) The alternatives: one point per alternative with its letter.
    const alt = page.locator('[data-plot=alternatives] svg');
    expect(await alt.locator('g.series circle').count()).toBeGreaterThanOrEqual(1);
    expect((await alt.textContent()) ?? '').toMatch(/W/);

    // (3) The system versus the source voltage: one line per mode in each plot, ticks in V.
    for (const key of ['system-efficiency', 'source-current']) {
      const p = page.locator(`[data-plot=${key}] svg`);
      await p.waitFor({ timeout: 60_000 });
      expect(await p.locator('g.series path').count()).toBe(req.modes.length);
      expect(await p.locator('g.legend').count()).toBe(req.modes.length);
      expect((await p.textContent()) ?? '').toMatch(/\d V/);
    }
    expect((await page.locator('[data-plot=source-current] svg').textContent()) ?? '').toMatch(/\d m?A/);

    await w.shot('charts-top');
    await page.locator('[data-plot=system-efficiency]').scrollIntoViewIfNeeded();
    await w.shot('charts-sweep');

    // Save SVG: a download (web host) of the same drawing, read back by an independent parser.
    for (const key of ['rail-windows', 'alternatives']) {
      const [dl] = await Promise.all([page.waitForEvent('download'), page.click(`[data-testid=save-${key}]`)]);
      expect(dl.suggestedFilename()).toMatch(new RegExp(`-${key}\\.svg$`));
      const file = join(w.tmp, `${key}.svg`);
      await dl.saveAs(file);
      const text = readFileSync(file, 'utf8');
      expect(XMLValidator.validate(text)).toBe(true);
      const doc = new XMLParser({ ignoreAttributes: false }).parse(text);
      expect(doc.svg['@_xmlns']).toBe('http://www.w3.org/2000/svg');
      expect(String(doc.svg.title)).toMatch(key === 'alternatives' ? /Loss versus cost/ : /Rail windows/);
      expect(text).not.toMatch(/var\(/);
    }
  });
});
