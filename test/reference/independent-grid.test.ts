// Engine against the independent grid: ngspice simulations of netlists written from first
// principles by test/reference/independent-grid.ts (not by the project's exporter), stored in
// test/fixtures/cw-independent-grid.json with how they were made. Every stored point is
// compared; three points are re-simulated live so the fixture cannot drift from its writer.
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { ngspice } from '../helpers/tools.ts';
import { runAll } from '../helpers/ngspice.ts';
import { GRID, independentNetlist, readGrid, type GridPoint, type GridSimulated } from './independent-grid.ts';
import { compareGrid } from './independent-compare.ts';

const file = fileURLToPath(new URL('../fixtures/cw-independent-grid.json', import.meta.url));
const fx = JSON.parse(readFileSync(file, 'utf8')) as { madeBy: Record<string, string>; points: { params: GridPoint; sim: GridSimulated }[] };
const rows = fx.points.map((x) => compareGrid(x.params, x.sim));
const tool = ngspice();

describe('coupled-winding buck against the independent ngspice grid (fixture)', () => {
  it('the fixture holds the grid as the writer defines it today, with how it was made', () => {
    expect(fx.points.map((x) => x.params)).toEqual(JSON.parse(JSON.stringify(GRID)));
    for (const k of ['script', 'simulator', 'options', 'date']) expect(fx.madeBy[k]).toBeTruthy();
  });

  it('covers the space the planner uses', () => {
    const secs = GRID.flatMap((p) => p.sec);
    expect(GRID.length).toBeGreaterThanOrEqual(40);
    expect(Math.min(...secs.map((s) => Math.abs(s.n)))).toBeLessThanOrEqual(0.5);
    expect(Math.max(...secs.map((s) => Math.abs(s.n)))).toBeGreaterThanOrEqual(8);
    expect(secs.some((s) => s.n < 0)).toBe(true);
    expect(Math.min(...GRID.map((p) => p.duty))).toBeLessThanOrEqual(0.08);
    expect(Math.max(...GRID.map((p) => p.duty))).toBeGreaterThanOrEqual(0.6);
    expect(Math.min(...secs.map((s) => s.k))).toBeLessThanOrEqual(0.97);
    expect(Math.max(...secs.map((s) => s.k))).toBeGreaterThanOrEqual(0.997);
    expect(GRID.some((p) => p.arrangement === 'wound-together')).toBe(true);
    expect(new Set(GRID.map((p) => p.sec.length))).toEqual(new Set([1, 2, 3]));
    expect(Math.min(...secs.map((s) => s.share))).toBeLessThanOrEqual(0.01);
    expect(new Set(secs.map((s) => s.diode.kind))).toEqual(new Set(['schottky', 'ultrafast']));
  });

  it('every stored simulation settled (extrapolation correction below 0.5 %)', () => {
    for (const x of fx.points) for (const s of x.sim.settle) expect(Math.abs(s), x.params.name).toBeLessThan(0.005);
  });

  it('the validated region is not empty: at least 17 points (1–3 secondaries, D 0.08–0.6, wound together included)', () => {
    const v = rows.filter((r) => r.validated);
    expect(v.length).toBeGreaterThanOrEqual(17);
    expect(v.some((r) => r.arrangement === 'wound-together')).toBe(true);
    expect(v.some((r) => r.outputs.length === 3)).toBe(true);
  });

  it('the numerical switching-cycle model covers continuous-conduction points the closed form\'s ring estimate misses (g03, g04, g06, g10: within 2 %, no flag)', () => {
    for (const n of ['g03', 'g04', 'g06', 'g10']) {
      const r = rows.find((x) => x.name === n)!;
      expect(r.numeric, n).toEqual([0]);
      expect(r.validated, n).toBe(true);
      expect(Math.abs(r.outputs[0]!.errorPct), n).toBeLessThan(2); // ngspice simulation of an independent netlist
    }
    // g03: the closed form alone read 3.9 % low here (its ring estimate, flagged before).
    expect(Math.abs(rows.find((x) => x.name === 'g03')!.outputs[0]!.errorPct)).toBeLessThan(1);
  });

  it('light-load points whose ring the numerical model does not follow stay flagged, with its numbers', () => {
    for (const n of ['g13', 'g14', 'g15', 'g28', 'g32', 'g34']) {
      const r = rows.find((x) => x.name === n)!;
      expect(r.validated, n).toBe(false);
      expect(r.flags.some((f) => f.code === 'outside-validated-region' && /numerical switching-cycle model .*\d/.test(f.text)), n).toBe(true);
    }
  });

  for (const r of rows) {
    it(`${r.name}: efficiency within 3 points of ngspice over the simulated loss elements`, () => {
      expect(Math.abs(r.etaEngine - r.etaSim) * 100).toBeLessThan(3); // ngspice simulation of an independent netlist, DESIGN.md §7 bar
    });
    it(`${r.name}: ${r.validated ? 'inside the validated region, every secondary within 2 %' : 'flagged outside the validated region'}`, () => {
      // ngspice simulation of an independent netlist; DESIGN.md §7 bar. A secondary the model
      // misses by 2 % or more must never come without the flag.
      for (const o of r.outputs) {
        if (Math.abs(o.errorPct) >= 2) expect(r.validated, `${r.name} output ${o.index} off by ${o.errorPct.toFixed(2)} %`).toBe(false);
      }
      if (!r.validated) expect(r.flags.filter((f) => f.code === 'outside-validated-region').every((f) => /\d/.test(f.text))).toBe(true);
    });
    it(`${r.name}: rectifier reverse-voltage estimate covers the simulated turn-on spike (1…1.75 ×)`, () => {
      for (const o of r.outputs) {
        expect(o.vrEngine / o.vrSim, `${r.name} output ${o.index}`).toBeGreaterThanOrEqual(1); // ngspice simulation
        expect(o.vrEngine / o.vrSim, `${r.name} output ${o.index}`).toBeLessThan(1.75);
      }
    });
  }

  it('secondaries wound together: the shared leakage brings g24 and g25 (D 0.5 and 0.6) within 1 %', () => {
    for (const n of ['g24', 'g25']) for (const o of rows.find((r) => r.name === n)!.outputs) expect(Math.abs(o.errorPct), n).toBeLessThan(1); // ngspice simulation
  });
});

// Three points of different kinds (full load, light load with peak charging, wound together).
const LIVE = ['g04', 'g13', 'g22'];

describe.skipIf(tool.skip)('independent grid re-simulated live', () => {
  it('ngspice today gives the stored values (0.2 %)', async () => {
    const pts = LIVE.map((n) => GRID.find((p) => p.name === n)!);
    const sims = await runAll(pts.map(independentNetlist), 2, tool.path!);
    pts.forEach((p, i) => {
      const live = readGrid(p, sims[i]!);
      const stored = fx.points.find((x) => x.params.name === p.name)!.sim;
      live.v.forEach((v, k) => expect(Math.abs(v - stored.v[k]!) / Math.abs(stored.v[k]!), `${p.name} output ${k}`).toBeLessThan(0.002));
    });
  }, 180_000);
});
