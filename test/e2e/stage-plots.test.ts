// End-to-end (issue 15 item 6, plots): on the first-run demo (planned without being asked),
// selecting a stage shows its efficiency-versus-load and efficiency-versus-input plots in the
// inspector as SVG with one line per input case, ticks with units, a legend and Save SVG.
// Screenshot: test-output/e2e/stage-plots.png.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { XMLValidator } from 'fast-xml-parser';
import { join } from 'node:path';
import { chromiumCheck, startWindow, type WindowHarness } from '../helpers/e2e-window.ts';
import { ProjectStore } from '../../src-main/store/project-store.ts';
import { demoDocument } from '../../src-main/store/demo.ts';
import { demoHandPlan } from '../export/demo-plan.ts';

const tool = chromiumCheck();

describe.skipIf(tool.skip)('window: stage plots', () => {
  let w: WindowHarness;
  let page: Page;

  beforeAll(async () => {
    w = await startWindow({ firstRunPlan: false });
    page = w.page;
  }, 120_000);
  afterAll(async () => { await w?.close(); });

  it('a selected stage shows efficiency vs load and vs input, with series, units and a legend', { timeout: 170_000 }, async () => {
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
    await page.click('[data-viewtab=tree]');
    await page.waitForSelector('[data-testid=tree-svg]', { timeout: 30_000 });
    // A switching stage (its curves differ across Vin): the first one that is not an LDO.
    const stages = page.locator('[data-kind=stage]');
    const n = await stages.count();
    expect(n).toBeGreaterThan(0);
    let picked = false;
    for (let k = 0; k < n && !picked; k++) {
      await stages.nth(k).click();
      await page.waitForSelector('[data-testid=inspector]');
      const kind = (await page.locator('[data-testid=inspector] .kind').textContent()) ?? '';
      picked = !/LDO/.test(kind);
    }
    await page.waitForSelector('[data-plot=eff-load] svg', { timeout: 20_000 });
    const load = page.locator('[data-plot=eff-load] svg');
    // One line per distinct input case (min, nom, max), each with a legend entry.
    const lines = await load.locator('g.series path').count();
    expect(lines).toBeGreaterThanOrEqual(2);
    expect(await load.locator('g.legend').count()).toBe(lines);
    const text = (await load.textContent()) ?? '';
    expect(text).toMatch(/Vin min/);
    expect(text).toMatch(/ %/);
    expect(text).toMatch(/A/);
    const vin = page.locator('[data-plot=eff-vin] svg');
    expect(await vin.locator('g.series path').count()).toBe(1);
    expect((await vin.textContent()) ?? '').toMatch(/V/);
    // The SVG as saved is well-formed XML (independent parser).
    const markup = await vin.evaluate((e) => e.outerHTML);
    expect(XMLValidator.validate(markup)).toBe(true);
    expect(await page.locator('[data-testid=save-eff-load]').count()).toBe(1);
    await page.locator('[data-testid=stage-plots]').scrollIntoViewIfNeeded();
    await w.shot('stage-plots');
  });
});
