import { describe, expect, it } from 'vitest';
import {
  designMagneticCore, dowellFr, MU0, skinDepth, steinmetzLoss, temperatureRise, type MagneticDemand,
} from '../../src-main/engine/core-design.ts';
import { GENERIC_CORES, GENERIC_MATERIALS } from '../../src-main/engine/core-table.ts';

describe('winding AC resistance (Dowell)', () => {
  it('matches the low-frequency form 1 + (5m² − 1)·Δ⁴/45 at small penetration', () => {
    // Erickson & Maksimović, Fundamentals of Power Electronics, ch. 13 (low-frequency
    // approximation of Dowell's F_R).
    for (const m of [1, 2, 3, 5]) {
      for (const delta of [0.1, 0.2, 0.3]) {
        const approx = 1 + ((5 * m * m - 1) * delta ** 4) / 45;
        expect(dowellFr(delta, m)).toBeCloseTo(approx, 4);
      }
    }
  });
  it('tends to Δ for one thick layer (current crowds into one skin depth)', () => {
    // Erickson & Maksimović ch. 13: for m = 1 and Δ ≫ 1, F_R → Δ.
    expect(dowellFr(8, 1) / 8).toBeCloseTo(1, 3);
  });
  it('grows with the number of layers at a given penetration', () => {
    // Erickson & Maksimović ch. 13: proximity loss rises about as m² (Fig. of F_R vs Δ).
    const f = [1, 2, 4, 8].map((m) => dowellFr(1, m));
    for (let i = 1; i < f.length; i++) expect(f[i]!).toBeGreaterThan(f[i - 1]!);
    // Hand evaluation of the closed form at Δ = 1, m = 2: 1.0857 + 2·0.1602 = 1.406.
    expect(dowellFr(1, 2)).toBeCloseTo(1.406, 2);
  });
});

describe('copper and core constants', () => {
  it('skin depth in copper is about 66/√f mm at 20 °C', () => {
    // Common textbook value (e.g. Erickson & Maksimović ch. 13: δ = 7.5/√f cm at 100 °C,
    // 6.6/√f cm at 20 °C).
    expect(skinDepth(100e3) * 1e3).toBeCloseTo(0.209, 3);
    // At 100 °C the textbook gives 7.5/√f cm: 0.237 mm at 100 kHz (within 1 %).
    expect(skinDepth(100e3, 100) * 1e3).toBeGreaterThan(0.232);
    expect(skinDepth(100e3, 100) * 1e3).toBeLessThan(0.240);
  });
  it('temperature rise follows 450·ψ^0.826 with ψ in W/cm²', () => {
    // McLyman, Transformer and Inductor Design Handbook: ΔT = 450·ψ^0.826.
    expect(temperatureRise(1, 10e-4)).toBeCloseTo(450 * 0.1 ** 0.826, 6);
    expect(temperatureRise(1, 10e-4)).toBeCloseTo(67.2, 0);
    expect(temperatureRise(0, 10e-4)).toBe(0);
  });
  it('Steinmetz loss of the general-purpose ferrite is near 90 kW/m³ at 100 kHz, 100 mT', () => {
    // From memory: general-purpose power ferrites lose roughly 80–100 mW/cm³ at 100 kHz,
    // 100 mT peak, 100 °C.
    const pv = steinmetzLoss(GENERIC_MATERIALS[0]!, 100e3, 0.1);
    expect(pv).toBeGreaterThan(60e3);
    expect(pv).toBeLessThan(130e3);
  });
  it('the core table is ordered by area product and every entry is physical', () => {
    for (let i = 0; i < GENERIC_CORES.length; i++) {
      const c = GENERIC_CORES[i]!;
      expect(c.ae).toBeGreaterThan(0);
      // Ve ≈ Ae·le for a core of uniform section (common practice): within 30 %.
      expect(c.ve / (c.ae * c.le)).toBeGreaterThan(0.7);
      expect(c.ve / (c.ae * c.le)).toBeLessThan(1.3);
      if (i > 0) expect(c.ae * c.aw).toBeGreaterThanOrEqual(GENERIC_CORES[i - 1]!.ae * GENERIC_CORES[i - 1]!.aw);
    }
  });
});

/** A coupled-winding magnetic: 5 V primary, ±12 V secondaries at 300 kHz (invented). */
function demand(): MagneticDemand {
  return {
    inductance: 22e-6, peakCurrent: 1.1, rippleCurrent: 0.35, fsw: 300e3, isolation: 'basic',
    windings: [
      { name: 'P', designTurns: 3, rms: 0.75, average: 0.45, peak: 1.1, voltage: 31, crossesBarrier: false },
      { name: 'S1', designTurns: 8, rms: 0.18, average: 0.08, peak: 0.45, voltage: 83, crossesBarrier: true },
      { name: 'S2', designTurns: -8, rms: 0.18, average: 0.08, peak: 0.45, voltage: 83, crossesBarrier: true },
    ],
  };
}

