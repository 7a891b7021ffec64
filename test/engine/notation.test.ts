// Engineering notation at the edges. Sources of the expected values:
// - SI prefixes and their powers of ten: BIPM, The International System of Units (SI
//   Brochure), table of SI prefixes.
// - Letter-as-decimal-mark values (4k7, 2R2, 4u7): the letter-and-digit code of IEC 60062
//   (marking codes for resistors and capacitors), from memory; its use for voltages
//   (3V3, 1V8) is common practice on schematics.
// - "m" is milli and "M"/"meg" mega: SI Brochure for m/M; "meg" is common practice in
//   SPICE input decks.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  formatQuantity, formatShorthand, formatTolerance, formatUnit, parseQuantity, parseTolerance,
} from '../../src-main/engine/notation.ts';
import { fmtQty } from '../../src-main/engine/layout.ts';
import type { QuantityKind } from '../../src-main/engine/units.ts';

const close = (a: number, b: number) => Math.abs(a - b) <= 1e-12 * Math.max(1, Math.abs(b));

describe('parseQuantity accepts engineering notation', () => {
  // [text, kind, expected SI value]
  const valid: [string, QuantityKind, number][] = [
    ['3V3', 'voltage', 3.3], // IEC 60062-style letter mark, common practice for volts
    ['1V8', 'voltage', 1.8],
    ['3.3V', 'voltage', 3.3],
    ['3.3 V', 'voltage', 3.3],
    ['-12V', 'voltage', -12],
    ['−15 V', 'voltage', -15], // unicode minus sign
    ['+5V', 'voltage', 5],
    ['250mV', 'voltage', 0.25], // SI Brochure: m = 1e-3
    ['250m', 'current', 0.25],
    ['250mA', 'current', 0.25],
    ['1.2A', 'current', 1.2],
    ['1e-3', 'current', 0.001],
    ['2.5E-2', 'current', 0.025],
    ['.5', 'current', 0.5],
    ['4u7', 'capacitance', 4.7e-6], // IEC 60062 letter code
    ['4u7F', 'capacitance', 4.7e-6],
    ['4.7µF', 'capacitance', 4.7e-6], // micro sign U+00B5
    ['4.7μF', 'capacitance', 4.7e-6], // Greek mu U+03BC
    ['4.7uF', 'capacitance', 4.7e-6],
    ['470n', 'capacitance', 470e-9], // SI Brochure: n = 1e-9
    ['100nF', 'capacitance', 100e-9],
    ['22p', 'capacitance', 22e-12],
    ['2.2uH', 'inductance', 2.2e-6],
    ['10uH', 'inductance', 10e-6],
    ['1k5', 'resistance', 1500], // IEC 60062 letter code
    ['2R2', 'resistance', 2.2], // IEC 60062: R marks the decimal point for ohms
    ['R47', 'resistance', 0.47], // IEC 60062: leading R for values below one ohm
    ['4µ7', 'capacitance', 4.7e-6],
    ['1M5', 'resistance', 1.5e6],
    ['2m2', 'resistance', 2.2e-3], // lower-case m stays milli in the letter code too
    ['10 kΩ', 'resistance', 10e3],
    ['10kohm', 'resistance', 10e3],
    ['10k', 'resistance', 10e3],
    ['10K', 'resistance', 10e3], // capital K for kilo: common practice on resistor values
    ['1M', 'resistance', 1e6], // SI Brochure: M = 1e6
    ['1meg', 'resistance', 1e6], // SPICE convention, common practice
    ['1m', 'resistance', 1e-3], // m is milli, never mega
    ['100 kHz', 'frequency', 100e3],
    ['2.2MHz', 'frequency', 2.2e6],
    ['400k', 'frequency', 400e3],
    ['1.5W', 'power', 1.5],
    ['250mW', 'power', 0.25],
    ['20ns', 'time', 20e-9],
    ['10m', 'time', 10e-3],
    ['85°C', 'temperature', 85],
    ['-40 °C', 'temperature', -40],
    ['25', 'temperature', 25],
    ['45K/W', 'thermal-resistance', 45],
    ['60 °C/W', 'thermal-resistance', 60],
    ['80%', 'ratio', 0.8],
    ['0.8', 'ratio', 0.8],
    ['12nC', 'charge', 12e-9],
    ['1G', 'frequency', 1e9],
    ['3f', 'capacitance', 3e-15],
  ];
  for (const [text, kind, want] of valid) {
    it(`${JSON.stringify(text)} as ${kind} = ${want}`, () => {
      const r = parseQuantity(text, kind, 'f');
      expect(r.ok, JSON.stringify(r)).toBe(true);
      if (r.ok) expect(close(r.value, want), `${r.value} vs ${want}`).toBe(true);
    });
  }
  it('rounds decimal input once (4.7 µ is the double nearest 4.7e-6, not 4.7 × 1e-6)', () => {
    // The product 4.7 * 1e-6 carries a rounding error in binary floating point (IEEE 754).
    const r = parseQuantity('4.7u', 'capacitance', 'f');
    expect(r).toEqual({ ok: true, value: 4.7e-6 });
  });
});

