/**
 * Coupled-winding output banks carry the rectified winding's pulsed current: each bank's RMS
 * ripple current is checked against its parts' rating and the part count covers it.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { tableToRows, type LibraryRow } from '../../../src-main/engine/library.ts';
import { readCsv } from '../../../src-main/export/csv.ts';
import { designStage, evaluateStage, type CoupledBuckDesign } from '../../../src-main/engine/stages/index.ts';
import { coupledBankRms, coupledPoint } from '../../../src-main/engine/stages/cwbuck/index.ts';
import type { StageSpec } from '../../../src-main/engine/stages/types.ts';
import type { Amps, Celsius } from '../../../src-main/engine/units.ts';

const lib: LibraryRow[] = (() => {
  const r = tableToRows(readCsv(readFileSync(join(import.meta.dirname, '../../../db/default-library.csv'), 'utf8')));
  if (!r.ok) throw new Error('default library');
  return r.rows;
})();
const o = (nodeId: string, voltage: number, currentMin: number, currentMax: number, tolerance = 0.08, rippleLimit = 0.1) =>
  ({ nodeId, voltage, tolerance, currentMin, currentMax, rippleLimit }) as StageSpec['outputs'][number];
const spec = (library: LibraryRow[]) => ({ kind: 'cwbuck', vinMin: 18, vinNom: 24, vinMax: 32, fsw: 400e3, ambient: 40, tjMax: 125, ceramicDerating: 0.6, library,
  outputs: [o('p5', 5, 0.3, 0.5, 0.03, 0.05), o('p12', 12, 0.05, 0.3, 0.1, 0.12), o('n12', -12, 0.05, 0.2, 0.1, 0.12)] }) as unknown as StageSpec;

function design(s: StageSpec): CoupledBuckDesign {
  const r = designStage(s);
  if (!r.ok || r.design.kind !== 'cwbuck') throw new Error(`design failed: ${!r.ok ? r.flags.map((f) => f.text).join('; ') : ''}`);
  return r.design;
}

describe('coupled-winding output-bank ripple current', () => {
  it('each bank\'s RMS is the AC part of its winding\'s rectified pulses, inside the bounds any such pulse obeys', () => {
    const d = design(spec(lib));
    const full = d.outputs.map((x) => x.currentMax as number);
    for (const vin of [d.vinMin, d.vinMax]) {
      const p = coupledPoint(d, vin, full);
      const b = coupledBankRms(d, p, full[0]!);
      p.sec.forEach((s, i) => {
        // Any current 0 ≤ i ≤ Ip with average Iavg, flowing for a share δ of the period, has
        // Iavg²/δ ≤ Irms² ≤ Ip·Iavg (Cauchy–Schwarz, and i² ≤ Ip·i; from memory), so the
        // capacitor's √(Irms² − Iavg²) lies between √(Iavg²/δ − Iavg²) and √(Ip·Iavg − Iavg²).
        // The winding conducts through the off-time and while its leakage current decays after
        // turn-on, tdec = Ipk·Llk/(n·Von + Vsec) (the leakage's volt-seconds); Ip within 2 %
        // of the end-of-off-time current (the drive falls, the current still rises at the end).
        const tdec = (s.ipk * s.llk) / (s.n * p.von + s.vsec);
        const share = Math.min(1, (p.toff + tdec) * d.fsw);
        const lo = Math.sqrt(Math.max(0, s.isec ** 2 / share - s.isec ** 2));
        const hi = Math.sqrt(Math.max(0, 1.02 * s.ipk * s.isec - s.isec ** 2));
        expect(b.secondaries[i]!).toBeGreaterThanOrEqual(lo);
        expect(b.secondaries[i]!).toBeLessThanOrEqual(hi);
        // and never below the load current's own share: a pulsed source always ripples
        expect(b.secondaries[i]!).toBeGreaterThan(0.3 * s.isec);
      });
    }
    // the design records the largest of Vin min/max on each bank
    d.secondaries.forEach((w, i) => {
      const worst = Math.max(...[d.vinMin, d.vinMax].map((vin) => coupledBankRms(d, coupledPoint(d, vin, full), full[0]!).secondaries[i]!));
      expect(w.cout.rmsCurrent).toBeCloseTo(worst, 12);
    });
  });

  it('part choice counts parts against the ripple rating, and a bank short of it is flagged with numbers', () => {
    // The same library with every ceramic rated 50 mA rms per part (invented for the test).
    const weak = lib.map((r) => (r.partClass === 'cap-ceramic' ? { ...r, params: { ...r.params, iRipple: 0.05 } } : r));
    const d = design(spec(weak));
    d.secondaries.forEach((w) => {
      expect(w.cout.rippleRating).toBe(0.05);
      // count × rating covers the RMS current (common practice: the rating is per part)
      expect(w.cout.count * 0.05).toBeGreaterThanOrEqual(w.cout.rmsCurrent! - 1e-12);
      expect(w.cout.count).toBeGreaterThanOrEqual(Math.ceil(w.cout.rmsCurrent! / 0.05 - 1e-9));
    });
    const full = d.outputs.map((x) => x.currentMax);
    const ok = evaluateStage(d, { vin: d.vinMax, iout: full as Amps[], ambient: 40 as Celsius });
    expect(ok.flags.filter((f) => f.code === 'capacitor-ripple-over-rating')).toEqual([]);
    // One part fewer on the first secondary's bank than its ripple needs: flagged.
    const w0 = d.secondaries[0]!;
    const need = Math.ceil(w0.cout.rmsCurrent! / 0.05 - 1e-9);
    const short = { ...d, secondaries: d.secondaries.map((w, i) => (i === 0 ? { ...w, cout: { ...w.cout, count: need - 1 } } : w)) };
    const worstVin = [d.vinMin, d.vinMax].find((vin) => coupledBankRms(d, coupledPoint(d, vin, full as number[]), full[0] as number).secondaries[0]! > 0.05 * (need - 1))!;
    const ev = evaluateStage(short, { vin: worstVin, iout: full as Amps[], ambient: 40 as Celsius });
    const f = ev.flags.find((x) => x.code === 'capacitor-ripple-over-rating');
    expect(f).toBeDefined();
    expect(f!.data!.count).toBe(need - 1);
    expect(f!.data!.rating).toBe(0.05);
    expect(f!.text).toMatch(/A rms, above its rating/);
  });

  it('a ceramic row without a rating gets the generic rating of its case size, named as generic', () => {
    const d = design(spec(lib));
    const refs = (d.parts ?? []).filter((r) => r.role.startsWith('secondary'));
    expect(refs.length).toBe(2);
    for (const r of refs) {
      expect(r.generic).toContain('iRipple');
      expect(r.used.iRipple).toBeGreaterThan(0);
    }
  });
});

describe('ceramic DC-bias derating by case size', () => {
  it('a small case keeps less at its working voltage, and the library bank grows to hold the capacitance needed', async () => {
    const { ceramicRetained, chooseCeramic } = await import('../../../src-main/engine/stages/common.ts');
    const { chooseCeramicRow } = await import('../../../src-main/engine/stages/part-choice.ts');
    // From memory (generic class-II curves): at half the rating a 0402 keeps about 55 %, a
    // 1210 about 73 %; the generic linear rule says 70 % for any case; C0G keeps all.
    expect(ceramicRetained(3.15, 6.3, '0402')).toBeCloseTo(1 - 0.8 * 0.5 ** 0.7, 12);
    expect(ceramicRetained(3.15, 6.3, '1210')).toBeCloseTo(1 - 0.45 * 0.5 ** 0.7, 12);
    expect(ceramicRetained(3.15, 6.3)).toBeCloseTo(0.7, 12);
    expect(ceramicRetained(40, 50, '0603', 'C0G')).toBe(1);
    expect(ceramicRetained(3.15, 6.3, '0402')).toBeLessThan(ceramicRetained(3.15, 6.3, '0805'));
    // A bank of 1 µF parts at 3.3 V needing 4 µF: only the 0402/0603 rows offer 1 µF at ≥ 6.3 V
    // in a library of those two; the chosen row's own curve sets the count.
    const only = lib.filter((r) => r.id === 'cc-0402-x5r-6v3');
    const bank = chooseCeramic('output', 4e-6, 3.3, 0.6, 1e-6);
    const pick = chooseCeramicRow(only, { ...bank, value: 1e-6, count: Math.ceil(4e-6 / (1e-6 * 0.69)) })!;
    const keep = 1 - 0.8 * (3.3 / 6.3) ** 0.7;
    expect(pick.bank.count).toBe(Math.ceil(4e-6 / (1e-6 * keep) - 1e-9));
    expect(pick.bank.effective).toBeGreaterThanOrEqual(4e-6);
    expect(pick.bank.effective).toBeCloseTo(pick.bank.count * 1e-6 * keep, 15);
  });
});