describe('designMagneticCore', () => {
  it('keeps the turns ratio, meets the flux limit and needs the next turn count no smaller', () => {
    const d = designMagneticCore(demand());
    expect(d.ok).toBe(true);
    const np = d.windings[0]!.turns;
    expect(d.windings.map((w) => w.turns)).toEqual([3, 8, -8].map((t) => t * d.turnsMultiplier));
    // Erickson ch. 14: B = L·Ipk/(N·Ae) must not exceed Bmax.
    const b = (22e-6 * 1.1) / (np * d.core.ae);
    expect(b).toBeCloseTo(d.peakFlux, 9);
    expect(b).toBeLessThanOrEqual(d.fluxLimit * (1 + 1e-12));
    // One multiplier less would either break the flux limit or the gap (L not reachable ungapped),
    // or go below the minimum primary turns.
    if (d.turnsMultiplier > 1) {
      const nLess = 3 * (d.turnsMultiplier - 1);
      const bLess = (22e-6 * 1.1) / (nLess * d.core.ae);
      const ungappedL = (MU0 * d.material.mur * nLess * nLess * d.core.ae) / d.core.le;
      expect(bLess > d.fluxLimit || ungappedL < 22e-6 || nLess < 4).toBe(true);
    }
  });
  it('sets the gap so core plus gap give the inductance (reluctance of a gapped core)', () => {
    // Erickson ch. 14: L = µ0·N²·Ae/(lg + le/µr).
    const d = designMagneticCore(demand());
    const np = d.windings[0]!.turns;
    const l = (MU0 * np * np * d.core.ae) / (d.gap + d.core.le / d.material.mur);
    expect(l / 22e-6).toBeCloseTo(1, 6);
    expect(d.inductanceFactor * np * np).toBeCloseTo(22e-6, 12);
  });
  it('gapped-core hand example: 10 µH, 10 turns, Ae 31 mm², le 47 mm, µr 2300 → 0.369 mm', () => {
    // Hand calculation with the reluctance formula (Erickson ch. 14):
    // lg = 4π·10⁻⁷·100·31·10⁻⁶/10⁻⁵ − 0.047/2300 = 0.3896 mm − 0.0204 mm.
    const lg = (MU0 * 100 * 31e-6) / 10e-6 - 0.047 / 2300;
    expect(lg * 1e3).toBeCloseTo(0.369, 3);
  });
  it('checks the window fill against Ku and puts triple-insulated wire across a basic barrier', () => {
    const d = designMagneticCore(demand());
    expect(d.fill).toBeLessThanOrEqual(d.windowUtilisation);
    expect(d.windings[1]!.insulation).toBe('triple-insulated');
    expect(d.windings[0]!.insulation).toBe('single-coat enamel');
    expect(d.areaProduct).toBeGreaterThanOrEqual(d.areaProductNeeded);
    expect(d.windingOrder.some((l) => l.includes('2 layers'))).toBe(true);
  });
  it('copper loss is Rdc·(Idc² + F_R·Iac²) summed over the windings', () => {
    const d = designMagneticCore(demand());
    const dem = demand();
    let sum = 0;
    d.windings.forEach((w, i) => {
      const x = dem.windings[i]!;
      const expected = w.rdc * (x.average ** 2 + w.fr * (x.rms ** 2 - x.average ** 2));
      expect(w.copperLoss).toBeCloseTo(expected, 12);
      expect(w.fr).toBeGreaterThanOrEqual(1);
      sum += expected;
    });
    expect(d.copperLoss).toBeCloseTo(sum, 12);
    expect(d.temperatureRise).toBeCloseTo(temperatureRise(d.copperLoss + d.coreLoss, d.core.surface), 9);
  });
  it('a larger demand moves to a larger core, and an impossible one says why', () => {
    const small = designMagneticCore(demand());
    const big = designMagneticCore({ ...demand(), inductance: 100e-6, peakCurrent: 4, windings: demand().windings.map((w) => ({ ...w, rms: w.rms * 4, average: w.average * 4 })) });
    expect(big.areaProduct).toBeGreaterThan(small.areaProduct);
    const huge = designMagneticCore({ ...demand(), inductance: 1e-3, peakCurrent: 20, windings: demand().windings.map((w) => ({ ...w, rms: w.rms * 20 })) });
    expect(huge.ok).toBe(false);
    expect(huge.problems.length).toBeGreaterThan(0);
    expect(huge.reasons.join(' ')).toMatch(/no core of the table/);
  });
  it('refuses a meaningless demand', () => {
    expect(() => designMagneticCore({ ...demand(), inductance: 0 })).toThrow(/inductance/);
  });
});

describe('gap against permeability tolerance', () => {
  it('the gap dominates: a −25 % µr moves L by no more than the allowed spread', () => {
    // Reluctance of core plus gap (Erickson ch. 14): L = µ0·N²·Ae/(lg + le/µr).
    const d = designMagneticCore(demand());
    const np = d.windings[0]!.turns;
    const low = (MU0 * np * np * d.core.ae) / (d.gap + d.core.le / (d.material.mur * 0.75));
    expect(1 - low / 22e-6).toBeLessThanOrEqual(0.1 + 1e-12);
    expect(d.inductanceSpread).toBeCloseTo(1 - low / 22e-6, 9);
  });
});
