// A load that takes more power than the sources can give at their minimum voltage is a
// problem before planning (energy conservation: no converter gives out more than it takes in).
import { describe, expect, it } from 'vitest';
import { demoDocument } from '../../src-main/store/demo.ts';
import { sourceCapacityProblems, validateRequirements } from '../../src-main/engine/validate.ts';
import type { Amps } from '../../src-main/engine/units.ts';

describe('source capacity before planning', () => {
  it('a 5 A load at 12 V on a 3 A source raises a problem naming the mode and the figures', () => {
    const req = demoDocument().requirements;
    expect(sourceCapacityProblems(req)).toEqual([]);
    const src = req.sources[0]!;
    src.currentLimit = 3 as Amps;
    const relay = req.loads.find((l) => Math.abs(l.voltage - 12) < 1e-9)!;
    const mode = req.modes[0]!;
    relay.current[mode.id] = 5 as Amps;
    const problems = sourceCapacityProblems(req);
    expect(problems.length).toBe(1);
    // 5 A × 12 V = 60 W alone, above V min × 3 A.
    expect(problems[0]!.message).toMatch(new RegExp(`mode "${mode.name}".*more than the sources can give`));
    expect(problems[0]!.message).toContain('× 3 A');
    expect(validateRequirements(req).some((p) => p.path === 'modes[0]')).toBe(true);
  });
});
