// The Y-capacitor check's pre-fill: only an rms working voltage is used as it stands; a peak
// is converted (rms of a sine = peak / √2, any circuits textbook, e.g. Horowitz and Hill, The
// Art of Electronics, ch. 1); a DC value gives no pre-fill (no steady current through a capacitor).
import { describe, expect, it } from 'vitest';
import { rmsPrefill } from '../../src-renderer/lib/barrier.ts';
import { parseQuantity } from '../../src-main/engine/notation.ts';

describe('Y-capacitor check: V rms pre-filled from the working voltage', () => {
  it('an rms working voltage as it stands', () => {
    const p = rmsPrefill(250, 'rms');
    expect(p.text).toBe('250 V');
    expect(p.note).toMatch(/rms/);
  });
  it('a peak working voltage divided by √2, and the text parses back to that value', () => {
    const p = rmsPrefill(325, 'peak');
    const v = parseQuantity(p.text, 'voltage', 'V rms');
    expect(v.ok && v.value).toBeCloseTo(325 / Math.sqrt(2), 1); // 229.8 V, four significant digits
    expect(p.text).toBe('229.8 V');
    expect(p.note).toMatch(/√2.*sine/);
  });
  it('a DC working voltage is not an rms value: nothing pre-filled, the note says what to enter', () => {
    const p = rmsPrefill(60, 'dc');
    expect(p.text).toBe('');
    expect(p.note).toMatch(/DC.*no steady current.*rms of the AC/);
  });
});