describe('parseQuantity refuses bad input with the field and what was expected', () => {
  // [text, kind, fragment the message must contain]
  const invalid: [string, QuantityKind, string][] = [
    ['', 'voltage', 'empty'],
    ['   ', 'voltage', 'empty'],
    ['12x', 'current', '"12x" is not a current'],
    ['5A', 'voltage', 'A is the unit of current'],
    ['5mA', 'voltage', 'A is the unit of current'],
    ['3.3V', 'current', 'V is the unit of voltage'],
    ['3V3', 'current', 'V is the unit of voltage'],
    ['10uH', 'capacitance', 'H is the unit of inductance'],
    ['1k5k', 'resistance', 'ambiguous'],
    ['1kk', 'resistance', 'more than one multiplier'],
    ['NaN', 'voltage', 'not a finite number'],
    ['Infinity', 'voltage', 'not a finite number'],
    ['-inf', 'voltage', 'not a finite number'],
    ['1e999', 'voltage', 'out of range'],
    ['abc', 'voltage', 'is not a voltage'],
    ['3,3', 'voltage', 'is not a voltage'],
    ['--5', 'voltage', 'is not a voltage'],
    ['5 V V', 'voltage', 'is not a voltage'],
    ['2R2', 'voltage', 'R marks ohms'],
    ['R47', 'current', 'R marks ohms'],
    ['1k°C', 'temperature', 'is not a temperature'],
    ['e5', 'voltage', 'is not a voltage'],
    ['1x'.repeat(40), 'voltage', 'too long'],
  ];
  for (const [text, kind, frag] of invalid) {
    it(`${JSON.stringify(text).slice(0, 20)} as ${kind}`, () => {
      const r = parseQuantity(text, kind, 'loads[3].current.run');
      expect(r.ok).toBe(false);
      if (!r.ok) {
        expect(r.message).toContain(frag);
        expect(r.message.startsWith('loads[3].current.run: ')).toBe(true);
        expect(r.message).toContain('expected');
      }
    });
  }
  it('quotes the issue example verbatim', () => {
    const r = parseQuantity('12x', 'current', 'loads[3].current.run');
    expect(r).toEqual({ ok: false, message: 'loads[3].current.run: "12x" is not a current (expected e.g. 250m, 1.2A, 250mA)' });
  });
  it('never throws and never returns a non-finite value on arbitrary text (property)', () => {
    const kinds: QuantityKind[] = ['voltage', 'current', 'resistance', 'capacitance', 'temperature', 'ratio'];
    fc.assert(fc.property(fc.string({ maxLength: 30 }), fc.constantFrom(...kinds), (s, k) => {
      const r = parseQuantity(s, k, 'x');
      return r.ok ? Number.isFinite(r.value) : r.message.length > 0;
    }));
  });
});

describe('parseTolerance', () => {
  const ok: [string, number][] = [
    ['±5%', 0.05], ['5 %', 0.05], ['0.05', 0.05], ['+/-5%', 0.05], ['+-2%', 0.02],
    ['±0.5 %', 0.005], ['1%', 0.01], ['50ppm', 50e-6], ['± 1 %', 0.01],
  ];
  for (const [t, v] of ok) {
    it(`${t} → ${v}`, () => {
      const r = parseTolerance(t, 'loads[0].tolerance');
      expect(r.ok).toBe(true);
      if (r.ok) expect(close(r.value, v)).toBe(true);
    });
  }
  const bad: [string, string][] = [
    ['5', 'ambiguous'], ['-5%', 'symmetric'], ['', 'empty'], ['five', 'not a tolerance'], ['5%%', 'not a tolerance'],
  ];
  for (const [t, frag] of bad) {
    it(`refuses ${JSON.stringify(t)}`, () => {
      const r = parseTolerance(t, 'loads[0].tolerance');
      expect(r.ok).toBe(false);
      if (!r.ok) {
        expect(r.message).toContain(frag);
        expect(r.message.startsWith('loads[0].tolerance: ')).toBe(true);
      }
    });
  }
});

