// Issue 15 item 6, plots in the window (real Chromium over the web host): on the planned
// demo the Plots view draws every plot as SVG with its expected series, the figures are the
// roll-up's (the rail chart lists the rails the roll-up reports), and "Save SVG" downloads
// a well-formed document (read back with fast-xml-parser). Screenshots: test-output/e2e/plots-*.png.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { XMLValidator } from 'fast-xml-parser';
import type { Page } from 'playwright-core';
import { chromiumCheck, startWindow, type WindowHarness } from '../helpers/e2e-window.ts';

const tool = chromiumCheck();

describe.skipIf(tool.skip)('plots in the window', () => {
  let w: WindowHarness;
  let page: Page;

  beforeAll(async () => {
    w = await startWindow();
    page = w.page;
    await page.goto(w.entryUrl);
    await page.waitForSelector('[data-viewtab=plots]', { timeout: 60_000 });
    // First run plans the demo; wait until the handlers hold its plan (or plan it here).
    const until = Date.now() + 270_000;
    let asked = false;
    for (;;) {
      const s = await w.api('project.snapshot', {});
      if (s.plan?.selected && !s.state.planning) break;
      if (!s.state.planning && !s.state.planOnOpen && !asked && Date.now() > until - 260_000) { await w.api('plan.start', {}); asked = true; }
      if (Date.now() > until) { await w.shot('plots-no-plan'); throw new Error('the demo was not planned in time'); }
      await new Promise((r) => setTimeout(r, 1000));
    }
    await page.reload();
    await page.waitForSelector('[data-viewtab=plots]');
  }, 300_000);
  afterAll(async () => { await w?.close(); });

  it('draws each plot with its series', async () => {
    await page.click('[data-viewtab=plots]');
    await page.waitForSelector('[data-plot-kind=alternatives] svg', { timeout: 30_000 });
    for (const k of ['stage-load', 'stage-vin', 'system-vin', 'rail-windows', 'alternatives']) {
      await page.waitForSelector(`[data-plot-kind=${k}] svg.rw-plot`, { timeout: 30_000 });
    }
    const snap = await w.api('project.snapshot', {});
    // Stage versus load: three curves (V min, nom, max) of 20 points in both panels.
    const load = await page.locator('[data-plot-kind=stage-load] path[data-series]').evaluateAll((els) => els.map((e) => [e.getAttribute('data-series'), e.getAttribute('data-points')]));
    expect(load).toHaveLength(6);
    expect(load.map((x) => x[0]).join('|')).toMatch(/V min.*V nom.*V max/);
    for (const [, n] of load) expect(n).toBe('20');
    // System: one curve per mode.
    const sys = await page.locator('[data-plot-kind=system-vin] path[data-series]').evaluateAll((els) => [...new Set(els.map((e) => e.getAttribute('data-series')))]);
    expect(sys.sort()).toEqual(snap.requirements.modes.map((m) => m.name).sort());
    // Rail windows: every rail the roll-up windows, with a mark per mode.
    const rails = await page.locator('[data-plot-kind=rail-windows] [data-rail]').evaluateAll((els) => els.map((e) => e.getAttribute('data-rail')));
    const railNames = snap.rails.filter((r) => snap.plan!.rollup!.windows.some((x) => x.nodeId === r.id)).map((r) => r.name);
    expect(rails.sort()).toEqual(railNames.sort());
    const marks = await page.locator('[data-plot-kind=rail-windows] [data-rail] [data-mode]').count();
    expect(marks).toBe(rails.length * snap.requirements.modes.length);
    // Alternatives: one point per tree, the shown one highlighted.
    const pts = await page.locator('[data-plot-kind=alternatives] [data-point]').count();
    expect(pts).toBe(snap.plan!.result.alternatives.length);
    expect(await page.locator('[data-plot-kind=alternatives] [data-highlight=true]').count()).toBe(1);
    // Tick labels in engineering notation with units.
    const ticks = await page.locator('[data-plot-kind=stage-load] .pl-tick').allTextContents();
    expect(ticks.some((t) => / [mµ]?A$/.test(t))).toBe(true);
    expect(ticks.some((t) => / %$/.test(t))).toBe(true);
    await w.shot('plots-top');
    await page.locator('[data-plot-card=rail-windows]').scrollIntoViewIfNeeded();
    await w.shot('plots-windows');
    await page.locator('[data-plot-card=alternatives]').scrollIntoViewIfNeeded();
    await w.shot('plots-alternatives');
  }, 90_000);

  it('another stage can be chosen, and Save SVG downloads a well-formed file', async () => {
    const options = await page.locator('[data-testid=plot-stage] option').evaluateAll((els) => els.map((e) => (e as HTMLOptionElement).value));
    if (options.length > 1) {
      const before = await page.locator('[data-plot-kind=stage-load] .pl-title').textContent();
      await page.selectOption('[data-testid=plot-stage]', options[options.length - 1]!);
      await page.waitForFunction((b) => document.querySelector('[data-plot-kind=stage-load] .pl-title')?.textContent !== b, before, { timeout: 30_000 });
    }
    const [dl] = await Promise.all([page.waitForEvent('download'), page.click('[data-plot-save=stage-load]')]);
    expect(dl.suggestedFilename()).toMatch(/plot-stage-load.*\.svg$/);
    const text = readFileSync((await dl.path())!, 'utf8');
    expect(XMLValidator.validate(text)).toBe(true);
    expect(text).toContain('data-series');
    await page.locator('[data-plot-card=stage-load]').scrollIntoViewIfNeeded();
    await w.shot('plots-stage-chosen');
  }, 60_000);
});
