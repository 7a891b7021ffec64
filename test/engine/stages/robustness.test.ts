// Any spec gets a design or reasons; any design evaluates to finite numbers with an exact
// energy balance. Random specs from fast-check (common practice: property testing).
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { designStage, evaluateStage, stageWindows } from '../../../src-main/engine/stages/index.ts';
import type { StageSpec } from '../../../src-main/engine/stages/types.ts';
import type { Amps, Celsius, Volts } from '../../../src-main/engine/units.ts';

const outArb = (v: fc.Arbitrary<number>) => fc.record({
  nodeId: fc.constantFrom('a', 'b', 'c', 'd'),
  voltage: v,
  tolerance: fc.double({ min: 0.01, max: 0.15, noNaN: true }),
  currentMin: fc.double({ min: 0, max: 0.05, noNaN: true }),
  currentMax: fc.double({ min: 0.05, max: 3, noNaN: true }),
  rippleLimit: fc.double({ min: 0.005, max: 0.2, noNaN: true }),
});

const specArb = fc.record({
  kind: fc.constantFrom('buck', 'cwbuck', 'ldo'),
  vinNom: fc.double({ min: 3, max: 60, noNaN: true }),
  spread: fc.double({ min: 0, max: 0.3, noNaN: true }),
  fsw: fc.double({ min: 100e3, max: 2e6, noNaN: true }),
  primary: outArb(fc.double({ min: 0.9, max: 15, noNaN: true })),
  secondaries: fc.array(outArb(fc.double({ min: -24, max: 24, noNaN: true }).filter((x) => Math.abs(x) > 1)), { minLength: 1, maxLength: 4 }),
}).map((r): StageSpec => ({
  kind: r.kind,
  vinMin: (r.vinNom * (1 - r.spread)) as Volts,
  vinNom: r.vinNom as Volts,
  vinMax: (r.vinNom * (1 + r.spread)) as Volts,
  vinRipple: 0.02 as Volts,
  fsw: r.fsw,
  ambient: 40,
  tjMax: 125,
  ceramicDerating: 0.6,
  outputs: r.kind === 'cwbuck' ? [r.primary, ...r.secondaries] : [r.primary],
} as unknown as StageSpec));

describe('stage engine robustness', () => {
  it('designs or explains every random spec; designs evaluate to finite, balanced numbers', () => {
    const designed: Record<string, number> = { buck: 0, cwbuck: 0, ldo: 0 };
    fc.assert(fc.property(specArb, (spec) => {
      const r = designStage(spec);
      if (r.ok) designed[spec.kind]!++;
      if (!r.ok) {
        expect(r.flags.length).toBeGreaterThan(0);
        for (const f of r.flags) expect(f.text.length).toBeGreaterThan(10);
        return;
      }
      const d = r.design;
      for (const vin of [d.vinMin, d.vinNom, d.vinMax]) {
        const ev = evaluateStage(d, { vin, iout: d.outputs.map((o) => o.currentMax), ambient: 40 as Celsius });
        for (const x of [ev.pin, ev.pout, ev.loss, ev.efficiency, ev.iin, ...ev.outputs.map((o) => o.voltage)]) expect(Number.isFinite(x)).toBe(true);
        expect(Math.abs(ev.pin - ev.pout - ev.loss)).toBeLessThan(1e-9 * Math.max(1, ev.pin));
        expect(ev.loss).toBeGreaterThanOrEqual(0);
      }
      const w = stageWindows(d, { vin: [d.vinMin, d.vinNom, d.vinMax], iout: d.outputs.map((o) => ({ min: o.currentMin as Amps, max: o.currentMax as Amps })) });
      for (const x of w) expect(x.min).toBeLessThanOrEqual(x.max);
    }), { numRuns: 120, seed: 20261201 });
    // the property is not vacuous: every kind got designed several times
    for (const k of ['buck', 'cwbuck', 'ldo']) expect(designed[k], k).toBeGreaterThan(3);
  });
  it('any operating point of a designed stage gives finite numbers, flagged when out of range', () => {
    const designs = [
      designStage({ kind: 'buck', vinMin: 10, vinNom: 12, vinMax: 14, fsw: 500e3, ambient: 25, tjMax: 125, ceramicDerating: 0.6,
        outputs: [{ nodeId: 'a', voltage: 3.3, tolerance: 0.03, currentMin: 0.1, currentMax: 2, rippleLimit: 0.05 }] } as unknown as StageSpec),
      designStage({ kind: 'cwbuck', vinMin: 18, vinNom: 24, vinMax: 32, fsw: 400e3, ambient: 25, tjMax: 125, ceramicDerating: 0.6,
        outputs: [{ nodeId: 'p', voltage: 5, tolerance: 0.03, currentMin: 0.05, currentMax: 0.5, rippleLimit: 0.05 },
          { nodeId: 's', voltage: 12, tolerance: 0.08, currentMin: 0.01, currentMax: 0.15, rippleLimit: 0.1 },
          { nodeId: 'n', voltage: -12, tolerance: 0.08, currentMin: 0.01, currentMax: 0.1, rippleLimit: 0.1 }] } as unknown as StageSpec),
    ].map((r) => { if (!r.ok) throw new Error('design'); return r.design; });
    fc.assert(fc.property(
      fc.constantFrom(0, 1), fc.double({ min: 0.1, max: 200, noNaN: true }), fc.array(fc.double({ min: 0, max: 20, noNaN: true }), { minLength: 3, maxLength: 3 }),
      (k, vin, cur) => {
        const d = designs[k]!;
        const ev = evaluateStage(d, { vin: vin as Volts, iout: cur.slice(0, d.outputs.length) as Amps[], ambient: 25 as Celsius });
        for (const x of [ev.pin, ev.pout, ev.loss, ev.efficiency, ...ev.outputs.map((o) => o.voltage), ...ev.outputs.map((o) => o.ripplePP)]) {
          expect(Number.isFinite(x)).toBe(true);
        }
        // an output short of its setpoint by more than 1 % always comes with an error flag
        const short = ev.outputs.some((o, i) => Math.abs(o.voltage) < 0.99 * Math.abs(d.outputs[i]!.voltage) && i === 0);
        if (short) expect(ev.flags.some((f) => f.severity === 'error')).toBe(true);
      }), { numRuns: 150, seed: 7 });
  });
});