describe('formatQuantity', () => {
  const cases: [number, QuantityKind, number, string][] = [
    [3.3, 'voltage', 3, '3.3 V'],
    [0.25, 'current', 3, '250 mA'],
    [4.7e-6, 'capacitance', 3, '4.7 µF'],
    [-12, 'voltage', 3, '-12 V'],
    [1500, 'resistance', 3, '1.5 kΩ'],
    [400e3, 'frequency', 3, '400 kHz'],
    [0.9996, 'current', 3, '1 A'], // rounding carries into the next prefix decade
    [999.6e-3, 'voltage', 3, '1 V'],
    [123456, 'frequency', 3, '123 kHz'],
    [123456, 'frequency', 4, '123.5 kHz'],
    [0, 'power', 3, '0 W'],
    [2.2e-9, 'capacitance', 2, '2.2 nF'],
    [85, 'temperature', 3, '85 °C'],
    [0.05, 'ratio', 3, '5 %'],
    [4.096, 'voltage', 4, '4.096 V'],
    [12e-9, 'charge', 3, '12 nC'],
  ];
  for (const [v, k, sig, want] of cases) {
    it(`${v} ${k} (${sig} digits) → ${want}`, () => expect(formatQuantity(v, k, sig)).toBe(want));
  }
  it('formats tolerance and shorthand', () => {
    expect(formatTolerance(0.05)).toBe('±5 %');
    expect(formatTolerance(0.005)).toBe('±0.5 %');
    expect(formatShorthand(3.3, 'voltage')).toBe('3V3'); // common practice for rail names
    expect(formatShorthand(-12, 'voltage')).toBe('-12V');
    expect(formatShorthand(4.7e-6, 'capacitance')).toBe('4u7'); // IEC 60062 letter code
    expect(formatShorthand(1500, 'resistance')).toBe('1k5');
    expect(formatShorthand(2.2, 'resistance')).toBe('2R2');
    expect(formatShorthand(100e-9, 'capacitance')).toBe('100n');
  });
  it('marks non-finite values instead of printing NaN', () => {
    expect(formatQuantity(NaN, 'voltage')).toBe('—');
    expect(formatQuantity(1e-20, 'capacitance')).not.toContain('NaN');
  });
  it('parse(format(x)) returns x to the printed precision (property)', () => {
    const kinds: QuantityKind[] = ['voltage', 'current', 'resistance', 'capacitance', 'inductance', 'frequency'];
    fc.assert(fc.property(
      fc.double({ min: 1e-14, max: 1e10, noNaN: true }), fc.boolean(), fc.constantFrom(...kinds),
      (x, neg, k) => {
        const v = neg ? -x : x;
        const text = formatQuantity(v, k, 6);
        const r = parseQuantity(text, k, 'x');
        return r.ok && Math.abs(r.value - v) <= 1e-5 * Math.abs(v);
      }));
  });
  it('parse(shorthand(x)) returns x for typical values (property)', () => {
    fc.assert(fc.property(fc.integer({ min: 10, max: 999 }), fc.integer({ min: -9, max: 6 }), (m, e3) => {
      const v = Number(`${m / 100}e${e3}`);
      const r = parseQuantity(formatShorthand(v, 'resistance'), 'resistance', 'x');
      return r.ok && close(r.value, v);
    }));
  });
});

describe('formatUnit: the one quantity formatter', () => {
  // Expected texts: SI prefixes (SI Brochure) at three significant digits, written by hand.
  for (const [v, u, want] of [
    [0.0123, 'A', '12.3 mA'], [4.7e-6, 'F', '4.7 µF'], [400e3, 'Hz', '400 kHz'], [-12, 'V', '-12 V'],
    [0.9996, 'W', '1 W'], [999.6e3, 'Ω', '1 MΩ'], [0, 'A', '0 A'], [2.2e-3, '', '2.2 m'],
  ] as [number, string, string][]) {
    it(`${v} ${u} → ${want}`, () => expect(formatUnit(v, u)).toBe(want));
  }
  it('prints nothing that is not finite as a number', () => {
    expect([formatUnit(NaN, 'V'), formatUnit(Infinity, 'V'), formatUnit(-Infinity, 'V')]).toEqual(['—', '∞', '−∞']);
  });
  it('the drawing and exports print a quantity exactly as the window does', () => {
    // Values on a decimal tie (0.01525 W) once printed differently by two formatters.
    fc.assert(fc.property(fc.double({ min: 1e-12, max: 1e9, noNaN: true }), fc.constantFrom(3, 4), (v, sig) =>
      fmtQty(v, 'W', sig) === formatQuantity(v, 'power', sig) && fmtQty(-v, 'A', sig) === formatQuantity(-v, 'current', sig)));
    expect(fmtQty(0.01525, 'W')).toBe(formatQuantity(0.01525, 'power'));
  });
});
