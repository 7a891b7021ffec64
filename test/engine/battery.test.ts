// Battery sources (src-main/engine/battery.ts): presets from memory, usable energy by the
// trapezoid rule over the discharge curve, runtime = energy / power per mode and for the mix.
import { describe, expect, it } from 'vitest';
import { CHEMISTRY_PRESETS, batteryRuntime, packFullVoltage, usableEnergy } from '../../src-main/engine/battery.ts';
import { batteryProblems, validateRequirements } from '../../src-main/engine/validate.ts';
import { rollupPlan } from '../../src-main/engine/rollup.ts';
import { exportProjectJson, importProjectJson } from '../../src-main/store/json-format.ts';
import { demoDocument } from '../../src-main/store/demo.ts';
import { summaryText } from '../../src-main/cli/project.ts';
import { handRequirements } from '../export/hand-plan.ts';
import { designedHandPlan } from '../export/hand-designs.ts';
import type { BatterySpec, Requirements } from '../../src-main/engine/model.ts';
import type { Volts } from '../../src-main/engine/units.ts';

const liIon1s: BatterySpec = { chemistry: 'li-ion', cells: 1, capacity: 2, endVoltage: 3 as Volts };

describe('battery sources', () => {
  it('usable energy is capacity × ∫V dSOC down to the end voltage (trapezoid rule)', () => {
    const c = CHEMISTRY_PRESETS['li-ion'].curve;
    let integral = 0;
    for (let k = 0; k + 1 < c.length; k++) integral += ((c[k]![1] + c[k + 1]![1]) / 2) * (c[k]![0] - c[k + 1]![0]);
    expect(usableEnergy(liIon1s).wh).toBeCloseTo(2 * integral, 12);
    // A higher end voltage cuts the last segment: less energy
    const cut = usableEnergy({ ...liIon1s, endVoltage: 3.4 as Volts });
    expect(cut.wh).toBeLessThan(usableEnergy(liIon1s).wh);
    expect(cut.usableShare).toBeLessThan(1);
    // Series cells multiply voltage and energy
    expect(usableEnergy({ ...liIon1s, cells: 2, endVoltage: 6 as Volts }).wh).toBeCloseTo(2 * usableEnergy(liIon1s).wh, 12);
    expect(packFullVoltage({ chemistry: 'alkaline', cells: 2, capacity: 2.5, endVoltage: 1.8 as Volts })).toBeCloseTo(3.2, 12);
  });

  it('runtime per mode and for the mode mix = energy / power', () => {
    const e = usableEnergy(liIon1s).wh;
    const modes = [{ id: 'run', name: 'run', share: 0.25 }, { id: 'sleep', name: 'sleep', share: 0.75 }];
    const p: Record<string, number> = { run: 2, sleep: 0.02 };
    const r = batteryRuntime('bat', liIon1s, modes, (id) => p[id]!);
    expect(r.perMode[0]!.hours).toBeCloseTo(e / 2, 12);
    expect(r.perMode[1]!.hours).toBeCloseTo(e / 0.02, 12);
    expect(r.mixHours).toBeCloseTo(e / (0.25 * 2 + 0.75 * 0.02), 12);
  });

  it('validation names the field and the reason; the source range must span the discharge', () => {
    expect(batteryProblems({ ...liIon1s, cells: 4 }, { vMin: 3 as Volts, vMax: 4.2 as Volts }, 'b')[0]).toEqual(['b.cells', 'Li-ion presets take 1, 2, 3 cells in series (got 4)']);
    expect(batteryProblems({ ...liIon1s, chemistry: 'lead' as never }, { vMin: 3 as Volts, vMax: 4.2 as Volts }, 'b')[0]![0]).toBe('b.chemistry');
    expect(batteryProblems(liIon1s, { vMin: 3.3 as Volts, vMax: 4.2 as Volts }, 'b')[0]![1]).toMatch(/discharge ends at 3 V, below the source's vMin 3.3 V/);
    expect(batteryProblems(liIon1s, { vMin: 3 as Volts, vMax: 4 as Volts }, 'b')[0]![1]).toMatch(/4.20 V when full, above the source's vMax 4 V/);
    expect(batteryProblems(liIon1s, { vMin: 3 as Volts, vMax: 4.2 as Volts }, 'b')).toEqual([]);
    const req = handRequirements();
    req.sources[0]!.battery = { ...liIon1s, capacity: -1 };
    expect(validateRequirements(req).some((x) => x.path === 'sources[0].battery.capacity')).toBe(true);
  });

  it('project JSON carries the battery through import and export', () => {
    const doc = demoDocument();
    const s = doc.requirements.sources[0]!;
    s.battery = { chemistry: 'lifepo4', cells: 4, capacity: 6, endVoltage: 10 as Volts, curve: [[1, 3.6], [0, 2.5]] };
    const again = importProjectJson(exportProjectJson(doc));
    expect(again.ok).toBe(true);
    expect(again.ok && again.doc.requirements.sources[0]!.battery).toEqual(s.battery);
    const bad = importProjectJson(exportProjectJson(doc).replace('"lifepo4"', '"lead-acid"'));
    expect(bad.ok).toBe(false);
  });

  it('the roll-up gives the runtime from the power drawn from the source (losses included)', () => {
    const req: Requirements = handRequirements();
    const pr = designedHandPlan(req);
    req.sources[0]!.battery = { chemistry: 'li-ion', cells: 3, capacity: 3, endVoltage: 9 as Volts };
    const r = rollupPlan(req, pr.rails, pr.best!);
    expect(r.batteries).toHaveLength(1);
    const b = r.batteries[0]!;
    const e = usableEnergy(req.sources[0]!.battery!).wh;
    r.modes.forEach((m, i) => expect(b.perMode[i]!.hours).toBeCloseTo(e / m.cases.nom.sources[req.sources[0]!.id]!.p, 9));
    expect(b.mixHours).toBeCloseTo(e / r.weighted.sourcePower, 6);
  });

  it('summary prints the usable energy and the runtime bound at the load power', () => {
    const req = handRequirements();
    req.sources[0]!.battery = { chemistry: 'li-ion', cells: 3, capacity: 3, endVoltage: 9 as Volts };
    const text = summaryText(req).join('\n');
    expect(text).toMatch(/battery: 3 × Li-ion \(preset curve, from memory\), 3 A·h, ends at 9 V: [\d.]+ Wh usable/);
    expect(text).toMatch(/Battery runtime at the load power, before conversion losses \(an upper bound\): mode mix [\d.]+ h; /);
  });
});
