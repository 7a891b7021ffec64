// Physically absurd but finite values are validation problems (issue 10 item 7): a load of
// 1e6 A or 1e308 A, a source above 1 kV, used to pass validation and then failed deep in
// the planner with on-time and E-series complaints. The limits (1 kV, 1 kA, 1000 °C) are a judgement
// for board-level power trees (common practice: such values are a unit slip), not a standard;
// absolute zero, −273.15 °C, is the definition of the kelvin scale (from memory).
import { describe, expect, it } from 'vitest';
import { MAX_AMPS, MAX_VOLTS, validateRequirements } from '../../src-main/engine/validate.ts';
import type { Requirements } from '../../src-main/engine/model.ts';
import { demoDocument } from '../../src-main/store/demo.ts';

const base = (): Requirements => structuredClone(demoDocument().requirements);

describe('validateRequirements: physical ranges', () => {
  it('the limits are 1 kV and 1 kA, and the demo stays inside them', () => {
    expect(MAX_VOLTS).toBe(1000);
    expect(MAX_AMPS).toBe(1000);
    expect(validateRequirements(base())).toEqual([]);
  });

  const cases: [string, (r: Requirements) => void, string, RegExp][] = [
    ['a load of 1e6 A', (r) => { r.loads[0]!.current.measure = 1e6 as never; }, 'loads[0].current.measure', /current is 1 MA, above the 1 kA/],
    ['a load of 1e308 A', (r) => { r.loads[0]!.current.measure = 1e308 as never; }, 'loads[0].current.measure', /current is 1\.000e\+308 A, above the 1 kA/],
    ['a load of 1.001 kA', (r) => { r.loads[0]!.current.measure = 1001 as never; }, 'loads[0].current.measure', /above the 1 kA/],
    ['a load at 5 kV', (r) => { r.loads[0]!.voltage = 5000 as never; }, 'loads[0].voltage', /voltage is 5 kV, above the 1 kV/],
    ['a load at −2 kV', (r) => { r.loads[0]!.voltage = -2000 as never; }, 'loads[0].voltage', /above the 1 kV/],
    ['a ripple limit of 1e308 V', (r) => { r.loads[0]!.rippleLimit = 1e308 as never; }, 'loads[0].rippleLimit', /above 1 kV/],
    ['a source of 1e308 V', (r) => { Object.assign(r.sources[0]!, { vMin: 1e308, vNom: 1e308, vMax: 1e308 }); }, 'sources[0].vNom', /above the 1 kV/],
    ['a source at 1.2 kV maximum', (r) => { r.sources[0]!.vMax = 1200 as never; }, 'sources[0].vMax', /vMax is 1\.2 kV, above the 1 kV/],
    ['a source current limit of 1e9 A', (r) => { r.sources[0]!.currentLimit = 1e9 as never; }, 'sources[0].currentLimit', /above the 1 kA/],
    ['a working voltage of 1e308 V', (r) => { r.domains[0]!.workingVoltage = 1e308 as never; }, 'domains[0].workingVoltage', /above the 1 kV/],
    ['an ambient below absolute zero', (r) => { r.limits.ambient = -300 as never; }, 'limits.ambient', /outside −273\.15 °C \(absolute zero\) to 1000 °C/],
    ['a junction limit of 1e308 °C', (r) => { r.limits.tjMax = 1e308 as never; }, 'limits.tjMax', /outside −273\.15 °C/],
    ['mode shares of 100 % each (300 % in all)', (r) => { for (const m of r.modes) m.share = 1 as never; }, 'modes', /sum to 3, they must sum to 1/],
  ];
  it.each(cases)('%s', (_label, mutate, path, re) => {
    const r = base();
    mutate(r);
    const ps = validateRequirements(r);
    const hit = ps.find((p) => p.path === path);
    expect(hit, JSON.stringify(ps)).toBeDefined();
    expect(hit!.message).toMatch(re);
  });

  it('exactly 1 kV and 1 kA are allowed', () => {
    const r = base();
    r.loads[0]!.current.measure = 1000 as never;
    r.domains[0]!.workingVoltage = 1000 as never;
    expect(validateRequirements(r).filter((p) => /above the/.test(p.message))).toEqual([]);
  });
});
