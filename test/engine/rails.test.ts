import { describe, expect, it } from 'vitest';
import { groupRails, voltageLabel } from '../../src-main/engine/rails.ts';
import { DEFAULT_LIMITS, DEFAULT_PREFERENCES, type Load, type Requirements } from '../../src-main/engine/model.ts';

function req(loads: Load[]): Requirements {
  return {
    meta: { name: 't', description: '', revision: 1 },
    sources: [], modes: [{ id: 'run', name: 'run', share: 1 as never }],
    domains: [{ id: 'd', name: 'Main', isolation: 'none', workingVoltage: 0 as never }],
    loads, limits: DEFAULT_LIMITS, preferences: DEFAULT_PREFERENCES,
  };
}
const load = (id: string, v: number, extra: Partial<Load> = {}): Load => ({
  id, name: id, domainId: 'd', voltage: v as never, tolerance: 0.05 as never,
  current: { run: 0.1 as never }, rippleLimit: 0.03 as never, noiseClass: 'standard', ...extra,
});

describe('rail grouping', () => {
  it('groups same voltage, domain and noise class; sums currents; keeps the tightest limits', () => {
    const rails = groupRails(req([load('a', 3.3), load('b', 3.3, { tolerance: 0.03 as never }), load('c', 1.8)]));
    expect(rails).toHaveLength(2);
    const r33 = rails.find((r) => r.voltage === 3.3)!;
    expect(r33.loadIds).toEqual(['a', 'b']);
    expect(r33.tolerance).toBe(0.03);
    expect(r33.current.run).toBeCloseTo(0.2, 12);
  });
  it('keeps quiet loads apart from digital ones unless a manual key joins them', () => {
    expect(groupRails(req([load('a', 5), load('b', 5, { noiseClass: 'quiet' })]))).toHaveLength(2);
    expect(groupRails(req([load('a', 5, { railKey: 'P5' }), load('b', 5, { noiseClass: 'quiet', railKey: 'P5' })]))).toHaveLength(1);
  });
  it('names voltages in engineering shorthand', () => {
    expect([3.3, 1.8, -12, 5, 0.9].map(voltageLabel)).toEqual(['3V3', '1V8', '-12V', '5V', '0V9']);
  });
});
