import { describe, expect, it } from 'vitest';
import { LEAKAGE_LIMITS, checkBarrier, yCapLeakage } from '../../../src-main/engine/isolation.ts';

describe('Y-capacitor leakage across a barrier', () => {
  it('I = 2π·f·C·V by hand: 4.7 nF at 230 V 50 Hz = 339.6 µA', () => {
    // 2π·50·4.7e-9·230 = 3.3961e-4 A (capacitive reactance, any circuits textbook)
    expect(yCapLeakage(4.7e-9, 230, 50)).toBeCloseTo(3.3961e-4, 7);
  });
  it('compares with the picked limit and says which standard and edition, from memory', () => {
    const over = checkBarrier({ capacitance: 4.7e-9, voltageRms: 230, frequency: 50, limitId: 'ite-class2' });
    expect(over.ok).toBe(false);
    expect(over.text).toMatch(/340 µA .* limit 250 µA .*IEC 60950-1:2005 .*from memory.*OVER/);
    expect(over.maxCapacitance).toBeCloseTo(0.25e-3 / (2 * Math.PI * 50 * 230), 15);
    const under = checkBarrier({ capacitance: 2.2e-9, voltageRms: 230, frequency: 50, limitId: 'ite-class1-handheld' });
    expect(under.ok).toBe(true);
    expect(under.cautions.join(' ')).toMatch(/certifies nothing/);
    expect(LEAKAGE_LIMITS.every((l) => l.source === 'from memory' && /IEC \d+/.test(l.standard))).toBe(true);
    // A withdrawn standard is said to be withdrawn, with its successor (from memory: IEC 60950-1
    // was superseded by IEC 62368-1).
    for (const l of LEAKAGE_LIMITS.filter((x) => x.standard.startsWith('IEC 60950-1'))) expect(l.standard).toMatch(/withdrawn.*IEC 62368-1/);
  });
  it('rejects bad input by name', () => {
    expect(() => checkBarrier({ capacitance: -1, voltageRms: 230, frequency: 50, limitId: 'ite-class2' })).toThrow(/^capacitance:/);
    expect(() => checkBarrier({ capacitance: 1e-9, voltageRms: 230, frequency: 50, limitId: 'nope' })).toThrow(/^limitId:/);
  });
});
