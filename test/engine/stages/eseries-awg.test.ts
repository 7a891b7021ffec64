import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { E_SERIES, atLeast, bestDivider, decadeValues, nearest } from '../../../src-main/engine/eseries.ts';
import { awgAreaMm2, awgDiameterMm, copperOhmsPerMetre, wireFor } from '../../../src-main/engine/awg.ts';

const FIX = join(import.meta.dirname, '../../fixtures');
const iec = JSON.parse(readFileSync(join(FIX, 'iec60063-e-series.json'), 'utf8')) as Record<string, number[]>;
const awg = JSON.parse(readFileSync(join(FIX, 'awg-astm-b258.json'), 'utf8')) as {
  diameterInches: Record<string, number>; ohmsPerKmAt20C: Record<string, number>;
};

describe('IEC 60063 preferred values', () => {
  for (const s of ['E6', 'E12', 'E24', 'E96'] as const) {
    it(`${s} equals the standard's table`, () => {
      expect(decadeValues(s)).toEqual(iec[s]); // IEC 60063 table (test/fixtures/iec60063-e-series.json)
    });
  }
  it('E48 and E96 follow round(100·10^(i/N)) for every i', () => {
    for (const N of [48, 96] as const) {
      const formula = Array.from({ length: N }, (_, i) => Math.round(100 * 10 ** (i / N)));
      expect(E_SERIES[`E${N}`]).toEqual(formula); // property of IEC 60063 E48/E96 (DESIGN.md §4)
    }
  });
  it('E24 does not follow the formula: the old values 27 30 33 36 39 43 47 82 differ', () => {
    const formula = Array.from({ length: 24 }, (_, i) => Math.round(10 * 10 ** (i / 24)));
    const differ = E_SERIES.E24.filter((v, i) => v !== formula[i]);
    expect(differ).toEqual([27, 30, 33, 36, 39, 43, 47, 82]); // IEC 60063 E24 table vs formula
  });
  it('finds nearest and next-larger values across decades', () => {
    expect(nearest('E12', 4.5e-6)).toBeCloseTo(4.7e-6, 12); // IEC 60063 E12
    expect(atLeast('E6', 23e-6)).toBeCloseTo(33e-6, 12); // IEC 60063 E6
    expect(atLeast('E6', 0.9e-6)).toBeCloseTo(1e-6, 12);
    expect(nearest('E96', 3125)).toBeCloseTo(3160, 6); // log-nearest of 3090/3160 (E96)
    expect(() => nearest('E96', -1)).toThrow(/positive/);
  });
});

describe('feedback divider from E96 pairs', () => {
  it('is the best pair an independent brute force finds, and states its voltage and error', () => {
    // Independent E96 list from the formula (IEC 60063 property checked above).
    const e96 = Array.from({ length: 96 }, (_, i) => Math.round(100 * 10 ** (i / 96)));
    for (const [target, vref] of [[3.3, 0.8], [5, 0.8], [1.8, 0.6], [12, 1.25]] as const) {
      const got = bestDivider(target, vref)!;
      let bestErr = Infinity;
      for (const b of e96) for (const dec of [100, 1000]) {
        const rb = b * dec;
        if (rb < 10e3 || rb > 100e3) continue;
        for (const t of e96) for (const td of [1, 10, 100, 1000, 10000]) {
          const e = Math.abs(vref * (1 + (t * td) / rb) - target) / target;
          if (e < bestErr) bestErr = e;
        }
      }
      expect(Math.abs(got.error)).toBeCloseTo(bestErr, 9);
      expect(got.vout).toBeCloseTo(vref * (1 + got.rTop / got.rBottom), 12); // Vout = Vref·(1 + Rtop/Rbottom), common practice
      expect(got.tolerance).toBe(0.01); // E96 goes with ±1 % (IEC 60063)
    }
  });
  it('refuses an output at or below the reference', () => {
    expect(bestDivider(0.6, 0.8)).toBeNull();
  });
});

describe('AWG wire (ASTM B258)', () => {
  for (const [g, inches] of Object.entries(awg.diameterInches)) {
    it(`AWG ${g} diameter matches the table`, () => {
      const mm = inches * 25.4;
      // Table values are rounded to 0.0001 in: allow half a digit plus 0.3 %.
      expect(Math.abs(awgDiameterMm(Number(g)) - mm)).toBeLessThan(0.00005 * 25.4 + 0.003 * mm); // ASTM B258 table
    });
  }
  for (const [g, ohmsKm] of Object.entries(awg.ohmsPerKmAt20C)) {
    if (g === 'source') continue;
    it(`AWG ${g} copper resistance at 20 °C matches wire tables`, () => {
      expect(Math.abs(copperOhmsPerMetre(Number(g), 20) * 1000 - (ohmsKm as number)) / (ohmsKm as number)).toBeLessThan(0.02); // copper wire tables, from memory
    });
  }
  it('resistance rises 0.393 %/K', () => {
    expect(copperOhmsPerMetre(24, 120) / copperOhmsPerMetre(24, 20)).toBeCloseTo(1.393, 9); // annealed copper temperature coefficient
  });
  it('picks the thinnest wire at the stated current density', () => {
    const w = wireFor(1, 5); // 1 A at 5 A/mm² needs 0.2 mm²
    expect(awgAreaMm2(w.awg)).toBeGreaterThanOrEqual(0.2);
    expect(awgAreaMm2(w.awg + 1)).toBeLessThan(0.2);
    expect(w.awg).toBe(24); // AWG 24 = 0.205 mm² (ASTM B258 diameter 0.511 mm)
    expect(() => awgDiameterMm(50)).toThrow(/AWG gauge/);
  });
});
